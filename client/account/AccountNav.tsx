import React from 'react';
import { StyleSheet, View } from 'react-native';
import { usePathname } from 'expo-router';
import { useSession } from '../session/SessionProvider';
import { colors, fonts, radius, space } from '../theme';
import { PressableLink } from '../ui/PressableLink';
import { Text } from '../ui/Text';
import { useIsWide } from '../ui/useLayout';

type Href = '/account' | '/account/people' | '/account/invitations' | '/account/outbox';

const SECTIONS: { key: string; label: string; href: Href; leadOnly: boolean }[] = [
  { key: 'profile', label: 'Profile & tokens', href: '/account', leadOnly: false },
  { key: 'people', label: 'People', href: '/account/people', leadOnly: true },
  { key: 'invitations', label: 'Invitations', href: '/account/invitations', leadOnly: true },
  { key: 'outbox', label: 'Outbox', href: '/account/outbox', leadOnly: true },
];

/** Sub-navigation of Account; lab-lead sections are not rendered at all for other roles. */
export function AccountNav() {
  const { user } = useSession();
  const pathname = usePathname();
  const wide = useIsWide();
  const lead = user?.role === 'lab_lead';
  if (!lead) return null;
  const items = SECTIONS.filter((s) => !s.leadOnly || lead);
  const list = items.map((s) => {
    const active = pathname === s.href;
    return (
      <PressableLink
        key={s.key}
        href={s.href}
        testID={`account-nav-${s.key}`}
        aria-current={active ? 'page' : undefined}
        style={[wide ? styles.item : styles.chip, active && (wide ? styles.itemOn : styles.chipOn)]}
      >
          <Text style={[styles.text, active && (wide ? { color: colors.ink, fontFamily: fonts.sansSemiBold } : { color: colors.accentInk })]}>
            {s.label}
          </Text>
      </PressableLink>
    );
  });
  if (wide) {
    return (
      <View style={styles.column} testID="account-nav" role="navigation" aria-label="Account sections">
        <Text variant="label" style={{ paddingHorizontal: space.md, marginBottom: space.sm }}>
          Account
        </Text>
        {list}
      </View>
    );
  }
  return (
    <View style={styles.strip} testID="account-nav" role="navigation" aria-label="Account sections">
      {list}
    </View>
  );
}

const styles = StyleSheet.create({
  column: { width: 200, paddingTop: space.xl, paddingHorizontal: space.sm, borderRightWidth: 1, borderRightColor: colors.rule, gap: 2 },
  item: { paddingHorizontal: space.md, height: 36, justifyContent: 'center', borderRadius: radius.sm },
  itemOn: { backgroundColor: colors.accentWash },
  strip: {
    flexDirection: 'row',
    flexWrap: 'wrap',
    gap: space.xs,
    paddingHorizontal: space.lg,
    paddingVertical: space.sm,
    borderBottomWidth: 1,
    borderBottomColor: colors.rule,
    backgroundColor: colors.sheet,
  },
  chip: { paddingHorizontal: space.md, height: 32, justifyContent: 'center', borderRadius: radius.sm, borderWidth: 1, borderColor: colors.ruleStrong },
  chipOn: { backgroundColor: colors.ink, borderColor: colors.ink },
  text: { fontFamily: fonts.sansMedium, fontSize: 14, color: colors.inkSoft },
});
