import { WatchScreen } from '@/components/watch/watch-screen';

export default function WatchRoute() {
  return <WatchScreen />;
}
