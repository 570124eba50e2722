import { Redirect } from 'expo-router';

export default function NetworkIndexRoute() {
  return <Redirect href="/network/areas" />;
}
