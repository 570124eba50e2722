import { useLocalSearchParams } from 'expo-router';
import { AlertsScreen } from '@/components/alerts/alerts-screen';

export default function AlertsRoute() {
  const { state, track } = useLocalSearchParams<{ state?: string; track?: string }>();
  return <AlertsScreen state={state} track={track} />;
}
