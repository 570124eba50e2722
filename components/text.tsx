import { Text as RNText, StyleSheet, type TextProps } from 'react-native';
import { colors, fonts, type as typeScale } from './theme';

type Variant = keyof typeof typeScale;

export interface KTextProps extends TextProps {
  variant?: Variant;
  bold?: boolean;
  muted?: boolean;
  color?: string;
  /** Numbers and identifiers: IBM Plex Mono so digits line up. */
  mono?: boolean;
}

/** Body text in Atkinson Hyperlegible (or Plex Mono with `mono`). */
export function Text({ variant = 'body', bold, muted, mono, color, style, ...rest }: KTextProps) {
  return (
    <RNText
      {...rest}
      style={[
        typeScale[variant],
        { color: color ?? (muted ? colors.inkMuted : colors.ink) },
        { fontFamily: mono ? (bold ? fonts.monoMedium : fonts.mono) : bold ? fonts.textBold : fonts.text },
        style,
      ]}
    />
  );
}

/** Headings carry the heading role (and level on web) so screen readers and tests can find them. */
export function Heading({ level = 1, style, ...rest }: KTextProps & { level?: 1 | 2 | 3 }) {
  const variant: Variant = level === 1 ? 'title' : level === 2 ? 'heading' : 'body';
  return (
    <Text
      role="heading"
      aria-level={level}
      variant={variant}
      bold
      {...rest}
      style={[level === 1 ? styles.h1 : null, style]}
    />
  );
}

/** A number with its unit, always in mono (e.g. "0.312 Hz", "4.8 %"). */
export function Num({ style, ...rest }: KTextProps) {
  return <Text mono {...rest} style={[styles.num, style]} />;
}

const styles = StyleSheet.create({
  h1: { letterSpacing: -0.2 },
  num: { fontVariant: ['tabular-nums'] },
});
