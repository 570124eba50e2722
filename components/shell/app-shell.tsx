import { router, usePathname } from 'expo-router';
import { useEffect, useState, type ReactNode } from 'react';
import { Pressable, StyleSheet, View } from 'react-native';
import Svg, { Circle } from 'react-native-svg';
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
  const [moreOpen, setMoreOpen] = useState(false);
  // Close the overflow sheet whenever the screen changes.
  useEffect(() => setMoreOpen(false), [pathname]);
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

  // Phones fit five tabs; beyond that the last ones move into a "More" sheet.
  const maxTabs = bp.isCompact ? 5 : 8;
  const tabs = sections.length > maxTabs ? sections.slice(0, maxTabs - 1) : sections;
  const more = sections.length > maxTabs ? sections.slice(maxTabs - 1) : [];
  const moreActive = more.some((s) => s.key === active);

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
      {moreOpen ? (
        <View style={[styles.sheet, { bottom: layout.tabBarHeight + insets.bottom }]} testID="nav-more-sheet">
          {more.map((s) => (
            <NavLink key={s.key} section={s} active={active === s.key} variant="rail" />
          ))}
        </View>
      ) : null}
      <View style={[styles.tabBar, { paddingBottom: insets.bottom }]} role="navigation" aria-label="Sections">
        {tabs.map((s) => (
          <NavLink key={s.key} section={s} active={active === s.key} variant="tab" />
        ))}
        {more.length > 0 ? (
          <Pressable
            role="button"
            aria-expanded={moreOpen}
            testID="nav-more"
            onPress={() => setMoreOpen((o) => !o)}
            style={styles.moreTab}
          >
            <MoreIcon color={moreActive || moreOpen ? colors.accent : colors.inkMuted} />
            <Text variant="caption" bold={moreActive} color={moreActive || moreOpen ? colors.accent : colors.ink} style={styles.moreLabel}>
              More
            </Text>
          </Pressable>
        ) : null}
      </View>
    </View>
  );
}

function MoreIcon({ color }: { color: string }) {
  return (
    <Svg width={22} height={22} viewBox="0 0 24 24" aria-hidden>
      {[5, 12, 19].map((cx) => (
        <Circle key={cx} cx={cx} cy={12} r={1.8} fill={color} />
      ))}
    </Svg>
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
  moreTab: { flex: 1, minHeight: layout.tabBarHeight, alignItems: 'center', justifyContent: 'center', paddingTop: space.xs, gap: 2 },
  moreLabel: { fontSize: 12 },
  sheet: {
    position: 'absolute',
    right: space.sm,
    left: space.sm,
    padding: space.sm,
    backgroundColor: colors.surface,
    borderWidth: 1,
    borderColor: colors.rule,
    borderRadius: 12,
    shadowColor: colors.ink,
    shadowOpacity: 0.12,
    shadowRadius: 12,
    shadowOffset: { width: 0, height: 4 },
  },
  tabBar: {
    flexDirection: 'row',
    borderTopWidth: 1,
    borderTopColor: colors.rule,
    backgroundColor: colors.surface,
  },
});
