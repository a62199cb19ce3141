import React, { useState } from 'react';
import { StyleSheet, View } from 'react-native';
import type { Device } from '../api/types';
import { formatFrequency } from '../format/units';
import { useBatches } from '../queries/batches';
import { useDevices } from '../queries/devices';
import { canEditInventory, useSession } from '../session/SessionProvider';
import { colors, fonts, radius, space } from '../theme';
import { CalibrationBadge } from '../ui/Badge';
import { Button } from '../ui/Button';
import { PressableLink } from '../ui/PressableLink';
import { Choice } from '../ui/Choice';
import { EmptyState, ErrorState, LoadingState } from '../ui/States';
import { Text } from '../ui/Text';
import { TextField } from '../ui/TextField';
import { NewDeviceForm } from './NewDeviceForm';
import { useDeviceFilters } from './filters';

export const GEOMETRY_LABELS: Record<Device['geometry'], string> = {
  quarter_wave: 'λ/4 resonator',
  phase_only: 'Line, phase only',
};

function DeviceRow({ device, selected }: { device: Device; selected: boolean }) {
  return (
    <PressableLink
      href={`/devices/${device.id}`}
      testID={`device-row-${device.name}`}
      aria-label={`Device ${device.name}`}
      aria-current={selected ? 'page' : undefined}
      style={({ hovered }) => [
        styles.row,
        hovered && { backgroundColor: '#F0ECE2' },
        selected && styles.rowSelected,
      ]}
    >
      <View style={{ flex: 1, minWidth: 0, gap: 2 }}>
        <View style={{ flexDirection: 'row', alignItems: 'baseline', gap: space.sm, flexWrap: 'wrap' }}>
          <Text style={styles.name}>{device.name}</Text>
          <Text variant="monoSmall">{device.batchCode}</Text>
          {device.chipPosition ? <Text variant="monoSmall">· {device.chipPosition}</Text> : null}
        </View>
        <Text variant="small" numberOfLines={1}>
          {GEOMETRY_LABELS[device.geometry] ?? device.geometry}
        </Text>
      </View>
      <View style={{ alignItems: 'flex-end', gap: 4 }}>
        <Text variant="mono">{formatFrequency(device.designFrequencyHz)}</Text>
        <CalibrationBadge status={device.calibrationStatus} />
      </View>
    </PressableLink>
  );
}

/** Search, batch filter and the device rows; used full-width on phones and as the left pane on wide screens. */
export function DeviceList({ selectedId }: { selectedId?: number }) {
  const { filters, setSearch, setBatch } = useDeviceFilters();
  const devices = useDevices(filters);
  const batches = useBatches();
  const { user } = useSession();
  const [creating, setCreating] = useState(false);

  const batchOptions = [{ value: '', label: 'All batches' }, ...(batches.data ?? []).map((b) => ({ value: b.code, label: b.code }))];

  return (
    <View style={{ gap: space.md }} testID="device-list">
      {canEditInventory(user?.role) ? (
        creating ? (
          <NewDeviceForm onDone={() => setCreating(false)} />
        ) : (
          <View style={{ alignSelf: 'flex-start' }}>
            <Button label="New device" kind="secondary" small testID="new-device" onPress={() => setCreating(true)} />
          </View>
        )
      ) : null}
      <TextField
        label="Search"
        testID="device-search"
        placeholder="Name or chip position"
        value={filters.search ?? ''}
        onChangeText={setSearch}
        autoCapitalize="none"
      />
      {batches.data && batches.data.length > 0 ? (
        <Choice label="Batch" testID="batch-filter" value={filters.batch ?? ''} options={batchOptions} onChange={setBatch} />
      ) : null}
      {devices.isPending ? (
        <LoadingState label="Loading devices…" />
      ) : devices.isError ? (
        <ErrorState error={devices.error} onRetry={() => void devices.refetch()} />
      ) : devices.data.length === 0 ? (
        <EmptyState
          title={filters.search || filters.batch ? 'No device matches' : 'No devices yet'}
          body={filters.search || filters.batch ? 'Try a shorter search or another batch.' : 'Devices registered for this lab appear here.'}
        />
      ) : (
        <View style={styles.list}>
          <Text variant="caption" style={{ paddingHorizontal: space.md, paddingTop: space.sm }} testID="device-count">
            {devices.data.length} {devices.data.length === 1 ? 'device' : 'devices'}
          </Text>
          {devices.data.map((d) => (
            <DeviceRow key={d.id} device={d} selected={d.id === selectedId} />
          ))}
        </View>
      )}
    </View>
  );
}

const styles = StyleSheet.create({
  list: { borderWidth: 1, borderColor: colors.rule, borderRadius: radius.md, backgroundColor: colors.sheet, overflow: 'hidden' },
  row: {
    flexDirection: 'row',
    alignItems: 'center',
    gap: space.md,
    paddingHorizontal: space.md,
    paddingVertical: space.md,
    borderTopWidth: 1,
    borderTopColor: colors.rule,
  },
  rowSelected: { backgroundColor: colors.accentWash, borderLeftWidth: 3, borderLeftColor: colors.accent, paddingLeft: space.md - 3 },
  name: { fontFamily: fonts.sansSemiBold, fontSize: 16 },
});
