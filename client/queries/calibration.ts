import { useMemo } from 'react';
import type { CalibrationJson } from '@/shared/api/calibration';
import { useActiveCalibration, useDeviceFits } from './fits';

export { fitsKeys as calibrationKeys } from './fits';

export interface DeviceCalibration {
  calibration: CalibrationJson;
  /** The accepted fit this JSON belongs to. */
  fitId: number | null;
  version: number | null;
}

/**
 * The device's accepted calibration with its fit id and version: the JSON the planner computes
 * with, and the version a saved plan is compared against. Same cache entries as the calibration
 * screens (fitsKeys), so accepting a new fit there refreshes the planner too.
 */
export function useDeviceCalibration(deviceId: number | undefined) {
  const json = useActiveCalibration(deviceId);
  const fits = useDeviceFits(deviceId);
  const accepted = fits.data?.find((f) => f.status === 'accepted') ?? null;
  const data = useMemo<DeviceCalibration | null | undefined>(() => {
    if (json.data === undefined) return undefined;
    if (json.data === null) return null;
    return { calibration: json.data, fitId: accepted?.id ?? null, version: accepted?.version ?? null };
  }, [json.data, accepted?.id, accepted?.version]);
  return {
    data,
    isPending: json.isPending,
    isError: json.isError || fits.isError,
    error: json.error ?? fits.error,
    refetch: () => {
      void json.refetch();
      void fits.refetch();
    },
  };
}
