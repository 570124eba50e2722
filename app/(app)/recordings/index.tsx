import { RecordingsScreen } from '@/components/recordings/recordings-screen';

export default function RecordingsRoute() {
  return <RecordingsScreen />;
}
