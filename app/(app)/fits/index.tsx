import { AnalysesScreen } from '@/components/scans/analyses-screen';

export default function FitsRoute() {
  return <AnalysesScreen kind="fit" />;
}
