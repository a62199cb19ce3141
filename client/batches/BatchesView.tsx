import React, { useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { errorMessage } from '../api/http';
import type { Batch } from '../api/types';
import { formatDate } from '../format/units';
import { useBatches, useCreateBatch } from '../queries/batches';
import { canEditInventory, useSession } from '../session/SessionProvider';
import { colors, fonts, radius, space } from '../theme';
import { Button } from '../ui/Button';
import { Card } from '../ui/Card';
import { PressableLink } from '../ui/PressableLink';
import { EmptyState, ErrorState, LoadingState, Notice } from '../ui/States';
import { Text } from '../ui/Text';
import { TextField } from '../ui/TextField';
import { useIsWide } from '../ui/useLayout';

function NewBatchForm({ onDone }: { onDone: () => void }) {
  const create = useCreateBatch();
  const [code, setCode] = useState('');
  const [wafer, setWafer] = useState('');
  const [fabricatedOn, setFabricatedOn] = useState('');
  const [processNotes, setProcessNotes] = useState('');
  const [errors, setErrors] = useState<{ code?: string; fabricatedOn?: string }>({});
  const submit = () => {
    const e: typeof errors = {};
    if (!code.trim()) e.code = 'Give the batch its code (as written on the wafer box).';
    if (fabricatedOn && !/^\d{4}-\d{2}-\d{2}$/.test(fabricatedOn)) e.fabricatedOn = 'Use a date like 2026-03-14.';
    setErrors(e);
    if (Object.keys(e).length) return;
    create.mutate(
      { code: code.trim(), wafer: wafer.trim() || undefined, fabricatedOn: fabricatedOn || undefined, processNotes: processNotes.trim() || undefined },
      { onSuccess: onDone },
    );
  };
  return (
    <Card title="New batch" testID="new-batch-form">
      <TextField label="Code" mono testID="new-batch-code" value={code} onChangeText={setCode} error={errors.code} autoCapitalize="characters" />
      <TextField label="Wafer" value={wafer} onChangeText={setWafer} />
      <TextField label="Fabricated on" mono value={fabricatedOn} onChangeText={setFabricatedOn} placeholder="YYYY-MM-DD" error={errors.fabricatedOn} />
      <TextField label="Process notes" value={processNotes} onChangeText={setProcessNotes} multiline />
      {create.isError ? <Notice tone="error">{errorMessage(create.error)}</Notice> : null}
      <View style={{ flexDirection: 'row', gap: space.sm }}>
        <Button label="Add batch" testID="new-batch-submit" onPress={submit} busy={create.isPending} />
        <Button label="Cancel" kind="ghost" onPress={onDone} />
      </View>
    </Card>
  );
}

function DevicesLink({ b }: { b: Batch }) {
  return (
    <PressableLink href={{ pathname: '/devices', params: { batch: b.code } }} aria-label={`Devices of batch ${b.code}`} testID={`batch-devices-${b.code}`}>
      <Text style={{ color: colors.accent, fontFamily: fonts.monoMedium, textDecorationLine: 'underline' }}>{b.deviceCount}</Text>
    </PressableLink>
  );
}

function BatchTable({ batches }: { batches: Batch[] }) {
  return (
    <View style={styles.table} role="table" testID="batches-table">
      <View style={[styles.tr, styles.thead]} role="row">
        <Text variant="label" style={[styles.cell, { flex: 1.2 }]} role="columnheader">Code</Text>
        <Text variant="label" style={[styles.cell, { flex: 1.2 }]} role="columnheader">Wafer</Text>
        <Text variant="label" style={[styles.cell, { flex: 1 }]} role="columnheader">Fabricated</Text>
        <Text variant="label" style={[styles.cell, styles.num]} role="columnheader">Devices</Text>
        <Text variant="label" style={[styles.cell, { flex: 2.5 }]} role="columnheader">Process notes</Text>
      </View>
      {batches.map((b) => (
        <View key={b.id} style={styles.tr} role="row" testID={`batch-row-${b.code}`}>
          <Text variant="mono" style={[styles.cell, { flex: 1.2, fontFamily: fonts.monoMedium }]} role="cell">{b.code}</Text>
          <Text style={[styles.cell, { flex: 1.2 }]} role="cell">{b.wafer ?? '—'}</Text>
          <Text variant="mono" style={[styles.cell, { flex: 1 }]} role="cell">{formatDate(b.fabricatedOn)}</Text>
          <View style={[styles.cell, styles.num]} role="cell"><DevicesLink b={b} /></View>
          <Text variant="small" style={[styles.cell, { flex: 2.5 }]} role="cell">{b.processNotes ?? '—'}</Text>
        </View>
      ))}
    </View>
  );
}

function BatchCards({ batches }: { batches: Batch[] }) {
  return (
    <View style={{ gap: space.sm }} testID="batches-table">
      {batches.map((b) => (
        <View key={b.id} style={styles.cardRow} testID={`batch-row-${b.code}`}>
          <View style={{ flexDirection: 'row', justifyContent: 'space-between', alignItems: 'baseline' }}>
            <Text variant="mono" style={{ fontFamily: fonts.monoMedium, fontSize: 16 }}>{b.code}</Text>
            <View style={{ flexDirection: 'row', gap: 6, alignItems: 'baseline' }}>
              <DevicesLink b={b} />
              <Text variant="small">{b.deviceCount === 1 ? 'device' : 'devices'}</Text>
            </View>
          </View>
          <Text variant="small">
            {b.wafer ?? 'wafer —'} · fabricated <Text variant="monoSmall">{formatDate(b.fabricatedOn)}</Text>
          </Text>
          {b.processNotes ? <Text variant="small">{b.processNotes}</Text> : null}
        </View>
      ))}
    </View>
  );
}

export function BatchesView() {
  const q = useBatches();
  const wide = useIsWide();
  const { user } = useSession();
  const [creating, setCreating] = useState(false);
  const editor = canEditInventory(user?.role);
  return (
    <View style={{ gap: space.lg }}>
      {editor ? (
        creating ? (
          <NewBatchForm onDone={() => setCreating(false)} />
        ) : (
          <View style={{ alignSelf: 'flex-start' }}>
            <Button small kind="secondary" label="New batch" testID="new-batch" onPress={() => setCreating(true)} />
          </View>
        )
      ) : null}
      {q.isPending ? (
        <LoadingState label="Loading batches…" />
      ) : q.isError ? (
        <ErrorState error={q.error} onRetry={() => void q.refetch()} />
      ) : q.data.length === 0 ? (
        <EmptyState title="No batches yet" body="Fabrication batches group the devices cut from one wafer run." />
      ) : wide ? (
        <BatchTable batches={q.data} />
      ) : (
        <BatchCards batches={q.data} />
      )}
    </View>
  );
}

const styles = StyleSheet.create({
  table: { borderWidth: 1, borderColor: colors.rule, borderRadius: radius.md, backgroundColor: colors.sheet, overflow: 'hidden' },
  tr: { flexDirection: 'row', borderTopWidth: 1, borderTopColor: colors.rule, paddingHorizontal: space.sm, alignItems: 'center' },
  thead: { borderTopWidth: 0, backgroundColor: '#EFEBE1' },
  cell: { paddingHorizontal: space.sm, paddingVertical: space.md, minWidth: 0 },
  num: { width: 90, alignItems: 'flex-end', textAlign: 'right' },
  cardRow: { borderWidth: 1, borderColor: colors.rule, borderRadius: radius.md, backgroundColor: colors.sheet, padding: space.md, gap: 4 },
});
