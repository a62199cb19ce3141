import React from 'react';
import { View } from 'react-native';
import { canEditInventory, useSession } from '../session/SessionProvider';
import { space } from '../theme';
import { ActiveCalibrationCard } from './ActiveCalibrationCard';
import { FitTimeline } from './FitTimeline';
import { UploadPanel } from './UploadPanel';

/** Calibration part of the device screen: the active fit, the upload panel, the version history. */
export function DeviceCalibration({ deviceId }: { deviceId: number }) {
  const { user } = useSession();
  if (!Number.isInteger(deviceId) || deviceId <= 0) return null;
  return (
    <View style={{ gap: space.lg }} testID="device-calibration">
      <ActiveCalibrationCard deviceId={deviceId} />
      {/* Uploading stores data and starts fits: the same roles that edit the inventory. */}
      {canEditInventory(user?.role) ? <UploadPanel deviceId={deviceId} /> : null}
      <FitTimeline deviceId={deviceId} />
    </View>
  );
}
