import React from 'react';
import { StyleSheet, View } from 'react-native';
import type { Fit } from '@/shared/api/calibration';
import { formatDate } from '../format/units';
import { useDeviceFits } from '../queries/fits';
import { colors, fonts, radius, space } from '../theme';
import { Badge } from '../ui/Badge';
import { Card } from '../ui/Card';
import { PressableLink } from '../ui/PressableLink';
import { ErrorState, LoadingState } from '../ui/States';
import { Text } from '../ui/Text';
import { FIT_STATUS, KIND_LABELS, summary } from './format';

function FitRow({ fit, selected, last }: { fit: Fit; selected: boolean; last: boolean }) {
  const st = FIT_STATUS[fit.status];
  const dot = fit.status === 'accepted' ? colors.ok : fit.status === 'proposed' ? colors.pending : fit.status === 'rejected' ? colors.danger : colors.ruleStrong;
  return (
    <PressableLink
      href={`/fits/${fit.id}`}
      testID={`fit-row-v${fit.version}`}
      aria-label={`Fit version ${fit.version}, ${st.label}`}
      aria-current={selected ? 'page' : undefined}
      style={({ hovered }) => [s.row, hovered && { backgroundColor: '#F0ECE2' }, selected && s.rowSelected]}
    >
      {/* The rail: one dot per version, joined by a line, newest on top. */}
      <View style={s.rail}>
        <View style={[s.dot, { backgroundColor: dot }]} />
        {!last ? <View style={s.stem} /> : null}
      </View>
      <View style={{ flex: 1, minWidth: 0, gap: 2, paddingBottom: space.md }}>
        <View style={{ flexDirection: 'row', alignItems: 'center', gap: space.sm, flexWrap: 'wrap' }}>
          <Text style={{ fontFamily: fonts.sansSemiBold }}>v{fit.version}</Text>
          <Badge label={st.label} tone={st.tone} testID={`fit-row-v${fit.version}-status`} />
          <Text variant="monoSmall">{fit.model}</Text>
        </View>
        <Text variant="small" numberOfLines={1}>
          {KIND_LABELS[fit.kind] ?? fit.kind} · {formatDate(fit.createdAt, true)}
        </Text>
        <Text variant="monoSmall" numberOfLines={1}>
          f0 {summary(fit.f0Hz, 1e-9, 'GHz')} · χ²ᵣ {Number(fit.redchi.toPrecision(3))}
        </Text>
        {fit.reviewedBy ? (
          <Text variant="caption" numberOfLines={2}>
            {fit.status === 'rejected' ? 'Rejected' : 'Accepted'} by {fit.reviewedBy.name}
            {fit.reviewComment ? `: “${fit.reviewComment}”` : ''}
          </Text>
        ) : null}
      </View>
    </PressableLink>
  );
}

/** Every fit version of a device, newest first. */
export function FitTimeline({ deviceId, selectedId, title = 'Fit versions' }: { deviceId: number; selectedId?: number; title?: string }) {
  const q = useDeviceFits(deviceId);
  return (
    <Card title={q.data ? `${title} (${q.data.length})` : title} testID="fit-timeline">
      {q.isPending ? (
        <LoadingState label="Loading fits…" />
      ) : q.isError ? (
        <ErrorState error={q.error} onRetry={() => void q.refetch()} />
      ) : q.data.length === 0 ? (
        <Text variant="small" testID="fit-timeline-empty">
          No fit yet. Upload a sweep and its fit appears here as version 1.
        </Text>
      ) : (
        <View>
          {q.data.map((f, i) => (
            <FitRow key={f.id} fit={f} selected={f.id === selectedId} last={i === q.data.length - 1} />
          ))}
        </View>
      )}
    </Card>
  );
}

const s = StyleSheet.create({
  row: { flexDirection: 'row', gap: space.md, paddingTop: space.sm, paddingHorizontal: space.sm, borderRadius: radius.sm },
  rowSelected: { backgroundColor: colors.accentWash },
  rail: { width: 12, alignItems: 'center' },
  dot: { width: 10, height: 10, borderRadius: 5, marginTop: 6 },
  stem: { flex: 1, width: 2, backgroundColor: colors.rule, marginTop: 2, marginBottom: -space.sm },
});
