import { Linking, Text } from 'react-native';
import { colors, fonts } from './theme';

/** Native: underlined text that opens the address with the system's handler. */
export function ExternalLink({ href, children, label }: { href: string; children: string; label?: string }) {
  return (
    <Text
      role="link"
      aria-label={label ?? children}
      onPress={() => void Linking.openURL(href)}
      style={{ color: colors.accent, fontFamily: fonts.mono, textDecorationLine: 'underline' }}
    >
      {children}
    </Text>
  );
}
