import { router, usePathname } from 'expo-router';
import type { ReactNode } from 'react';
import { StyleSheet, View } from 'react-native';
import { useSafeAreaInsets } from 'react-native-safe-area-context';
import type { MeResponse } from '@/shared/api/auth';
import { ROLE_LABELS } from '@/shared/roles';
import { useSignOutMutation } from '@/hooks/use-auth';
import { useBreakpoint } from '@/hooks/use-breakpoint';
import { Button } from '../button';
import { KeelMark } from '../keel-mark';
import { Text } from '../text';
import { colors, layout, space } from '../theme';
import { NavLink } from './nav-link';
import { activeSection, sectionsFor } from './sections';

/**
 * The signed-in frame. Phones and small tablets (< 800 px): a top bar with the person and
 * "Sign out", the screen, and a bottom tab bar. Wide screens: a side rail with the same items.
 */
export function AppShell({ me, children }: { me: MeResponse; children: ReactNode }) {
  const bp = useBreakpoint();
  const pathname = usePathname();
  const insets = useSafeAreaInsets();
  const sections = sectionsFor(me.person.role);
  const active = activeSection(pathname, sections);
  const signOut = useSignOutMutation();
  const onSignOut = () =>
    signOut.mutate(undefined, {
      onSettled: () => router.replace('/sign-in'),
    });

  if (bp.isWide) {
    return (
      <View style={styles.wideRoot}>
        <View style={styles.rail} role="navigation" aria-label="Sections">
          <View style={styles.brand}>
            <KeelMark size={30} />
            <Text variant="heading" bold style={styles.brandWord}>
              Keel
            </Text>
          </View>
          <View style={styles.railItems}>
            {sections.map((s) => (
              <NavLink key={s.key} section={s} active={active === s.key} variant="rail" />
            ))}
          </View>
          <View style={styles.railFoot}>
            <Text bold numberOfLines={1} testID="signed-in-name">
              {me.person.displayName}
            </Text>
            <Text variant="small" muted numberOfLines={1}>
              {ROLE_LABELS[me.person.role]}
            </Text>
            <Text variant="caption" muted numberOfLines={1} style={styles.email}>
              {me.person.email}
            </Text>
            <Button title="Sign out" kind="secondary" compact onPress={onSignOut} busy={signOut.isPending} style={styles.signOut} />
          </View>
        </View>
        <View style={styles.main} role="main">
          {children}
        </View>
      </View>
    );
  }

  return (
    <View style={[styles.narrowRoot, { paddingTop: insets.top }]}>
      <View style={styles.topBar} role="banner">
        <View style={styles.brand}>
          <KeelMark size={26} />
          <Text variant="heading" bold style={styles.brandWord}>
            Keel
          </Text>
        </View>
        <View style={styles.topRight}>
          <View style={styles.who}>
            <Text variant="small" bold numberOfLines={1} testID="signed-in-name">
              {me.person.displayName}
            </Text>
            <Text variant="caption" muted numberOfLines={1}>
              {ROLE_LABELS[me.person.role]}
            </Text>
          </View>
          <Button title="Sign out" kind="quiet" compact onPress={onSignOut} busy={signOut.isPending} />
        </View>
      </View>
      <View style={styles.main} role="main">
        {children}
      </View>
      <View style={[styles.tabBar, { paddingBottom: insets.bottom }]} role="navigation" aria-label="Sections">
        {sections.map((s) => (
          <NavLink key={s.key} section={s} active={active === s.key} variant="tab" />
        ))}
      </View>
    </View>
  );
}

const styles = StyleSheet.create({
  wideRoot: { flex: 1, flexDirection: 'row', backgroundColor: colors.paper },
  rail: {
    width: layout.railWidth,
    backgroundColor: colors.surface,
    borderRightWidth: 1,
    borderRightColor: colors.rule,
    paddingVertical: space.lg,
    paddingHorizontal: space.md,
  },
  brand: { flexDirection: 'row', alignItems: 'center', gap: space.sm, paddingHorizontal: space.xs },
  brandWord: { letterSpacing: 0.5 },
  railItems: { marginTop: space.xl, flex: 1 },
  railFoot: { borderTopWidth: 1, borderTopColor: colors.rule, paddingTop: space.md, paddingHorizontal: space.xs, gap: 2 },
  email: { marginBottom: space.sm },
  signOut: { marginTop: space.xs },
  main: { flex: 1, minWidth: 0 },
  narrowRoot: { flex: 1, backgroundColor: colors.paper },
  topBar: {
    minHeight: layout.topBarHeight,
    flexDirection: 'row',
    alignItems: 'center',
    justifyContent: 'space-between',
    paddingHorizontal: space.lg,
    borderBottomWidth: 1,
    borderBottomColor: colors.rule,
    backgroundColor: colors.surface,
    gap: space.sm,
  },
  topRight: { flexDirection: 'row', alignItems: 'center', gap: space.xs, flexShrink: 1 },
  who: { alignItems: 'flex-end', flexShrink: 1 },
  tabBar: {
    flexDirection: 'row',
    borderTopWidth: 1,
    borderTopColor: colors.rule,
    backgroundColor: colors.surface,
  },
});
