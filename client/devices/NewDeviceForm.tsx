import React, { useState } from 'react';
import { View } from 'react-native';
import { useRouter } from 'expo-router';
import { errorMessage } from '../api/http';
import type { Geometry } from '../api/types';
import { useBatches } from '../queries/batches';
import { useCreateDevice } from '../queries/devices';
import { space } from '../theme';
import { Button } from '../ui/Button';
import { Card } from '../ui/Card';
import { Choice } from '../ui/Choice';
import { Notice } from '../ui/States';
import { TextField } from '../ui/TextField';
import { parsePositive } from '../validation';

const GEOMETRIES: { value: Geometry; label: string }[] = [
  { value: 'quarter_wave', label: 'λ/4 resonator' },
  { value: 'phase_only', label: 'Line, phase only' },
];

export function NewDeviceForm({ onDone }: { onDone: () => void }) {
  const batches = useBatches();
  const create = useCreateDevice();
  const router = useRouter();
  const [name, setName] = useState('');
  const [batchId, setBatchId] = useState('');
  const [chipPosition, setChipPosition] = useState('');
  const [geometry, setGeometry] = useState<Geometry>('quarter_wave');
  const [z0, setZ0] = useState('50');
  const [fGHz, setFGHz] = useState('');
  const [loopPH, setLoopPH] = useState('');
  const [errors, setErrors] = useState<Record<string, string>>({});

  const submit = () => {
    const e: Record<string, string> = {};
    if (!name.trim()) e.name = 'Name the device (e.g. its label on the chip).';
    if (!batchId) e.batch = 'Choose the batch it was fabricated in.';
    const z = parsePositive(z0, 'Design Z0');
    const f = parsePositive(fGHz, 'Design frequency', 1e9);
    const l = parsePositive(loopPH, 'Loop inductance', 1e-12);
    if (z.error) e.z0 = z.error;
    if (f.error) e.f = f.error;
    if (l.error) e.l = l.error;
    setErrors(e);
    if (Object.keys(e).length) return;
    create.mutate(
      {
        name: name.trim(),
        batchId: Number(batchId),
        chipPosition: chipPosition.trim() || undefined,
        geometry,
        designZ0Ohm: z.value,
        designFrequencyHz: f.value,
        loopInductanceH: l.value,
      },
      {
        onSuccess: (device) => {
          onDone();
          router.push(`/devices/${device.id}`);
        },
      },
    );
  };

  return (
    <Card title="New device" testID="new-device-form">
      <TextField label="Name" testID="new-device-name" value={name} onChangeText={setName} error={errors.name} />
      <Choice
        label="Batch"
        testID="new-device-batch"
        value={batchId}
        options={(batches.data ?? []).map((b) => ({ value: String(b.id), label: b.code }))}
        onChange={setBatchId}
      />
      {errors.batch ? <Notice tone="error">{errors.batch}</Notice> : null}
      <TextField label="Chip position" testID="new-device-position" value={chipPosition} onChangeText={setChipPosition} placeholder="e.g. C3" />
      <Choice label="Geometry" testID="new-device-geometry" value={geometry} options={GEOMETRIES} onChange={setGeometry} />
      <TextField label="Design Z0 (Ω)" mono value={z0} onChangeText={setZ0} inputMode="decimal" error={errors.z0} />
      <TextField label="Design frequency (GHz)" mono value={fGHz} onChangeText={setFGHz} inputMode="decimal" error={errors.f} placeholder="e.g. 6.2" />
      <TextField label="SQUID loop inductance (pH)" mono value={loopPH} onChangeText={setLoopPH} inputMode="decimal" error={errors.l} placeholder="optional" />
      {create.isError ? <Notice tone="error">{errorMessage(create.error)}</Notice> : null}
      <View style={{ flexDirection: 'row', gap: space.sm }}>
        <Button label="Register device" testID="new-device-submit" onPress={submit} busy={create.isPending} />
        <Button label="Cancel" kind="ghost" onPress={onDone} />
      </View>
    </Card>
  );
}
