import React from 'react';
import { ScrollView, View } from 'react-native';
import { Slot, useGlobalSearchParams } from 'expo-router';
import { FitTimeline } from '@/client/calibration/FitTimeline';
import { useFit } from '@/client/queries/fits';
import { colors, space } from '@/client/theme';
import { Text } from '@/client/ui/Text';
import { useIsWide } from '@/client/ui/useLayout';

/** Wide screens: the device's fit versions on the left, the chosen fit on the right. */
function VersionsPane({ fitId }: { fitId: number }) {
  const fit = useFit(fitId); // same query as the detail pane (cached)
  return (
    <ScrollView
      style={{ width: 340, flexGrow: 0, flexShrink: 0, borderRightWidth: 1, borderRightColor: colors.rule }}
      contentContainerStyle={{ padding: space.xl, gap: space.lg }}
      testID="fits-list-pane"
    >
      <Text variant="title" role="heading" aria-level={2}>
        {fit.data ? fit.data.deviceName : 'Fits'}
      </Text>
      {fit.data ? <FitTimeline deviceId={fit.data.deviceId} selectedId={fitId} /> : null}
    </ScrollView>
  );
}

export default function FitsLayout() {
  const wide = useIsWide();
  const { id } = useGlobalSearchParams<{ id?: string }>();
  if (!wide) return <Slot />;
  return (
    <View style={{ flex: 1, flexDirection: 'row', minHeight: 0 }} testID="fits-two-pane">
      <VersionsPane fitId={Number(id)} />
      <View style={{ flex: 1, minWidth: 0 }}>
        <Slot />
      </View>
    </View>
  );
}
