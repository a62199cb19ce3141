import { useQuery, useQueryClient } from '@tanstack/react-query';
import { useEffect } from 'react';
import type { JobResponse } from '@/shared/api/calibration';
import { http } from '../api/http';
import { devicesKeys } from './devices';
import { fitsKeys } from './fits';
import { sweepsKeys } from './sweeps';

export const jobsKeys = {
  all: ['jobs'] as const,
  detail: (id: number) => [...jobsKeys.all, id] as const,
};

/** Poll interval while a fit job is queued or running (ms). */
export const JOB_POLL_MS = 700;

const done = (r: JobResponse | undefined) => r?.job.status === 'succeeded' || r?.job.status === 'failed';

/**
 * One fit job, polled until it has finished. When it finishes the device's fits, sweeps and the
 * device itself (its calibration status) are refetched.
 */
export function useJob(id: number | null | undefined, deviceId?: number) {
  const qc = useQueryClient();
  const q = useQuery({
    queryKey: jobsKeys.detail(id ?? -1),
    queryFn: ({ signal }) => http.get<JobResponse>(`/api/jobs/${id}`, undefined, { signal }),
    enabled: typeof id === 'number' && id > 0,
    refetchInterval: (query) => (done(query.state.data) ? false : JOB_POLL_MS),
  });
  const finished = done(q.data);
  useEffect(() => {
    if (!finished) return;
    void qc.invalidateQueries({ queryKey: fitsKeys.all });
    void qc.invalidateQueries({ queryKey: sweepsKeys.all });
    if (deviceId) void qc.invalidateQueries({ queryKey: devicesKeys.all });
  }, [finished, deviceId, qc]);
  return q;
}
