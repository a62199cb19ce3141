import React from 'react';
import { View } from 'react-native';
import { useDevice } from '../queries/devices';
import { useSession } from '../session/SessionProvider';
import { Card } from '../ui/Card';
import { PressableLink } from '../ui/PressableLink';
import { Text } from '../ui/Text';
import { colors, fonts, radius, space } from '../theme';
import { canPlan } from './PlannerView';
import { PlansList } from './PlansList';
import { PumpLineCard } from './PumpLineCard';

/** "Plan a drive" beside the device's name, for the roles that plan, once a calibration is accepted. */
export function PlanDriveButton({ deviceId }: { deviceId: number }) {
  const { user } = useSession();
  const device = useDevice(deviceId); // the device screen's own query (cached)
  if (!canPlan(user?.role) || device.data?.device.calibrationStatus !== 'accepted') return null;
  return (
    <PressableLink
      href={`/plans/new?device=${deviceId}`}
      testID="plan-a-drive"
      aria-label="Plan a drive"
      style={({ hovered }) => ({
        alignSelf: 'flex-start',
        marginTop: space.sm,
        backgroundColor: hovered ? '#2C3747' : colors.ink,
        borderRadius: radius.sm,
        paddingHorizontal: space.lg,
        minHeight: 40,
        justifyContent: 'center',
      })}
    >
      <Text style={{ color: colors.accentInk, fontFamily: fonts.sansMedium }}>Plan a drive</Text>
    </PressableLink>
  );
}

/** Device screen: the device's latest plans and its pump line. */
export function DevicePlanningCard({ deviceId }: { deviceId: number }) {
  const { user } = useSession();
  const device = useDevice(deviceId);
  if (!Number.isInteger(deviceId) || deviceId <= 0 || !device.data) return null;
  const ready = device.data.device.calibrationStatus === 'accepted';
  return (
    <View style={{ gap: space.lg }} testID="device-planning">
      <Card title="Drive plans" testID="device-plans-card">
        {canPlan(user?.role) && !ready ? (
          <Text variant="small" testID="plan-needs-calibration">
            Planning needs an accepted calibration.
          </Text>
        ) : null}
        <PlansList deviceId={deviceId} limit={5} />
      </Card>
      <PumpLineCard deviceId={deviceId} />
    </View>
  );
}
