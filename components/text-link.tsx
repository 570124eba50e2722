import { Link, type Href } from 'expo-router';
import { StyleSheet } from 'react-native';
import { colors, fonts, type as typeScale } from './theme';

/**
 * An in-app link written as text (an <a href> on web), underlined so it never relies on colour.
 * Its words are its accessible name; `label` only when they need more context.
 */
export function TextLink({ href, children, label, small }: { href: Href; children: string; label?: string; small?: boolean }) {
  return (
    <Link href={href} aria-label={label} style={[styles.link, small ? typeScale.small : typeScale.body]}>
      {children}
    </Link>
  );
}

const styles = StyleSheet.create({
  link: { color: colors.accent, fontFamily: fonts.textBold, textDecorationLine: 'underline' },
});
