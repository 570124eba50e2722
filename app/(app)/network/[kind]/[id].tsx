import { useLocalSearchParams } from 'expo-router';
import { NetworkScreen } from '@/components/network/network-screen';

export default function NetworkRecordRoute() {
  const { kind, id } = useLocalSearchParams<{ kind: string; id: string }>();
  return <NetworkScreen kind={kind} editing={id} />;
}
