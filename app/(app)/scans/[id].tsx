import { useLocalSearchParams } from 'expo-router';
import { ScanScreen } from '@/components/scans/scan-screen';

export default function ScanRoute() {
  const { id } = useLocalSearchParams<{ id: string }>();
  return <ScanScreen id={id} />;
}
