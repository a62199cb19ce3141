import React, { useState } from 'react';
import { Platform, View } from 'react-native';
import { useRouter } from 'expo-router';
import { ApiError, errorMessage } from '../api/http';
import { formatDate } from '../format/units';
import { planExportUrl, useAddPlanNote, usePlan, useReplan } from '../queries/plans';
import { useSession } from '../session/SessionProvider';
import { colors, fonts, space } from '../theme';
import { Badge } from '../ui/Badge';
import { Button } from '../ui/Button';
import { Card, Field } from '../ui/Card';
import { PressableLink } from '../ui/PressableLink';
import { EmptyState, ErrorState, LoadingState, Notice } from '../ui/States';
import { Text } from '../ui/Text';
import { TextField } from '../ui/TextField';
import { useIsWide } from '../ui/useLayout';
import { downloadWithToken } from '../api/download';
import { dbm, fixed, hz, sci, watts } from './format';
import { SpectrumChart } from './PlanCharts';
import { canPlan } from './PlannerView';
import { PrintStyle } from './PrintStyle';
import { ResultsCard } from './ResultsCard';
import type { Plan, PlanRequest } from './types';
import { WarningsList } from './WarningsList';

function InputsCard({ plan }: { plan: Plan }) {
  const r: PlanRequest = plan.request;
  const filled = new Set(plan.filledFromPumpLine ?? []);
  const from = (k: string) => (filled.has(k) ? ' (pump line)' : '');
  return (
    <Card title="Inputs" testID="plan-inputs">
      <Field label="Mode" value={r.mode} mono />
      {r.targetPairRate !== undefined ? <Field label="Target pair rate" value={`${sci(r.targetPairRate)} pairs/s`} mono testID="plan-input-target" /> : null}
      {r.targetGainDb !== undefined ? <Field label="Target gain" value={`${r.targetGainDb} dB`} mono testID="plan-input-target" /> : null}
      {r.bias !== undefined ? <Field label="Bias" value={String(r.bias)} mono testID="plan-input-bias" /> : null}
      {r.fluxPhi0 !== undefined ? <Field label="Flux" value={`${r.fluxPhi0} Φ0`} mono /> : null}
      <Field label="Q_l · Q_c" value={r.ql !== undefined || r.qc !== undefined ? `${r.ql ?? 'calibration'} · ${r.qc ?? 'calibration'}` : 'from the calibration'} mono />
      <Field label="Temperature" value={r.temperatureK !== undefined ? `${fixed(r.temperatureK * 1e3, 4)} mK` : '0 K (vacuum input)'} mono />
      <Field label="Band" value={r.bandHz !== undefined ? hz(r.bandHz, 4) : r.mode === 'cavity' ? 'whole output' : 'B = f_p'} mono />
      <Field label="Pump frequency" value={r.pumpFrequencyHz !== undefined ? hz(r.pumpFrequencyHz, 7) : 'chosen (2 × f_r)'} mono />
      {r.pumpPeriod !== undefined ? <Field label="Pump dc period" value={`${fixed(r.pumpPeriod * 1e3, 5)} mA/Φ0${from('pumpPeriod')}`} mono /> : null}
      {r.thresholdPowerDbm !== undefined ? <Field label="Threshold power" value={`${dbm(r.thresholdPowerDbm)}${from('thresholdPowerDbm')}`} mono /> : null}
      {r.attenuationDb?.length ? (
        <Field label="Attenuation" value={`${r.attenuationDb.map((a, i) => `${a} dB${r.stageNames?.[i] ? ` ${r.stageNames[i]}` : ''}`).join(' → ')}${from('attenuationDb')}`} mono />
      ) : null}
      {r.coldStageLimitW !== undefined ? <Field label="Cold-stage limit" value={`${watts(r.coldStageLimitW)}${from('coldStageLimitW')}`} mono /> : null}
      <Field label="Uncertainty" value={`${r.uncertaintyDraws ?? 1000} draws, seed ${r.seed ?? 12345}`} mono />
      <Field label="Calibration" value={`fit #${plan.fitId}, version ${plan.fitVersion}`} mono testID="plan-input-fit" />
      <Field label="Core" value={plan.coreVersion ?? '—'} mono />
    </Card>
  );
}

function NotesCard({ plan }: { plan: Plan }) {
  const { user } = useSession();
  const add = useAddPlanNote(plan.id);
  const [text, setText] = useState('');
  const mayAnnotate = !!user && (user.role === 'lab_lead' || user.id === plan.authorId);
  return (
    <Card title={`Notes (${plan.notes.length})`} testID="plan-notes">
      {plan.notes.length === 0 ? <Text variant="small">No notes.</Text> : null}
      {plan.notes.map((n) => (
        <View key={n.id} style={{ gap: 2 }} testID={`plan-note-${n.id}`}>
          <Text variant="caption">
            {n.authorName} · {formatDate(n.createdAt, true)}
          </Text>
          <Text>{n.text}</Text>
        </View>
      ))}
      {mayAnnotate ? (
        <View style={{ gap: space.sm }} data-print="hide" testID="plan-note-form-noprint">
          <TextField label="Add a note" value={text} onChangeText={setText} multiline testID="plan-note-text" placeholder="What happened when you ran it" />
          {add.isError ? <Notice tone="error">{errorMessage(add.error)}</Notice> : null}
          <View style={{ alignSelf: 'flex-start' }}>
            <Button small label="Add note" testID="plan-note-add" busy={add.isPending} disabled={!text.trim()} onPress={() => add.mutate(text.trim(), { onSuccess: () => setText('') })} />
          </View>
        </View>
      ) : (
        <Text variant="caption">Only the plan&apos;s author and the lab lead add notes.</Text>
      )}
    </Card>
  );
}

function StaleBanner({ plan }: { plan: Plan }) {
  const { user } = useSession();
  const router = useRouter();
  const replan = useReplan(plan.id);
  return (
    <View style={{ gap: space.sm, padding: space.md, borderRadius: 8, backgroundColor: colors.pendingWash }} testID="plan-stale" role="alert">
      <Text style={{ fontFamily: fonts.sansSemiBold, color: colors.pending }}>
        {plan.activeFitVersion !== null
          ? `Made on calibration v${plan.fitVersion}; the device now has v${plan.activeFitVersion}.`
          : `Made on calibration v${plan.fitVersion}; the device has no accepted calibration now.`}
      </Text>
      <Text variant="small">The figures below are those of the old calibration. A re-plan keeps every input and computes on the current one.</Text>
      {replan.isError ? <Notice tone="error">{errorMessage(replan.error)}</Notice> : null}
      {canPlan(user?.role) && plan.activeFitVersion !== null ? (
        <View style={{ alignSelf: 'flex-start' }}>
          <Button
            label={`Re-plan on v${plan.activeFitVersion}`}
            testID="plan-replan"
            busy={replan.isPending}
            onPress={() => replan.mutate(undefined, { onSuccess: (p) => router.push(`/plans/${p.id}`) })}
          />
        </View>
      ) : null}
    </View>
  );
}

export function PlanSheet({ id, showBack }: { id: number; showBack?: boolean }) {
  const q = usePlan(Number.isInteger(id) && id > 0 ? id : undefined);
  const wide = useIsWide();
  const { token } = useSession();
  const [exportError, setExportError] = useState<string | null>(null);
  const [exporting, setExporting] = useState(false);
  if (!Number.isInteger(id) || id <= 0) return <EmptyState title="No such plan" body="The address does not name a plan." />;
  if (q.isPending) return <LoadingState label="Loading plan…" />;
  if (q.isError) {
    if (q.error instanceof ApiError && q.error.status === 404) return <EmptyState title="No such plan" body="It may belong to another lab." />;
    return <ErrorState error={q.error} onRetry={() => void q.refetch()} />;
  }
  const plan = q.data;
  const web = Platform.OS === 'web';
  const doExport = () => {
    setExportError(null);
    setExporting(true);
    downloadWithToken(planExportUrl(plan.id), token, `plan-${plan.id}.json`)
      .catch((e: unknown) => setExportError(errorMessage(e)))
      .finally(() => setExporting(false));
  };
  return (
    <View style={{ gap: space.lg }} testID="plan-sheet">
      <PrintStyle />
      {showBack ? (
        <PressableLink href="/plans" testID="back-to-plans">
          <Text variant="small" style={{ color: colors.accent }}>
            ‹ All plans
          </Text>
        </PressableLink>
      ) : null}
      <View style={{ gap: space.xs }}>
        <Text variant="title" role="heading" aria-level={1} testID="plan-sheet-title">
          Plan #{plan.id} · {plan.deviceName}
        </Text>
        <View style={{ flexDirection: 'row', gap: space.sm, flexWrap: 'wrap', alignItems: 'center' }}>
          {plan.stale ? <Badge label="stale" tone="pending" testID="plan-stale-badge" /> : <Badge label={`current calibration v${plan.fitVersion}`} tone="ok" testID="plan-current-badge" />}
          <Text variant="small">
            {plan.mode} mode · batch {plan.batchCode} · by {plan.authorName} · {formatDate(plan.createdAt, true)}
          </Text>
        </View>
        {plan.replannedFromId ? (
          <PressableLink href={`/plans/${plan.replannedFromId}`} testID="plan-replanned-from">
            <Text variant="small" style={{ color: colors.accent }}>
              Re-plan of #{plan.replannedFromId} ›
            </Text>
          </PressableLink>
        ) : null}
        {plan.replannedById ? (
          <PressableLink href={`/plans/${plan.replannedById}`} testID="plan-replanned-by">
            <Text variant="small" style={{ color: colors.accent }}>
              Re-planned as #{plan.replannedById} ›
            </Text>
          </PressableLink>
        ) : null}
      </View>
      {plan.stale ? <StaleBanner plan={plan} /> : null}
      {web ? (
        <View style={{ flexDirection: 'row', gap: space.sm, flexWrap: 'wrap' }} data-print="hide">
          <Button small kind="secondary" label="Export JSON" testID="plan-export" busy={exporting} onPress={doExport} />
          <Button small kind="secondary" label="Print" testID="plan-print" onPress={() => window.print()} />
          <PressableLink href={`/plans/new?device=${plan.deviceId}`} testID="plan-new-for-device-noprint">
            <Text variant="small" style={{ color: colors.accent, lineHeight: 30 }}>
              New plan for {plan.deviceName} ›
            </Text>
          </PressableLink>
        </View>
      ) : null}
      {exportError ? <Notice tone="error">{exportError}</Notice> : null}
      <View style={wide ? { flexDirection: 'row', gap: space.lg, alignItems: 'flex-start' } : { gap: space.lg }}>
        <View style={{ flex: wide ? 1 : undefined, minWidth: 0, gap: space.lg }}>
          <ResultsCard result={plan.result} title={`Result (calibration v${plan.fitVersion})`} />
          <WarningsList warnings={plan.result.warnings} />
        </View>
        <View style={{ flex: wide ? 1 : undefined, minWidth: 0, gap: space.lg }}>
          <InputsCard plan={plan} />
          <SpectrumChart result={plan.result} wide={wide} />
          <NotesCard plan={plan} />
        </View>
      </View>
    </View>
  );
}
