import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import type { PumpLine, PumpLineRecord } from '@/client/planning/types';
import { apiRequest, http } from '../api/http';

const isId = (id: number | undefined): id is number => typeof id === 'number' && Number.isInteger(id) && id > 0;

export const pumpLinesKeys = {
  all: ['pumpLines'] as const,
  device: (deviceId: number) => [...pumpLinesKeys.all, deviceId] as const,
};

/** The pump line stored for the device (null when none is set yet). */
export function usePumpLine(deviceId: number | undefined) {
  return useQuery({
    queryKey: pumpLinesKeys.device(deviceId ?? -1),
    queryFn: ({ signal }) =>
      http.get<{ pumpLine: PumpLineRecord | null }>(`/api/devices/${deviceId}/pump-line`, undefined, { signal }).then((r) => r.pumpLine),
    enabled: isId(deviceId),
  });
}

export function useSavePumpLine(deviceId: number) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (body: PumpLine) =>
      apiRequest<{ pumpLine: PumpLineRecord }>(`/api/devices/${deviceId}/pump-line`, { method: 'PUT', body }).then((r) => r.pumpLine),
    onSuccess: (pumpLine) => {
      qc.setQueryData(pumpLinesKeys.device(deviceId), pumpLine);
      void qc.invalidateQueries({ queryKey: pumpLinesKeys.device(deviceId) });
      // Ranked operating points depend on the power chain.
      void qc.invalidateQueries({ queryKey: ['plans', 'operatingPoints', deviceId] });
    },
  });
}
