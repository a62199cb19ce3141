import React, { useState } from 'react';
import { View } from 'react-native';
import { Link } from 'expo-router';
import { ApiError, errorMessage } from '../api/http';
import { formatDate, formatFrequency, formatImpedance, formatInductance } from '../format/units';
import { useAddCooldown, useDevice } from '../queries/devices';
import { canEditInventory, useSession } from '../session/SessionProvider';
import { colors, space } from '../theme';
import { CalibrationBadge } from '../ui/Badge';
import { Button } from '../ui/Button';
import { Card, Field, Rule } from '../ui/Card';
import { EmptyState, ErrorState, LoadingState, Notice } from '../ui/States';
import { Text } from '../ui/Text';
import { TextField } from '../ui/TextField';
import { GEOMETRY_LABELS } from './DeviceList';

function todayIso(): string {
  return new Date().toISOString().slice(0, 10);
}

function CooldownForm({ deviceId, onDone }: { deviceId: number; onDone: () => void }) {
  const add = useAddCooldown(deviceId);
  const [startedOn, setStartedOn] = useState(todayIso());
  const [fridge, setFridge] = useState('');
  const [notes, setNotes] = useState('');
  const [errors, setErrors] = useState<{ startedOn?: string; fridge?: string }>({});
  const submit = () => {
    const e: typeof errors = {};
    if (!/^\d{4}-\d{2}-\d{2}$/.test(startedOn) || !Number.isFinite(Date.parse(startedOn))) e.startedOn = 'Use a date like 2026-03-14.';
    if (!fridge.trim()) e.fridge = 'Name the fridge (e.g. its lab nickname).';
    setErrors(e);
    if (Object.keys(e).length) return;
    add.mutate({ startedOn, fridge: fridge.trim(), notes: notes.trim() || undefined }, { onSuccess: onDone });
  };
  return (
    <View style={{ gap: space.md }} testID="cooldown-form">
      <TextField label="Started on" mono value={startedOn} onChangeText={setStartedOn} error={errors.startedOn} />
      <TextField label="Fridge" testID="cooldown-fridge" value={fridge} onChangeText={setFridge} error={errors.fridge} />
      <TextField label="Notes" value={notes} onChangeText={setNotes} multiline />
      {add.isError ? <Notice tone="error">{errorMessage(add.error)}</Notice> : null}
      <View style={{ flexDirection: 'row', gap: space.sm }}>
        <Button label="Add cooldown" testID="cooldown-submit" onPress={submit} busy={add.isPending} />
        <Button label="Cancel" kind="ghost" onPress={onDone} />
      </View>
    </View>
  );
}

/**
 * `calibration` is rendered between the design card and the cooldowns (the calibration section);
 * `actions` under the device's name (e.g. Plan a drive).
 */
export function DeviceDetail({ id, showBack, calibration, actions }: { id: number; showBack?: boolean; calibration?: React.ReactNode; actions?: React.ReactNode }) {
  const q = useDevice(id);
  const { user } = useSession();
  const [addingCooldown, setAddingCooldown] = useState(false);

  if (!Number.isInteger(id) || id <= 0) return <EmptyState title="No such device" body="The address does not name a device." />;
  if (q.isPending) return <LoadingState label="Loading device…" />;
  if (q.isError) {
    if (q.error instanceof ApiError && q.error.status === 404) {
      return <EmptyState title="No such device" body="It may belong to another lab or have been removed." />;
    }
    return <ErrorState error={q.error} onRetry={() => void q.refetch()} />;
  }
  const { device, cooldowns } = q.data;
  const editor = canEditInventory(user?.role);

  return (
    <View style={{ gap: space.lg }} testID="device-detail">
      {showBack ? (
        <Link href="/devices" testID="back-to-devices">
          <Text variant="small" style={{ color: colors.accent }}>
            ‹ All devices
          </Text>
        </Link>
      ) : null}
      <View style={{ gap: space.xs }}>
        <Text variant="title" role="heading" aria-level={1} testID="device-name">
          {device.name}
        </Text>
        <View style={{ flexDirection: 'row', gap: space.sm, alignItems: 'center', flexWrap: 'wrap' }}>
          <CalibrationBadge status={device.calibrationStatus} />
          <Text variant="small">
            {GEOMETRY_LABELS[device.geometry] ?? device.geometry} · batch {device.batchCode}
          </Text>
        </View>
        {actions}
      </View>
      <Card title="Design">
        <Field label="Batch" value={device.batchCode} mono />
        <Field label="Chip position" value={device.chipPosition ?? '—'} mono />
        <Field label="Geometry" value={GEOMETRY_LABELS[device.geometry] ?? device.geometry} />
        <Rule />
        <Field label="Design frequency" value={formatFrequency(device.designFrequencyHz)} mono testID="design-frequency" />
        <Field label="Line impedance Z0" value={formatImpedance(device.designZ0Ohm)} mono />
        <Field label="SQUID loop L" value={formatInductance(device.loopInductanceH)} mono />
      </Card>
      {calibration}
      <Card
        title={`Cooldowns (${cooldowns.length})`}
        aside={
          editor && !addingCooldown ? <Button small kind="ghost" label="Add cooldown" testID="add-cooldown" onPress={() => setAddingCooldown(true)} /> : null
        }
      >
        {addingCooldown ? <CooldownForm deviceId={device.id} onDone={() => setAddingCooldown(false)} /> : null}
        {cooldowns.length === 0 ? (
          <Text variant="small">No cooldown recorded for this device.</Text>
        ) : (
          cooldowns.map((c) => (
            <View key={c.id} style={{ flexDirection: 'row', gap: space.md, flexWrap: 'wrap', alignItems: 'baseline' }}>
              <Text variant="mono">{formatDate(c.startedOn)}</Text>
              <Text style={{ flexShrink: 1 }}>{c.fridge}</Text>
              {c.notes ? (
                <Text variant="small" style={{ flexBasis: '100%' }}>
                  {c.notes}
                </Text>
              ) : null}
            </View>
          ))
        )}
      </Card>
    </View>
  );
}
