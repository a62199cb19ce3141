import React from 'react';
import { StyleSheet, View } from 'react-native';
import { formatDate } from '../format/units';
import { usePlans } from '../queries/plans';
import { colors, fonts, radius, space } from '../theme';
import { Badge } from '../ui/Badge';
import { PressableLink } from '../ui/PressableLink';
import { EmptyState, ErrorState, LoadingState } from '../ui/States';
import { Text } from '../ui/Text';
import { dbm, rate, sci } from './format';
import type { PlanSummary } from './types';

function target(p: PlanSummary): string {
  if (p.targetGainDb !== null) return `${p.targetGainDb} dB gain`;
  if (p.targetPairRate !== null) return `${sci(p.targetPairRate)} pairs/s`;
  return '—';
}

function PlanRow({ p, selected, showDevice }: { p: PlanSummary; selected: boolean; showDevice: boolean }) {
  return (
    <PressableLink
      href={`/plans/${p.id}`}
      testID={`plan-row-${p.id}`}
      aria-label={`Plan ${p.id} for ${p.deviceName}`}
      aria-current={selected ? 'page' : undefined}
      style={({ hovered }) => [styles.row, hovered && !selected && { borderColor: colors.ruleStrong }, selected && styles.rowOn]}
    >
      <View style={styles.rowHead}>
        <Text style={styles.name}>{showDevice ? p.deviceName : `Plan #${p.id}`}</Text>
        <Text variant="monoSmall">{p.mode}</Text>
        <View style={{ flex: 1 }} />
        {p.stale ? <Badge label={`stale · v${p.fitVersion} → v${p.activeFitVersion ?? '—'}`} tone="pending" testID={`plan-row-${p.id}-stale`} /> : <Badge label={`cal v${p.fitVersion}`} tone="ok" />}
      </View>
      <Text variant="mono">
        {target(p)} → {rate(p.predictedPairRate)}
      </Text>
      <Text variant="monoSmall">
        δΦ {sci(p.pumpAmplitudePhi0)} Φ0{p.generatorPowerDbm !== null ? ` · ${dbm(p.generatorPowerDbm)}` : ''}
        {p.warningCodes.length ? ` · ${p.warningCodes.length} warning${p.warningCodes.length === 1 ? '' : 's'}` : ''}
        {p.noteCount ? ` · ${p.noteCount} note${p.noteCount === 1 ? '' : 's'}` : ''}
      </Text>
      <Text variant="caption">
        {showDevice ? `#${p.id} · ` : ''}
        {p.authorName} · {formatDate(p.createdAt, true)}
        {p.replannedFromId ? ` · re-plan of #${p.replannedFromId}` : ''}
      </Text>
    </PressableLink>
  );
}

/** Saved plans, newest first: the lab's (Plans tab) or one device's (device screen). */
export function PlansList({ deviceId, selectedId, limit }: { deviceId?: number; selectedId?: number; limit?: number }) {
  const q = usePlans(deviceId);
  if (q.isPending) return <LoadingState label="Loading plans…" />;
  if (q.isError) return <ErrorState error={q.error} onRetry={() => void q.refetch()} />;
  if (q.data.length === 0) {
    return (
      <View testID="plans-empty">
        <EmptyState
          title="No saved plans yet"
          body={deviceId ? 'Plans saved for this device appear here.' : 'Open a calibrated device and press Plan a drive; saved plans appear here, newest first.'}
        />
      </View>
    );
  }
  const rows = limit ? q.data.slice(0, limit) : q.data;
  return (
    <View style={{ gap: space.sm }} testID="plans-list">
      {rows.map((p) => (
        <PlanRow key={p.id} p={p} selected={p.id === selectedId} showDevice={deviceId === undefined} />
      ))}
      {limit && q.data.length > limit ? <Text variant="caption">{q.data.length - limit} older plans under Plans.</Text> : null}
    </View>
  );
}

const styles = StyleSheet.create({
  row: { borderWidth: 1, borderColor: colors.rule, borderRadius: radius.md, backgroundColor: colors.sheet, padding: space.md, gap: 2 },
  rowOn: { borderColor: colors.accent, backgroundColor: colors.accentWash },
  rowHead: { flexDirection: 'row', alignItems: 'center', gap: space.sm, flexWrap: 'wrap' },
  name: { fontFamily: fonts.sansSemiBold },
});
