import { useLocalSearchParams } from 'expo-router';
import { OutboxScreen } from '@/components/outbox/outbox-screen';

export default function OutboxMessageRoute() {
  const { id } = useLocalSearchParams<{ id: string }>();
  return <OutboxScreen openId={id} />;
}
