import { useLocalSearchParams } from 'expo-router';
import { RecordingScreen } from '@/components/recordings/recording-screen';

export default function RecordingRoute() {
  const { id } = useLocalSearchParams<{ id: string }>();
  return <RecordingScreen id={id} />;
}
