import React from 'react';
import { useLocalSearchParams } from 'expo-router';
import { DeviceCalibration } from '@/client/calibration/DeviceCalibration';
import { DeviceDetail } from '@/client/devices/DeviceDetail';
import { DevicePlanningCard, PlanDriveButton } from '@/client/planning/DevicePlanningCard';
import { Screen } from '@/client/ui/Screen';
import { useIsWide } from '@/client/ui/useLayout';

export default function DeviceScreen() {
  const { id } = useLocalSearchParams<{ id: string }>();
  const wide = useIsWide();
  const deviceId = Number(id);
  return (
    <Screen testID="device-screen" maxWidth={820}>
      <DeviceDetail
        id={deviceId}
        showBack={!wide}
        actions={<PlanDriveButton deviceId={deviceId} />}
        calibration={
          <>
            <DeviceCalibration deviceId={deviceId} />
            <DevicePlanningCard deviceId={deviceId} />
          </>
        }
      />
    </Screen>
  );
}
