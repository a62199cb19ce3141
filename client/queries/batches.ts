import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { http } from '../api/http';
import type { Batch } from '../api/types';

export const batchesKeys = {
  all: ['batches'] as const,
  list: () => [...batchesKeys.all, 'list'] as const,
};

export function useBatches() {
  return useQuery({
    queryKey: batchesKeys.list(),
    queryFn: () => http.get<{ batches: Batch[] }>('/api/batches').then((r) => r.batches),
  });
}

export interface NewBatch {
  code: string;
  wafer?: string;
  processNotes?: string;
  fabricatedOn?: string;
}

export function useCreateBatch() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (body: NewBatch) => http.post<{ batch: Batch }>('/api/batches', body).then((r) => r.batch),
    onSuccess: () => void qc.invalidateQueries({ queryKey: batchesKeys.all }),
  });
}
