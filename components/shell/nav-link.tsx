import { Link, type Href } from 'expo-router';
import { Pressable, StyleSheet, View } from 'react-native';
import { extraAria } from '../a11y';
import { Text } from '../text';
import { colors, layout, radii, space } from '../theme';
import { NavIcon } from './nav-icon';
import type { Section } from './sections';

interface NavLinkProps {
  section: Section;
  active: boolean;
  variant: 'tab' | 'rail';
}

/** One navigation item: a real link (an <a href> on web) named exactly as the section. */
export function NavLink({ section, active, variant }: NavLinkProps) {
  const color = active ? colors.accent : colors.inkMuted;
  const tab = variant === 'tab';
  return (
    <Link href={section.href as Href} asChild>
      <Pressable
        role="link"
        {...extraAria({ current: active ? 'page' : undefined })}
        testID={`nav-${section.key}`}
        // One flat style object: Link's asChild merges styles by object spread, which breaks arrays
        // and functions of press state.
        style={StyleSheet.flatten([tab ? styles.tab : styles.rail, active && (tab ? styles.tabActive : styles.railActive)])}
      >
        {tab ? <View style={[styles.tabMarker, active && styles.tabMarkerActive]} /> : null}
        <NavIcon name={section.key} color={color} size={tab ? 22 : 20} />
        <Text
          variant={tab ? 'caption' : 'body'}
          bold={active}
          color={active ? colors.accent : colors.ink}
          numberOfLines={1}
          style={tab ? styles.tabLabel : styles.railLabel}
        >
          {section.title}
        </Text>
      </Pressable>
    </Link>
  );
}

const styles = StyleSheet.create({
  tab: {
    flex: 1,
    minHeight: layout.tabBarHeight,
    alignItems: 'center',
    justifyContent: 'center',
    paddingTop: space.xs,
    gap: 2,
  },
  tabActive: {},
  tabMarker: { position: 'absolute', top: 0, left: '25%', right: '25%', height: 3, borderRadius: 2, backgroundColor: 'transparent' },
  tabMarkerActive: { backgroundColor: colors.accent },
  tabLabel: { fontSize: 12 },
  rail: {
    flexDirection: 'row',
    alignItems: 'center',
    gap: space.md,
    minHeight: layout.hitTarget,
    paddingHorizontal: space.md,
    borderRadius: radii.md,
    marginBottom: space.xxs,
  },
  railActive: { backgroundColor: colors.accentSoft },
  railLabel: { flexShrink: 1 },
});
