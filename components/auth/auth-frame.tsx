import type { ReactNode } from 'react';
import { ScrollView, StyleSheet, View } from 'react-native';
import { useBreakpoint } from '@/hooks/use-breakpoint';
import { KeelMark } from '../keel-mark';
import { Heading, Text } from '../text';
import { colors, layout, radii, space } from '../theme';
import { RingdownArt } from './ringdown-art';

/**
 * Frame of the signed-out screens (sign-in, invitation, password reset): the product's name and
 * what it is for, then one form. Side by side on wide screens, stacked on phones.
 */
export function AuthFrame({ title, intro, children }: { title: string; intro?: string; children: ReactNode }) {
  const bp = useBreakpoint();
  const form = (
    <View style={[styles.formCard, bp.isCompact && styles.formCardCompact]}>
      <Heading level={1}>{title}</Heading>
      {intro ? (
        <Text muted style={styles.intro}>
          {intro}
        </Text>
      ) : null}
      <View style={styles.formBody}>{children}</View>
    </View>
  );

  if (bp.isWide) {
    return (
      <View style={styles.wideRoot}>
        <View style={styles.brandPane}>
          <View style={styles.brandRow}>
            <KeelMark size={44} color={colors.paper} />
            <Text variant="display" bold color={colors.paper} style={styles.brandWord}>
              Keel
            </Text>
          </View>
          <View style={styles.art}>
            <RingdownArt width={360} height={120} />
          </View>
          <Text variant="heading" color={colors.paper} style={styles.tagline}>
            The damping of the grid’s oscillation modes, measured from synchrophasor data.
          </Text>
          <Text variant="small" color="#C9D3DA" style={styles.caution}>
            Estimates are advisory. Operating actions follow your own procedures, the reliability
            coordinator’s instructions and local rules.
          </Text>
        </View>
        <ScrollView style={styles.formPane} contentContainerStyle={styles.formPaneContent} keyboardShouldPersistTaps="handled">
          {form}
        </ScrollView>
      </View>
    );
  }

  return (
    <ScrollView style={styles.narrowRoot} contentContainerStyle={styles.narrowContent} keyboardShouldPersistTaps="handled">
      <View style={styles.brandRowNarrow}>
        <KeelMark size={32} />
        <Text variant="title" bold style={styles.brandWord}>
          Keel
        </Text>
      </View>
      {form}
    </ScrollView>
  );
}

const styles = StyleSheet.create({
  wideRoot: { flex: 1, flexDirection: 'row', backgroundColor: colors.paper },
  brandPane: {
    width: '40%',
    maxWidth: 520,
    backgroundColor: colors.ink,
    padding: space.xxxl,
    justifyContent: 'center',
  },
  brandRow: { flexDirection: 'row', alignItems: 'center', gap: space.md },
  brandWord: { letterSpacing: 0.5 },
  art: { marginTop: space.xxl },
  tagline: { marginTop: space.xl, maxWidth: 380 },
  caution: { marginTop: space.xl, maxWidth: 380 },
  formPane: { flex: 1 },
  formPaneContent: { flexGrow: 1, justifyContent: 'center', alignItems: 'center', padding: space.xxl },
  formCard: {
    width: '100%',
    maxWidth: layout.formMaxWidth - 80,
    backgroundColor: colors.surface,
    borderWidth: 1,
    borderColor: colors.rule,
    borderRadius: radii.lg,
    padding: space.xl,
  },
  formCardCompact: { padding: space.lg },
  intro: { marginTop: space.xs },
  formBody: { marginTop: space.xl },
  narrowRoot: { flex: 1, backgroundColor: colors.paper },
  narrowContent: { padding: space.lg, paddingTop: space.xxl, alignItems: 'center' },
  brandRowNarrow: { flexDirection: 'row', alignItems: 'center', gap: space.sm, marginBottom: space.xl, alignSelf: 'center' },
});
