import React from 'react';
import { ScrollView, View } from 'react-native';
import { Slot, useGlobalSearchParams, usePathname } from 'expo-router';
import { PlansList } from '@/client/planning/PlansList';
import { colors, space } from '@/client/theme';
import { Text } from '@/client/ui/Text';
import { useIsWide } from '@/client/ui/useLayout';

/** Wide screens: the lab's plans on the left, the chosen plan on the right; the planner gets the full width. */
export default function PlansLayout() {
  const wide = useIsWide();
  const pathname = usePathname();
  const { id } = useGlobalSearchParams<{ id?: string }>();
  if (!wide || pathname === '/plans/new') return <Slot />;
  return (
    <View style={{ flex: 1, flexDirection: 'row', minHeight: 0 }} testID="plans-two-pane">
      <ScrollView
        style={{ width: 380, flexGrow: 0, flexShrink: 0, borderRightWidth: 1, borderRightColor: colors.rule }}
        contentContainerStyle={{ padding: space.xl, gap: space.lg }}
        testID="plans-list-pane"
      >
        <Text variant="title" role="heading" aria-level={1}>
          Plans
        </Text>
        <PlansList selectedId={id ? Number(id) : undefined} />
      </ScrollView>
      <View style={{ flex: 1, minWidth: 0 }}>
        <Slot />
      </View>
    </View>
  );
}
