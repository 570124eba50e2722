// Keel's one token module (DESIGN.md §4). Every colour, space, type size and font family used by
// the app comes from here so the look stays consistent and can be changed in one place.
import type { Band } from '@/shared/bands';

export const colors = {
  ink: '#14202B',
  paper: '#F5F3EE',
  accent: '#0F6E6A',
  /** Slightly raised surfaces (cards, the rail) sit one step lighter than paper. */
  surface: '#FBFAF7',
  /** Secondary text: ink at reduced contrast, still ≥ 4.5:1 on paper (WCAG AA). */
  inkMuted: '#4A5763',
  /** Hairlines and field borders; the stronger one is for inputs (≥ 3:1 on paper for UI parts). */
  rule: '#D9D4C9',
  ruleStrong: '#7C858D',
  accentSoft: '#DCEBE9',
  onAccent: '#FFFFFF',
  /** Used for error text and destructive actions; same hue as the poor band on purpose. */
  danger: '#A8321F',
  dangerSoft: '#F6E3DE',
  focus: '#0F6E6A',
} as const;

/** The damping bands of shared/bands.ts (DESIGN.md §3). */
export type BandName = Band;

/**
 * Damping bands: colour, shape and word together so colour is never the only cue.
 * `onTint` is the text colour used on the soft tint background (contrast ≥ 4.5:1).
 */
export const bands: Record<BandName, { color: string; tint: string; shape: string; word: string; meaning: string }> = {
  ample: { color: '#3A5A8C', tint: '#E3E9F2', shape: '○', word: 'ample', meaning: 'damping at or above the low threshold' },
  low: { color: '#B7791F', tint: '#F5EAD7', shape: '◇', word: 'low', meaning: 'damping between the poor and low thresholds' },
  poor: { color: '#C2412D', tint: '#F6E1DC', shape: '▲', word: 'poor', meaning: 'damping below the poor threshold' },
  forced: { color: '#6B4FA0', tint: '#ECE6F4', shape: '∿', word: 'forced', meaning: 'a sustained forced oscillation, not a natural mode' },
};

/** Band ink on its tint: the band colours darkened just enough for small text (≥ 4.5:1). */
export const bandText: Record<BandName, string> = {
  ample: '#2F4A74',
  low: '#7A4F12',
  poor: '#9E3322',
  forced: '#563F83',
};

/** 4-point spacing scale. */
export const space = {
  xxs: 2,
  xs: 4,
  sm: 8,
  md: 12,
  lg: 16,
  xl: 24,
  xxl: 32,
  xxxl: 48,
} as const;

export const radii = { sm: 4, md: 8, lg: 12, pill: 999 } as const;

/**
 * Font family names as registered with expo-font (see components/fonts.ts). Atkinson Hyperlegible
 * for text; IBM Plex Mono for numbers and tables so digits line up.
 */
export const fonts = {
  text: 'AtkinsonHyperlegible_400Regular',
  textBold: 'AtkinsonHyperlegible_700Bold',
  mono: 'IBMPlexMono_400Regular',
  monoMedium: 'IBMPlexMono_500Medium',
} as const;

/** Type scale: size and line height in px. */
export const type = {
  display: { fontSize: 28, lineHeight: 34 },
  title: { fontSize: 22, lineHeight: 28 },
  heading: { fontSize: 18, lineHeight: 24 },
  body: { fontSize: 16, lineHeight: 23 },
  small: { fontSize: 14, lineHeight: 20 },
  caption: { fontSize: 12, lineHeight: 16 },
} as const;

/**
 * Named breakpoints, min widths in px: compact < 500, medium 500–800, wide ≥ 800, xwide ≥ 1300.
 * Wide and up get the side rail instead of the bottom tab bar.
 */
export const breakpoints = {
  medium: 500,
  wide: 800,
  xwide: 1300,
} as const;

export type BreakpointName = 'compact' | 'medium' | 'wide' | 'xwide';

export function breakpointFor(width: number): BreakpointName {
  if (width >= breakpoints.xwide) return 'xwide';
  if (width >= breakpoints.wide) return 'wide';
  if (width >= breakpoints.medium) return 'medium';
  return 'compact';
}

/** Widest a reading column gets, so forms and text stay comfortable on big screens. */
export const layout = {
  railWidth: 208,
  contentMaxWidth: 1240,
  formMaxWidth: 520,
  tabBarHeight: 60,
  topBarHeight: 52,
  /** Minimum touch target, px (common practice for touch UIs). */
  hitTarget: 44,
} as const;

export const theme = { colors, bands, bandText, space, radii, fonts, type, breakpoints, layout } as const;
export default theme;
