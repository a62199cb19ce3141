import React from 'react';
import { useLocalSearchParams } from 'expo-router';
import { DeviceCalibration } from '@/client/calibration/DeviceCalibration';
import { DeviceDetail } from '@/client/devices/DeviceDetail';
import { useDevice } from '@/client/queries/devices';
import { Screen } from '@/client/ui/Screen';
import { useIsWide } from '@/client/ui/useLayout';

export default function DeviceScreen() {
  const { id } = useLocalSearchParams<{ id: string }>();
  const wide = useIsWide();
  const deviceId = Number(id);
  // Same query as DeviceDetail (cached): the calibration part waits until the device is known.
  const device = useDevice(deviceId);
  return (
    <Screen testID="device-screen" maxWidth={820}>
      <DeviceDetail id={deviceId} showBack={!wide} />
      {device.isSuccess ? <DeviceCalibration deviceId={deviceId} /> : null}
    </Screen>
  );
}
