import React from 'react';
import { ScrollView, View } from 'react-native';
import { Slot, useGlobalSearchParams } from 'expo-router';
import { DeviceList } from '@/client/devices/DeviceList';
import { DeviceFiltersProvider } from '@/client/devices/filters';
import { colors, space } from '@/client/theme';
import { Text } from '@/client/ui/Text';
import { useIsWide } from '@/client/ui/useLayout';

export default function DevicesLayout() {
  const wide = useIsWide();
  const { batch, id } = useGlobalSearchParams<{ batch?: string; id?: string }>();
  return (
    <DeviceFiltersProvider batchParam={batch}>
      {wide ? (
        // Two panes: the list stays put while the detail on the right changes.
        <View style={{ flex: 1, flexDirection: 'row', minHeight: 0 }} testID="devices-two-pane">
          <ScrollView
            style={{ width: 380, flexGrow: 0, flexShrink: 0, borderRightWidth: 1, borderRightColor: colors.rule }}
            contentContainerStyle={{ padding: space.xl, gap: space.lg }}
            testID="devices-list-pane"
          >
            <Text variant="title" role="heading" aria-level={1}>
              Devices
            </Text>
            <DeviceList selectedId={id ? Number(id) : undefined} />
          </ScrollView>
          <View style={{ flex: 1, minWidth: 0 }}>
            <Slot />
          </View>
        </View>
      ) : (
        <Slot />
      )}
    </DeviceFiltersProvider>
  );
}
