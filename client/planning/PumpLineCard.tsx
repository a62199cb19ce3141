import React, { useState } from 'react';
import { View } from 'react-native';
import { DEFAULT_COLD_STAGE_LIMIT_W } from '@/calibration/planner';
import { errorMessage } from '../api/http';
import { formatDate } from '../format/units';
import { usePumpLine, useSavePumpLine } from '../queries/pumpLines';
import { space } from '../theme';
import { Button } from '../ui/Button';
import { Card, Field } from '../ui/Card';
import { ErrorState, LoadingState, Notice } from '../ui/States';
import { Text } from '../ui/Text';
import { TextField } from '../ui/TextField';
import { dbm, fixed, parseNumber, watts } from './format';
import type { PumpLine, PumpLineRecord } from './types';

function list(s: string): string[] {
  return s.split(/[,;]/).map((x) => x.trim()).filter((x) => x !== '');
}

function PumpLineForm({ deviceId, current, onDone }: { deviceId: number; current: PumpLineRecord | null; onDone: () => void }) {
  const save = useSavePumpLine(deviceId);
  const [period, setPeriod] = useState(current?.dcPeriod != null ? String(Number((current.dcPeriod * 1e3).toPrecision(6))) : '');
  const [atten, setAtten] = useState(current?.attenuationDb.join(', ') ?? '');
  const [stages, setStages] = useState(current?.stageNames.join(', ') ?? '');
  const [thP, setThP] = useState(current?.thresholdPowerDbm != null ? String(current.thresholdPowerDbm) : '');
  const [thB, setThB] = useState(current?.thresholdBias != null ? String(current.thresholdBias) : '');
  const [limit, setLimit] = useState(String(Number(((current?.coldStageLimitW ?? DEFAULT_COLD_STAGE_LIMIT_W) * 1e6).toPrecision(6))));
  const [z0, setZ0] = useState(String(current?.pumpLineZ0Ohm ?? 50));
  const [note, setNote] = useState(current?.note ?? '');
  const [errors, setErrors] = useState<Record<string, string>>({});

  const submit = () => {
    const e: Record<string, string> = {};
    const num = (s: string, key: string, what: string, opts: { positive?: boolean; nonNegative?: boolean } = {}): number | null => {
      const x = parseNumber(s);
      if (x === null) return null;
      if (x === 'bad') e[key] = `${what}: not a number`;
      else if (opts.positive && !(x > 0)) e[key] = `${what} must be greater than 0`;
      else if (opts.nonNegative && x < 0) e[key] = `${what} must be ≥ 0`;
      else return x;
      return null;
    };
    const p = num(period, 'period', 'dc flux period', { positive: true });
    const a = list(atten).map((x, i) => {
      const v = parseNumber(x);
      if (v === null || v === 'bad' || v < 0) e.atten = `stage ${i + 1}: "${x}" is not an attenuation ≥ 0 dB`;
      return typeof v === 'number' ? v : 0;
    });
    const names = list(stages);
    if (names.length > 0 && names.length !== a.length) e.stages = `give one name per stage (${a.length} attenuators, ${names.length} names), or none`;
    const tp = num(thP, 'thP', 'threshold power');
    const tb = num(thB, 'thB', 'threshold bias');
    if (tp !== null && tb === null && !e.thB) e.thB = 'give the bias the threshold power was measured at';
    const lim = num(limit, 'limit', 'cold-stage limit', { positive: true });
    if (lim === null && !e.limit) e.limit = 'give the lab’s limit in µW';
    const z = num(z0, 'z0', 'line impedance', { positive: true });
    if (z === null && !e.z0) e.z0 = 'give the pump line impedance in Ω';
    setErrors(e);
    if (Object.keys(e).length) return;
    const body: PumpLine = {
      dcPeriod: p !== null ? p / 1e3 : null,
      attenuationDb: a,
      stageNames: names,
      thresholdPowerDbm: tp,
      thresholdBias: tb,
      coldStageLimitW: (lim as number) / 1e6,
      pumpLineZ0Ohm: z as number,
      note: note.trim() || null,
    };
    save.mutate(body, { onSuccess: onDone });
  };

  return (
    <View style={{ gap: space.md }} testID="pump-line-form">
      <TextField label="dc flux period through the pump line (mA per Φ0)" mono value={period} onChangeText={setPeriod} error={errors.period} testID="pump-line-period" hint="Sweep the pump port's dc current until the resonance repeats; leave empty when you use a measured threshold instead." />
      <TextField label="Attenuators, warm → cold (dB)" mono value={atten} onChangeText={setAtten} error={errors.atten} testID="pump-line-atten" placeholder="20, 10, 20" />
      <TextField label="Stage names, warm → cold" value={stages} onChangeText={setStages} error={errors.stages} testID="pump-line-stages" placeholder="4 K, still, mixing chamber" />
      <View style={{ flexDirection: 'row', gap: space.md, flexWrap: 'wrap' }}>
        <View style={{ flexGrow: 1, flexBasis: 160 }}>
          <TextField label="Measured threshold (dBm)" mono value={thP} onChangeText={setThP} error={errors.thP} testID="pump-line-threshold" />
        </View>
        <View style={{ flexGrow: 1, flexBasis: 160 }}>
          <TextField label="…measured at bias" mono value={thB} onChangeText={setThB} error={errors.thB} testID="pump-line-threshold-bias" />
        </View>
      </View>
      <View style={{ flexDirection: 'row', gap: space.md, flexWrap: 'wrap' }}>
        <View style={{ flexGrow: 1, flexBasis: 160 }}>
          <TextField label="Cold-stage limit (µW)" mono value={limit} onChangeText={setLimit} error={errors.limit} testID="pump-line-limit" hint="Your lab's rule for the coldest stage" />
        </View>
        <View style={{ flexGrow: 1, flexBasis: 160 }}>
          <TextField label="Line impedance (Ω)" mono value={z0} onChangeText={setZ0} error={errors.z0} testID="pump-line-z0" />
        </View>
      </View>
      <TextField label="Note" value={note} onChangeText={setNote} multiline testID="pump-line-note" />
      {save.isError ? <Notice tone="error">{errorMessage(save.error)}</Notice> : null}
      <View style={{ flexDirection: 'row', gap: space.sm }}>
        <Button label="Save pump line" testID="pump-line-save" onPress={submit} busy={save.isPending} />
        <Button label="Cancel" kind="ghost" onPress={onDone} />
      </View>
    </View>
  );
}

/** The device's pump line (generator → chip): what turns δΦ into a generator power. */
export const PumpLineCard = React.memo(function PumpLineCard({ deviceId, startEditing, canEdit = true }: { deviceId: number; startEditing?: boolean; canEdit?: boolean }) {
  const q = usePumpLine(deviceId);
  const [editing, setEditing] = useState(!!startEditing);
  React.useEffect(() => {
    if (startEditing) setEditing(true);
  }, [startEditing]);
  const line = q.data ?? null;
  return (
    <Card
      title="Pump line"
      testID="pump-line-card"
      aside={canEdit && !editing && !q.isPending ? <Button small kind="ghost" label={line ? 'Edit' : 'Set pump line'} testID="pump-line-edit" onPress={() => setEditing(true)} /> : null}
    >
      {q.isPending ? (
        <LoadingState label="Loading pump line…" />
      ) : q.isError ? (
        <ErrorState error={q.error} onRetry={() => void q.refetch()} />
      ) : editing ? (
        <PumpLineForm deviceId={deviceId} current={line} onDone={() => setEditing(false)} />
      ) : !line ? (
        <Text variant="small" testID="pump-line-none">
          No pump line stored: plans give δΦ but no generator power. Set the dc flux period of the pump port and the attenuators (or a
          measured threshold power).
        </Text>
      ) : (
        <View style={{ gap: space.xs }} testID="pump-line-summary">
          <Field label="dc flux period" value={line.dcPeriod !== null ? `${fixed(line.dcPeriod * 1e3, 5)} mA/Φ0` : '—'} mono />
          <Field
            label="Attenuation"
            value={line.attenuationDb.length ? line.attenuationDb.map((a, i) => `${a} dB${line.stageNames[i] ? ` (${line.stageNames[i]})` : ''}`).join(' → ') : '—'}
            mono
          />
          <Field label="Measured threshold" value={line.thresholdPowerDbm !== null ? `${dbm(line.thresholdPowerDbm)} at bias ${line.thresholdBias}` : '—'} mono />
          <Field label="Cold-stage limit" value={watts(line.coldStageLimitW)} mono />
          <Field label="Line impedance" value={`${line.pumpLineZ0Ohm} Ω`} mono />
          {line.note ? <Field label="Note" value={line.note} /> : null}
          <Text variant="caption">
            Updated {formatDate(line.updatedAt, true)}
            {line.updatedBy ? ` by ${line.updatedBy.name}` : ''}
          </Text>
        </View>
      )}
    </Card>
  );
});
