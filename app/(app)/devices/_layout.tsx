import React from 'react';
import { Slot, useGlobalSearchParams } from 'expo-router';
import { DeviceList } from '@/client/devices/DeviceList';
import { DeviceFiltersProvider } from '@/client/devices/filters';
import { ListDetailPanes } from '@/client/ui/ListDetailPanes';
import { useIsWide } from '@/client/ui/useLayout';

export default function DevicesLayout() {
  const wide = useIsWide();
  const { batch, id } = useGlobalSearchParams<{ batch?: string; id?: string }>();
  return (
    <DeviceFiltersProvider batchParam={batch}>
      {wide ? (
        <ListDetailPanes title="Devices" testIDPrefix="devices" list={<DeviceList selectedId={id ? Number(id) : undefined} />}>
          <Slot />
        </ListDetailPanes>
      ) : (
        <Slot />
      )}
    </DeviceFiltersProvider>
  );
}
