import { useLocalSearchParams } from 'expo-router';
import { AlertScreen } from '@/components/alerts/alert-screen';

export default function AlertRoute() {
  const { id } = useLocalSearchParams<{ id: string }>();
  return <AlertScreen id={id} />;
}
