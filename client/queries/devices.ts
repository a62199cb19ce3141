import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { http } from '../api/http';
import type { Cooldown, Device, DeviceDetail, Geometry } from '../api/types';
import { batchesKeys } from './batches';

export interface DeviceFilters {
  search?: string;
  batch?: string;
}

export const devicesKeys = {
  all: ['devices'] as const,
  lists: () => [...devicesKeys.all, 'list'] as const,
  list: (filters: DeviceFilters) =>
    [...devicesKeys.lists(), { search: filters.search ?? '', batch: filters.batch ?? '' }] as const,
  details: () => [...devicesKeys.all, 'detail'] as const,
  detail: (id: number) => [...devicesKeys.details(), id] as const,
};

export function useDevices(filters: DeviceFilters = {}) {
  return useQuery({
    queryKey: devicesKeys.list(filters),
    queryFn: ({ signal }) =>
      http
        .get<{ devices: Device[] }>('/api/devices', { search: filters.search?.trim(), batch: filters.batch }, { signal })
        .then((r) => r.devices),
    placeholderData: (prev) => prev,
  });
}

export function useDevice(id: number | undefined) {
  return useQuery({
    queryKey: devicesKeys.detail(id ?? -1),
    queryFn: () => http.get<DeviceDetail>(`/api/devices/${id}`),
    enabled: id !== undefined && Number.isInteger(id) && id > 0,
  });
}

export interface NewDevice {
  name: string;
  batchId: number;
  chipPosition?: string;
  geometry: Geometry;
  designZ0Ohm?: number;
  designFrequencyHz?: number;
  loopInductanceH?: number;
}

export function useCreateDevice() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (body: NewDevice) => http.post<{ device: Device }>('/api/devices', body).then((r) => r.device),
    onSuccess: () => {
      void qc.invalidateQueries({ queryKey: devicesKeys.all });
      void qc.invalidateQueries({ queryKey: batchesKeys.all }); // device counts change
    },
  });
}

export function useAddCooldown(deviceId: number) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (body: { startedOn: string; fridge: string; notes?: string }) =>
      http.post<{ cooldown: Cooldown }>(`/api/devices/${deviceId}/cooldowns`, body).then((r) => r.cooldown),
    onSuccess: () => void qc.invalidateQueries({ queryKey: devicesKeys.detail(deviceId) }),
  });
}
