import { useLocalSearchParams } from 'expo-router';
import { TrendsScreen } from '@/components/trends/trends-screen';

export default function TrendsRoute() {
  const { track } = useLocalSearchParams<{ track?: string }>();
  return <TrendsScreen track={track} />;
}
