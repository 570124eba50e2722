import { ActivityIndicator, StyleSheet, View } from 'react-native';
import { Button } from './button';
import { Text } from './text';
import { colors, radii, space } from './theme';

/** Loading: a spinner with words (the words are what a screen reader announces). */
export function LoadingState({ label = 'Loading…' }: { label?: string }) {
  return (
    <View role="status" aria-label={label} style={styles.box}>
      <ActivityIndicator color={colors.accent} />
      <Text muted style={styles.text}>
        {label}
      </Text>
    </View>
  );
}

/** Error: what failed, the server's message, and a way to try again. */
export function ErrorState({ title = 'Could not load this', message, onRetry }: { title?: string; message?: string; onRetry?: () => void }) {
  return (
    <View role="alert" style={[styles.box, styles.error]}>
      <Text bold color={colors.danger}>
        {title}
      </Text>
      {message ? (
        <Text variant="small" style={styles.text}>
          {message}
        </Text>
      ) : null}
      {onRetry ? <Button kind="secondary" compact title="Try again" onPress={onRetry} style={styles.retry} /> : null}
    </View>
  );
}

/** Empty: says plainly that there is nothing yet and, when useful, what to do about it. */
export function EmptyState({ title, message, children }: { title: string; message?: string; children?: React.ReactNode }) {
  return (
    <View style={[styles.box, styles.empty]}>
      <Text bold>{title}</Text>
      {message ? (
        <Text variant="small" muted style={styles.text}>
          {message}
        </Text>
      ) : null}
      {children}
    </View>
  );
}

/** A one-line form-level message (success or failure) announced politely. */
export function Notice({ kind, children }: { kind: 'error' | 'ok' | 'info'; children: React.ReactNode }) {
  const palette =
    kind === 'error'
      ? { bg: colors.dangerSoft, fg: colors.danger, border: colors.danger }
      : kind === 'ok'
        ? { bg: colors.accentSoft, fg: colors.accent, border: colors.accent }
        : { bg: colors.surface, fg: colors.ink, border: colors.rule };
  return (
    <View
      role={kind === 'error' ? 'alert' : 'status'}
      aria-live="polite"
      style={[styles.notice, { backgroundColor: palette.bg, borderColor: palette.border }]}
    >
      <Text variant="small" color={palette.fg}>
        {children}
      </Text>
    </View>
  );
}

const styles = StyleSheet.create({
  box: { paddingVertical: space.xl, paddingHorizontal: space.lg, alignItems: 'flex-start', gap: space.sm },
  text: { marginTop: space.xs },
  error: { borderLeftWidth: 3, borderLeftColor: colors.danger, backgroundColor: colors.dangerSoft, borderRadius: radii.sm },
  empty: { borderWidth: 1, borderStyle: 'dashed', borderColor: colors.rule, borderRadius: radii.md },
  retry: { marginTop: space.sm },
  notice: { borderWidth: 1, borderRadius: radii.md, padding: space.md, marginBottom: space.lg },
});
