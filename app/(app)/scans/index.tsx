import { AnalysesScreen } from '@/components/scans/analyses-screen';

export default function ScansRoute() {
  return <AnalysesScreen kind="scan" />;
}
