import { Linking } from 'react-native';
import { Button } from '../button';

/** Native: opens the CSV link in the system browser, which downloads it with the session. */
export function DownloadLink({ href, title, label }: { href: string; title: string; label?: string; fileName?: string }) {
  return <Button title={title} label={label} kind="secondary" compact onPress={() => void Linking.openURL(href)} />;
}
