import React from 'react';
import { StyleSheet, View } from 'react-native';
import { usePathname } from 'expo-router';
import { PressableLink } from './PressableLink';
import { useSafeAreaInsets } from 'react-native-safe-area-context';
import { useSession } from '../session/SessionProvider';
import { colors, fonts, space } from '../theme';
import { RoleBadge } from './Badge';
import { Text } from './Text';
import { useIsWide } from './useLayout';

export interface NavItem {
  key: 'devices' | 'plans' | 'batches' | 'account';
  label: string;
  href: '/devices' | '/plans' | '/batches' | '/account';
}

export const NAV_ITEMS: readonly NavItem[] = [
  { key: 'devices', label: 'Devices', href: '/devices' },
  { key: 'plans', label: 'Plans', href: '/plans' },
  { key: 'batches', label: 'Batches', href: '/batches' },
  { key: 'account', label: 'Account', href: '/account' },
];

/** Fit pages belong to a device, so they light up Devices. */
const SECTION_ALIASES: Record<string, string[]> = { '/devices': ['/fits'] };

function isActive(pathname: string, href: string): boolean {
  const roots = [href, ...(SECTION_ALIASES[href] ?? [])];
  return roots.some((r) => pathname === r || pathname.startsWith(r + '/'));
}

/** Small drawn glyphs (no icon font): chip, sweep, stack, person. */
function Glyph({ kind, active }: { kind: NavItem['key']; active: boolean }) {
  const c = active ? colors.accent : colors.inkSoft;
  switch (kind) {
    case 'devices':
      return (
        <View style={[g.box, { borderColor: c }]}>
          <View style={[g.dot, { backgroundColor: c }]} />
        </View>
      );
    case 'plans':
      return (
        <View style={g.frame}>
          <View style={[g.line, { backgroundColor: c, transform: [{ rotate: '-30deg' }] }]} />
          <View style={[g.dot, { backgroundColor: c, position: 'absolute', right: 1, top: 3 }]} />
        </View>
      );
    case 'batches':
      return (
        <View style={[g.frame, { justifyContent: 'space-between', paddingVertical: 3 }]}>
          {[0, 1, 2].map((i) => (
            <View key={i} style={[g.bar, { backgroundColor: c }]} />
          ))}
        </View>
      );
    case 'account':
      return (
        <View style={[g.frame, { alignItems: 'center' }]}>
          <View style={[g.head, { borderColor: c }]} />
          <View style={[g.shoulders, { borderColor: c }]} />
        </View>
      );
  }
}

const g = StyleSheet.create({
  frame: { width: 18, height: 18, justifyContent: 'center' },
  box: { width: 16, height: 16, borderWidth: 1.5, borderRadius: 3, alignItems: 'center', justifyContent: 'center' },
  dot: { width: 5, height: 5, borderRadius: 3 },
  line: { height: 1.5, width: 18 },
  bar: { height: 2, width: 18, borderRadius: 1 },
  head: { width: 8, height: 8, borderRadius: 4, borderWidth: 1.5 },
  shoulders: { width: 14, height: 7, borderTopLeftRadius: 7, borderTopRightRadius: 7, borderWidth: 1.5, borderBottomWidth: 0, marginTop: 1 },
});

function Brand({ compact }: { compact?: boolean }) {
  return (
    <View style={{ flexDirection: 'row', alignItems: 'center', gap: space.sm }}>
      <View style={styles.mark}>
        <View style={styles.markDip} />
      </View>
      <Text style={[styles.brand, compact && { fontSize: 17 }]}>Fluxwright</Text>
    </View>
  );
}

function Rail() {
  const pathname = usePathname();
  const { user } = useSession();
  return (
    <View style={styles.rail} testID="nav-rail" role="navigation" aria-label="Main">
      <View style={{ gap: space.xs, paddingHorizontal: space.lg, paddingTop: space.xl, paddingBottom: space.lg }}>
        <Brand />
        {user ? (
          <Text variant="caption" numberOfLines={2}>
            {user.labName}
          </Text>
        ) : null}
      </View>
      <View style={{ gap: 2, paddingHorizontal: space.sm }}>
        {NAV_ITEMS.map((item) => {
          const active = isActive(pathname, item.href);
          return (
            <PressableLink
              key={item.key}
              href={item.href}
              testID={`nav-${item.key}`}
              aria-current={active ? 'page' : undefined}
              style={({ hovered }) => [
                styles.railItem,
                hovered && !active && { backgroundColor: '#ECE8DE' },
                active && styles.railItemActive,
              ]}
            >
              <Glyph kind={item.key} active={active} />
              <Text style={[styles.railLabel, active && { color: colors.ink, fontFamily: fonts.sansSemiBold }]}>{item.label}</Text>
            </PressableLink>
          );
        })}
      </View>
      <View style={{ flex: 1 }} />
      {user ? (
        <View style={styles.railUser} testID="shell-user">
          <Text variant="small" style={{ color: colors.ink }} numberOfLines={1}>
            {user.name}
          </Text>
          <RoleBadge role={user.role} testID="shell-role" />
        </View>
      ) : null}
    </View>
  );
}

function TopBar() {
  const { user } = useSession();
  return (
    <View style={styles.topBar} testID="top-bar">
      <Brand compact />
      {user ? (
        <View testID="shell-user" style={{ flexShrink: 1, alignItems: 'flex-end' }}>
          <RoleBadge role={user.role} testID="shell-role" />
        </View>
      ) : null}
    </View>
  );
}

function TabBar() {
  const pathname = usePathname();
  const insets = useSafeAreaInsets();
  return (
    <View style={[styles.tabBar, { paddingBottom: Math.max(insets.bottom, 4) }]} testID="tab-bar" role="navigation" aria-label="Main">
      {NAV_ITEMS.map((item) => {
        const active = isActive(pathname, item.href);
        return (
          <PressableLink key={item.key} href={item.href} testID={`nav-${item.key}`} aria-current={active ? 'page' : undefined} style={styles.tab}>
            <View style={[styles.tabIndicator, active && { backgroundColor: colors.accent }]} />
            <Glyph kind={item.key} active={active} />
            <Text style={[styles.tabLabel, active && { color: colors.ink, fontFamily: fonts.sansSemiBold }]}>{item.label}</Text>
          </PressableLink>
        );
      })}
    </View>
  );
}

/** Signed-in frame: left rail ≥ 768 px, otherwise a top bar and a bottom tab bar. */
export function AppShell({ children }: { children: React.ReactNode }) {
  const wide = useIsWide();
  if (wide) {
    return (
      <View style={styles.wideRoot}>
        <Rail />
        <View style={styles.main} role="main">
          {children}
        </View>
      </View>
    );
  }
  return (
    <View style={styles.phoneRoot}>
      <TopBar />
      <View style={styles.main} role="main">
        {children}
      </View>
      <TabBar />
    </View>
  );
}

const styles = StyleSheet.create({
  wideRoot: { flex: 1, flexDirection: 'row', backgroundColor: colors.paper, minHeight: 0 },
  phoneRoot: { flex: 1, backgroundColor: colors.paper, minHeight: 0 },
  main: { flex: 1, minWidth: 0, minHeight: 0 },
  rail: { width: 224, borderRightWidth: 1, borderRightColor: colors.rule, backgroundColor: colors.sheet },
  railItem: { flexDirection: 'row', alignItems: 'center', gap: space.md, paddingHorizontal: space.md, height: 40, borderRadius: 6 },
  railItemActive: { backgroundColor: colors.accentWash },
  railLabel: { fontFamily: fonts.sansMedium, fontSize: 15, color: colors.inkSoft },
  railUser: { padding: space.lg, gap: space.xs, borderTopWidth: 1, borderTopColor: colors.rule },
  topBar: {
    height: 52,
    flexDirection: 'row',
    alignItems: 'center',
    justifyContent: 'space-between',
    paddingHorizontal: space.lg,
    borderBottomWidth: 1,
    borderBottomColor: colors.rule,
    backgroundColor: colors.sheet,
  },
  tabBar: { flexDirection: 'row', borderTopWidth: 1, borderTopColor: colors.rule, backgroundColor: colors.sheet },
  tab: { flex: 1, alignItems: 'center', paddingTop: 0, paddingBottom: 6, gap: 3, minHeight: 56 },
  tabIndicator: { height: 2, alignSelf: 'stretch', marginHorizontal: space.lg, marginBottom: 6, backgroundColor: 'transparent' },
  tabLabel: { fontFamily: fonts.sansMedium, fontSize: 12, color: colors.inkSoft },
  brand: { fontFamily: fonts.sansSemiBold, fontSize: 19, letterSpacing: -0.3, color: colors.ink },
  mark: { width: 22, height: 22, borderRadius: 5, backgroundColor: colors.ink, alignItems: 'center', justifyContent: 'center' },
  markDip: { width: 12, height: 6, borderBottomLeftRadius: 6, borderBottomRightRadius: 6, borderWidth: 2, borderTopWidth: 0, borderColor: colors.accent },
});
