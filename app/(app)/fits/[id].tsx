import { useLocalSearchParams } from 'expo-router';
import { FitScreen } from '@/components/fits/fit-screen';

export default function FitRoute() {
  const { id } = useLocalSearchParams<{ id: string }>();
  return <FitScreen id={id} />;
}
