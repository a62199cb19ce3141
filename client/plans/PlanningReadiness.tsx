import React from 'react';
import { StyleSheet, View } from 'react-native';
import type { CalibrationStatus, Device } from '../api/types';
import { formatFrequency } from '../format/units';
import { useDevices } from '../queries/devices';
import { colors, fonts, radius, space } from '../theme';
import { CalibrationBadge } from '../ui/Badge';
import { Card } from '../ui/Card';
import { PressableLink } from '../ui/PressableLink';
import { EmptyState, ErrorState, LoadingState, Notice } from '../ui/States';
import { Text } from '../ui/Text';

const GROUPS: { status: CalibrationStatus; title: string; note: string }[] = [
  { status: 'accepted', title: 'Ready for planning', note: 'Accepted calibration on file.' },
  { status: 'proposed', title: 'Calibration awaiting review', note: 'A fit exists but nobody has accepted it yet.' },
  { status: 'none', title: 'Needs a calibration', note: 'No flux sweep has been fitted for these devices.' },
];

function DeviceLine({ d }: { d: Device }) {
  return (
    <PressableLink href={`/devices/${d.id}`} style={styles.line} testID={`plan-device-${d.name}`} aria-label={`Device ${d.name}`}>
      <Text style={styles.name}>{d.name}</Text>
      <Text variant="monoSmall">{d.batchCode}</Text>
      <View style={{ flex: 1 }} />
      <Text variant="mono">{formatFrequency(d.designFrequencyHz)}</Text>
      <CalibrationBadge status={d.calibrationStatus} />
    </PressableLink>
  );
}

/**
 * Placeholder until calibrations land: shows which devices could be planned for, from live data.
 * The planner needs an accepted calibration (f0, γ0, asymmetry, flux period/offset, Q) per device.
 */
export function PlanningReadiness() {
  const devices = useDevices({});
  return (
    <View style={{ gap: space.lg }}>
      <Notice testID="plans-coming">
        Drive planning arrives with calibrations: once a device has an accepted calibration, this screen will suggest flux
        bias, pump frequency and amplitude, and generator power for a chosen photon-pair rate, kept below the parametric
        oscillation threshold.
      </Notice>
      {devices.isPending ? (
        <LoadingState label="Checking which devices are calibrated…" />
      ) : devices.isError ? (
        <ErrorState error={devices.error} onRetry={() => void devices.refetch()} />
      ) : devices.data.length === 0 ? (
        <EmptyState title="No devices yet" body="Register a device under Devices; calibrate it; then plan its drive here." />
      ) : (
        <>
          <View style={styles.tally} testID="plans-tally">
            {GROUPS.map((g) => (
              <View key={g.status} style={styles.tallyCell}>
                <Text style={styles.tallyNumber}>{devices.data.filter((d) => d.calibrationStatus === g.status).length}</Text>
                <Text variant="caption">{g.title}</Text>
              </View>
            ))}
          </View>
          {GROUPS.map((g) => {
            const list = devices.data.filter((d) => d.calibrationStatus === g.status);
            if (list.length === 0) return null;
            return (
              <Card key={g.status} title={`${g.title} (${list.length})`} testID={`plans-group-${g.status}`}>
                <Text variant="small">{g.note}</Text>
                <View>
                  {list.map((d) => (
                    <DeviceLine key={d.id} d={d} />
                  ))}
                </View>
              </Card>
            );
          })}
        </>
      )}
    </View>
  );
}

const styles = StyleSheet.create({
  tally: { flexDirection: 'row', gap: space.sm, flexWrap: 'wrap' },
  tallyCell: {
    flexGrow: 1,
    flexBasis: 100,
    padding: space.md,
    borderWidth: 1,
    borderColor: colors.rule,
    borderRadius: radius.md,
    backgroundColor: colors.sheet,
    gap: 2,
  },
  tallyNumber: { fontFamily: fonts.monoMedium, fontSize: 24, lineHeight: 30 },
  line: {
    flexDirection: 'row',
    alignItems: 'center',
    flexWrap: 'wrap',
    gap: space.sm,
    paddingVertical: space.sm,
    borderTopWidth: 1,
    borderTopColor: colors.rule,
  },
  name: { fontFamily: fonts.sansSemiBold },
});
