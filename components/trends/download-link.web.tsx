import { colors, fonts, radii, space } from '../theme';

/** Web: a real <a href download>, so the browser saves the server's CSV (and tests see a link). */
export function DownloadLink({ href, title, label, fileName }: { href: string; title: string; label?: string; fileName?: string }) {
  return (
    <a
      href={href}
      download={fileName ?? ''}
      aria-label={label}
      style={{
        display: 'inline-flex',
        alignItems: 'center',
        minHeight: 40,
        padding: `0 ${space.md}px`,
        border: `1.5px solid ${colors.accent}`,
        borderRadius: radii.md,
        color: colors.accent,
        background: colors.surface,
        fontFamily: fonts.textBold,
        fontSize: 14,
        textDecoration: 'none',
        alignSelf: 'flex-start',
      }}
    >
      {title}
    </a>
  );
}
