import React, { createContext, useContext, useEffect, useMemo, useState } from 'react';
import type { DeviceFilters } from '../queries/devices';

interface FiltersValue {
  filters: DeviceFilters;
  setSearch: (s: string) => void;
  setBatch: (b: string) => void;
}

const Ctx = createContext<FiltersValue | null>(null);

/** Search and batch filter live in the Devices layout so they survive list → detail → back. */
export function DeviceFiltersProvider({ batchParam, children }: { batchParam?: string; children: React.ReactNode }) {
  const [search, setSearch] = useState('');
  const [batch, setBatch] = useState(batchParam ?? '');
  // Arriving from Batches with ?batch=CODE selects that batch.
  useEffect(() => {
    if (batchParam !== undefined) setBatch(batchParam);
  }, [batchParam]);
  const value = useMemo(() => ({ filters: { search, batch }, setSearch, setBatch }), [search, batch]);
  return <Ctx.Provider value={value}>{children}</Ctx.Provider>;
}

export function useDeviceFilters(): FiltersValue {
  const v = useContext(Ctx);
  if (!v) throw new Error('useDeviceFilters must be used inside <DeviceFiltersProvider>');
  return v;
}
