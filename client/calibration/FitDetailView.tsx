import React from 'react';
import { View } from 'react-native';
import { Link } from 'expo-router';
import { ApiError } from '../api/http';
import { formatDate } from '../format/units';
import { useFit } from '../queries/fits';
import { colors, space } from '../theme';
import { Badge } from '../ui/Badge';
import { EmptyState, ErrorState, LoadingState } from '../ui/States';
import { Text } from '../ui/Text';
import { ResidualsCard, TraceQCard, TuningCurveCard } from './FitCharts';
import { CorrelationMatrix, GoodnessCard, ParamTable, WarningsCard } from './FitTables';
import { FIT_STATUS, KIND_LABELS, MODEL_LABELS } from './format';
import { RawTraceCard } from './RawTraceCard';
import { ExportCard, ReviewCard } from './ReviewAndExport';

export function FitDetailView({ id, wide }: { id: number; wide: boolean }) {
  const q = useFit(id);
  if (!Number.isInteger(id) || id <= 0) return <EmptyState title="No such fit" body="The address does not name a fit." />;
  if (q.isPending) return <LoadingState label="Loading the fit…" />;
  if (q.isError) {
    if (q.error instanceof ApiError && q.error.status === 404) return <EmptyState title="No such fit" body="It may belong to another lab." />;
    return <ErrorState error={q.error} onRetry={() => void q.refetch()} />;
  }
  const fit = q.data;
  const cal = fit.calibration;
  const st = FIT_STATUS[fit.status];
  return (
    <View style={{ gap: space.lg }} testID="fit-detail">
      <Link href={`/devices/${fit.deviceId}`} testID="back-to-device">
        <Text variant="small" style={{ color: colors.accent }}>
          ‹ {fit.deviceName}
        </Text>
      </Link>
      <View style={{ gap: space.xs }}>
        <Text variant="title" role="heading" aria-level={1} testID="fit-title">
          {fit.deviceName} · fit v{fit.version}
        </Text>
        <View style={{ flexDirection: 'row', gap: space.sm, alignItems: 'center', flexWrap: 'wrap' }}>
          <Badge label={st.label} tone={st.tone} testID={`fit-status-${fit.status}`} />
          <Text variant="small">
            {KIND_LABELS[fit.kind] ?? fit.kind} · {MODEL_LABELS[fit.model] ?? fit.model} · {formatDate(fit.createdAt, true)}
            {fit.createdBy ? ` · ${fit.createdBy.name}` : ''}
          </Text>
        </View>
      </View>
      <TuningCurveCard cal={cal} wide={wide} />
      <ResidualsCard cal={cal} wide={wide} />
      <ParamTable cal={cal} />
      <GoodnessCard cal={cal} />
      <WarningsCard warnings={cal.warnings} />
      {/* Review after the evidence: curve, residuals, parameters, goodness, warnings. */}
      <ReviewCard fit={fit} />
      {cal.traces && cal.traces.length ? <TraceQCard cal={cal} wide={wide} /> : null}
      {cal.traces && cal.traces.length ? <RawTraceCard fitId={fit.id} traces={cal.traces} biasUnit={cal.bias_unit} wide={wide} /> : null}
      <CorrelationMatrix cal={cal} />
      <ExportCard fit={fit} />
    </View>
  );
}
