import { keepPreviousData, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import type { BatchComparison, SpecBounds, SpecWindow } from '@/client/planning/types';
import { apiBaseUrl, apiRequest, http } from '../api/http';

export interface CompareQuery {
  params: string[];
  batches: number[];
}

const queryOf = (q: CompareQuery) => ({ params: q.params.join(','), batches: q.batches.join(',') });

export const batchCompareKeys = {
  all: ['batchCompare'] as const,
  compare: (q: CompareQuery) => [...batchCompareKeys.all, 'compare', queryOf(q)] as const,
  specWindows: () => [...batchCompareKeys.all, 'specWindows'] as const,
};

export function useBatchComparison(q: CompareQuery) {
  return useQuery({
    queryKey: batchCompareKeys.compare(q),
    queryFn: ({ signal }) => http.get<BatchComparison>('/api/batches/compare', queryOf(q), { signal }),
    enabled: q.params.length > 0 && q.batches.length > 0,
    placeholderData: keepPreviousData,
  });
}

export function useSpecWindows() {
  return useQuery({
    queryKey: batchCompareKeys.specWindows(),
    queryFn: ({ signal }) => http.get<{ specWindows: SpecWindow[] }>('/api/spec-windows', undefined, { signal }).then((r) => r.specWindows),
  });
}

export function useSetSpecWindow() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: ({ param, min, max }: { param: string; min: number | null; max: number | null }) =>
      apiRequest<{ specWindow: SpecWindow }>(`/api/spec-windows/${encodeURIComponent(param)}`, { method: 'PUT', body: { min, max } satisfies SpecBounds }).then((r) => r.specWindow),
    // In-spec flags of every comparison change with the window.
    onSuccess: () => void qc.invalidateQueries({ queryKey: batchCompareKeys.all }),
  });
}

export function useDeleteSpecWindow() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (param: string) => http.del(`/api/spec-windows/${encodeURIComponent(param)}`),
    onSuccess: () => void qc.invalidateQueries({ queryKey: batchCompareKeys.all }),
  });
}

export function compareCsvUrl(q: CompareQuery): string {
  const p = new URLSearchParams(queryOf(q));
  return `${apiBaseUrl()}/api/batches/compare.csv?${p.toString()}`;
}
