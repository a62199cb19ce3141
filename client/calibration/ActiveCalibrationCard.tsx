import React from 'react';
import { View } from 'react-native';
import type { Fit } from '@/shared/api/calibration';
import { formatDate } from '../format/units';
import { useDeviceFits } from '../queries/fits';
import { colors, space } from '../theme';
import { Card, Field, Rule } from '../ui/Card';
import { PressableLink } from '../ui/PressableLink';
import { ErrorState, LoadingState } from '../ui/States';
import { Text } from '../ui/Text';
import { MODEL_LABELS, summary } from './format';

function Summary({ fit }: { fit: Fit }) {
  const u = fit.biasUnit;
  return (
    <View style={{ gap: space.sm }} testID="active-calibration">
      <View style={{ flexDirection: 'row', justifyContent: 'space-between', alignItems: 'baseline', flexWrap: 'wrap', gap: space.sm }}>
        <Text variant="heading" testID="active-calibration-version">
          Version {fit.version}
        </Text>
        <PressableLink href={`/fits/${fit.id}`} testID="active-calibration-open">
          <Text variant="small" style={{ color: colors.accent }}>
            Open ›
          </Text>
        </PressableLink>
      </View>
      <Text variant="small">
        {MODEL_LABELS[fit.model] ?? fit.model} · accepted {formatDate(fit.reviewedAt)} by {fit.reviewedBy?.name ?? '—'}
      </Text>
      <Rule />
      <Field label="f0" value={summary(fit.f0Hz, 1e-9, 'GHz')} mono testID="active-f0" />
      <Field label="γ0" value={summary(fit.gamma0)} mono testID="active-gamma0" />
      <Field label="d" value={summary(fit.asymmetry)} mono />
      <Field label="Flux period" value={summary(fit.fluxPeriod, 1, u)} mono />
      <Field label="Flux offset" value={summary(fit.fluxOffset, 1, u)} mono />
    </View>
  );
}

/** The device's accepted fit (the one the planner uses), or a line saying there is none. */
export function ActiveCalibrationCard({ deviceId }: { deviceId: number }) {
  const q = useDeviceFits(deviceId);
  const active = q.data?.find((f) => f.status === 'accepted');
  const proposed = q.data?.filter((f) => f.status === 'proposed').length ?? 0;
  return (
    <Card title="Active calibration" testID="active-calibration-card">
      {q.isPending ? (
        <LoadingState label="Loading calibration…" />
      ) : q.isError ? (
        <ErrorState error={q.error} onRetry={() => void q.refetch()} />
      ) : active ? (
        <Summary fit={active} />
      ) : (
        <Text variant="small" testID="active-calibration-none">
          No accepted calibration yet.{proposed ? ` ${proposed} proposed ${proposed === 1 ? 'fit waits' : 'fits wait'} for review.` : ''}
        </Text>
      )}
    </Card>
  );
}
