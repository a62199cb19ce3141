import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import type {
  CalibrationJson,
  FitComparison,
  FitDetailResponse,
  FitListResponse,
  FitResponse,
  RefitRequest,
  ReviewRequest,
  UploadResponse,
} from '@/shared/api/calibration';
import type { TraceView, TraceViewResponse } from '@/shared/api/traces';
import { apiBaseUrl, http } from '../api/http';
import { devicesKeys } from './devices';

export type { TraceView };

const isId = (id: number | undefined | null): id is number => typeof id === 'number' && Number.isInteger(id) && id > 0;

export const fitsKeys = {
  all: ['fits'] as const,
  byDevice: (deviceId: number) => [...fitsKeys.all, 'device', deviceId] as const,
  active: (deviceId: number) => [...fitsKeys.all, 'active', deviceId] as const,
  detail: (id: number) => [...fitsKeys.all, 'detail', id] as const,
  trace: (id: number, index: number) => [...fitsKeys.all, 'trace', id, index] as const,
  compare: (a: number, b: number) => [...fitsKeys.all, 'compare', a, b] as const,
};

/** The device's fit versions, newest first. */
export function useDeviceFits(deviceId: number | undefined) {
  return useQuery({
    queryKey: fitsKeys.byDevice(deviceId ?? -1),
    queryFn: ({ signal }) => http.get<FitListResponse>(`/api/devices/${deviceId}/fits`, undefined, { signal }).then((r) => r.fits),
    enabled: isId(deviceId),
  });
}

export function useFit(id: number | undefined) {
  return useQuery({
    queryKey: fitsKeys.detail(id ?? -1),
    queryFn: ({ signal }) => http.get<FitDetailResponse>(`/api/fits/${id}`, undefined, { signal }).then((r) => r.fit),
    enabled: isId(id),
  });
}

export function useFitTrace(id: number | undefined, index: number | null) {
  return useQuery({
    queryKey: fitsKeys.trace(id ?? -1, index ?? -1),
    queryFn: ({ signal }) => http.get<TraceViewResponse>(`/api/fits/${id}/traces/${index}`, undefined, { signal }).then((r) => r.trace),
    enabled: isId(id) && index !== null && index >= 0,
    staleTime: Infinity, // computed from immutable stored bytes
  });
}

export function useFitComparison(a: number | undefined, b: number | undefined) {
  return useQuery({
    queryKey: fitsKeys.compare(a ?? -1, b ?? -1),
    queryFn: ({ signal }) => http.get<FitComparison>(`/api/fits/${a}/compare/${b}`, undefined, { signal }),
    enabled: isId(a) && isId(b) && a !== b,
  });
}

/** The device's accepted calibration JSON; null when it has none (404). */
export function useActiveCalibration(deviceId: number | undefined) {
  return useQuery({
    queryKey: fitsKeys.active(deviceId ?? -1),
    queryFn: ({ signal }) =>
      http.get<CalibrationJson>(`/api/devices/${deviceId}/calibration`, undefined, { signal }).catch((e: unknown) => {
        if ((e as { status?: number }).status === 404) return null;
        throw e;
      }),
    enabled: isId(deviceId),
  });
}

export function useReviewFit(fitId: number) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (body: ReviewRequest) => http.post<FitResponse>(`/api/fits/${fitId}/review`, body).then((r) => r.fit),
    onSuccess: () => {
      // Accepting supersedes the previous active fit and changes the device's status.
      void qc.invalidateQueries({ queryKey: fitsKeys.all });
      void qc.invalidateQueries({ queryKey: devicesKeys.all });
    },
  });
}

export function useRefit(fitId: number) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (body: RefitRequest) => http.post<UploadResponse>(`/api/fits/${fitId}/refit`, body),
    onSuccess: () => void qc.invalidateQueries({ queryKey: fitsKeys.all }),
  });
}

/** Export links carry no bearer header, so they are fetched and handed to the browser as a blob. */
export function exportUrl(fitId: number, format: 'json' | 'csv'): string {
  return `${apiBaseUrl()}/api/fits/${fitId}/export?format=${format}`;
}
