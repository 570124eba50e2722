import { colors, fonts, radii, space, type as typeScale } from '../theme';

/** Web: a real <a href download>, styled as a secondary button; the browser saves the file. */
export function DownloadLink({ href, title, label, fileName }: { href: string; title: string; label?: string; fileName?: string }) {
  return (
    <a
      href={href}
      download={fileName ?? true}
      aria-label={label}
      data-testid="download-link"
      style={{
        display: 'inline-flex',
        alignItems: 'center',
        minHeight: 36,
        boxSizing: 'border-box',
        padding: `0 ${space.md}px`,
        border: `1.5px solid ${colors.accent}`,
        borderRadius: radii.md,
        background: colors.surface,
        color: colors.accent,
        fontFamily: fonts.textBold,
        fontSize: typeScale.small.fontSize,
        textDecoration: 'none',
      }}
    >
      {title}
    </a>
  );
}
