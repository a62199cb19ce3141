import React from 'react';
import { DeviceList } from '@/client/devices/DeviceList';
import { Screen } from '@/client/ui/Screen';
import { EmptyState } from '@/client/ui/States';
import { useIsWide } from '@/client/ui/useLayout';

export default function DevicesIndex() {
  const wide = useIsWide();
  if (wide) {
    return (
      <Screen testID="devices-screen">
        <EmptyState title="Choose a device" body="Its design values, calibration state and cooldowns open here." />
      </Screen>
    );
  }
  return (
    <Screen title="Devices" testID="devices-screen">
      <DeviceList />
    </Screen>
  );
}
