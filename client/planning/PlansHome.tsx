import React from 'react';
import { StyleSheet, View } from 'react-native';
import { formatFrequency } from '../format/units';
import { useDevices } from '../queries/devices';
import { useSession } from '../session/SessionProvider';
import { colors, fonts, radius, space } from '../theme';
import { CalibrationBadge } from '../ui/Badge';
import { Card } from '../ui/Card';
import { PressableLink } from '../ui/PressableLink';
import { ErrorState, LoadingState } from '../ui/States';
import { Text } from '../ui/Text';
import { canPlan } from './PlannerView';
import { PlansList } from './PlansList';

/** Which devices can be planned for (accepted calibration), as counts and links into the planner. */
function Readiness() {
  const devices = useDevices({});
  const { user } = useSession();
  if (devices.isPending) return <LoadingState label="Checking which devices are calibrated…" />;
  if (devices.isError) return <ErrorState error={devices.error} onRetry={() => void devices.refetch()} />;
  const ready = devices.data.filter((d) => d.calibrationStatus === 'accepted');
  const counts = [
    { label: 'Ready for planning', n: ready.length },
    { label: 'Calibration awaiting review', n: devices.data.filter((d) => d.calibrationStatus === 'proposed').length },
    { label: 'Needs a calibration', n: devices.data.filter((d) => d.calibrationStatus === 'none').length },
  ];
  const planner = canPlan(user?.role);
  return (
    <View style={{ gap: space.lg }}>
      <View style={styles.tally} testID="plans-tally">
        {counts.map((c) => (
          <View key={c.label} style={styles.tallyCell}>
            <Text style={styles.tallyNumber}>{c.n}</Text>
            <Text variant="caption">{c.label}</Text>
          </View>
        ))}
      </View>
      {ready.length > 0 ? (
        <Card title={planner ? 'Plan a drive for' : 'Calibrated devices'} testID="plans-ready">
          {ready.map((d) => (
            <PressableLink
              key={d.id}
              href={planner ? `/plans/new?device=${d.id}` : `/devices/${d.id}`}
              style={({ hovered }) => [styles.line, hovered && { backgroundColor: '#F1EDE3' }]}
              testID={`plan-device-${d.name}`}
              aria-label={planner ? `Plan a drive for ${d.name}` : `Device ${d.name}`}
            >
              <Text style={{ fontFamily: fonts.sansSemiBold }}>{d.name}</Text>
              <Text variant="monoSmall">{d.batchCode}</Text>
              <View style={{ flex: 1 }} />
              <Text variant="mono">{formatFrequency(d.designFrequencyHz)}</Text>
              <CalibrationBadge status={d.calibrationStatus} />
              {planner ? <Text style={{ color: colors.accent, fontFamily: fonts.sansMedium }}>Plan ›</Text> : null}
            </PressableLink>
          ))}
        </Card>
      ) : null}
    </View>
  );
}

export function PlansHome({ wide }: { wide: boolean }) {
  return (
    <View style={{ gap: space.lg }} testID="plans-home">
      {wide ? <Text variant="small">Choose a plan on the left to open its sheet, or plan a new drive for a calibrated device.</Text> : null}
      {wide ? null : (
        <Card title="Saved plans" testID="plans-saved-card">
          <PlansList />
        </Card>
      )}
      <Readiness />
    </View>
  );
}

const styles = StyleSheet.create({
  tally: { flexDirection: 'row', gap: space.sm, flexWrap: 'wrap' },
  tallyCell: { flexGrow: 1, flexBasis: 100, padding: space.md, borderWidth: 1, borderColor: colors.rule, borderRadius: radius.md, backgroundColor: colors.sheet, gap: 2 },
  tallyNumber: { fontFamily: fonts.monoMedium, fontSize: 24, lineHeight: 30 },
  line: { flexDirection: 'row', alignItems: 'center', flexWrap: 'wrap', gap: space.sm, paddingVertical: space.sm, paddingHorizontal: space.xs, borderTopWidth: 1, borderTopColor: colors.rule },
});
