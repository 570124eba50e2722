import { useLocalSearchParams } from 'expo-router';
import { TransferScreen } from '@/components/transfer/transfer-screen';

export default function TransferRoute() {
  const { track, saved } = useLocalSearchParams<{ track?: string; saved?: string }>();
  return <TransferScreen track={track} saved={saved} />;
}
