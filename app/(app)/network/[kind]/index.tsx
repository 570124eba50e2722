import { useLocalSearchParams } from 'expo-router';
import { NetworkScreen } from '@/components/network/network-screen';

export default function NetworkKindRoute() {
  const { kind } = useLocalSearchParams<{ kind: string }>();
  return <NetworkScreen kind={kind} />;
}
