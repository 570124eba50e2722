import { colors, fonts } from './theme';

/** Web: a plain <a href>, so the browser (and tests) see a real link that can be opened or copied. */
export function ExternalLink({ href, children, label }: { href: string; children: string; label?: string }) {
  return (
    <a
      href={href}
      aria-label={label}
      style={{ color: colors.accent, fontFamily: fonts.mono, textDecoration: 'underline', wordBreak: 'break-all' }}
    >
      {children}
    </a>
  );
}
