import { keepPreviousData, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import type { OperatingPointsResponse, Plan, PlanMode, PlanNote, PlanRequest, PlanSummary, PreviewResponse } from '@/client/planning/types';
import { apiBaseUrl, http } from '../api/http';

const isId = (id: number | undefined | null): id is number => typeof id === 'number' && Number.isInteger(id) && id > 0;

export interface OperatingPointsQuery {
  mode: PlanMode;
  target?: number;
  targetGainDb?: number;
  pumpFrequencyHz?: number;
  top?: number;
}

export const plansKeys = {
  all: ['plans'] as const,
  lists: () => [...plansKeys.all, 'list'] as const,
  list: (deviceId: number | null) => [...plansKeys.lists(), { device: deviceId ?? 'all' }] as const,
  details: () => [...plansKeys.all, 'detail'] as const,
  detail: (id: number) => [...plansKeys.details(), id] as const,
  operatingPoints: (deviceId: number, q: OperatingPointsQuery) => [...plansKeys.all, 'operatingPoints', deviceId, q] as const,
};

/** Plans newest first; all of the lab's, or one device's. */
export function usePlans(deviceId?: number | null) {
  return useQuery({
    queryKey: plansKeys.list(deviceId ?? null),
    queryFn: ({ signal }) =>
      http.get<{ plans: PlanSummary[] }>('/api/plans', { device: deviceId ?? undefined }, { signal }).then((r) => r.plans),
  });
}

export function usePlan(id: number | undefined) {
  return useQuery({
    queryKey: plansKeys.detail(id ?? -1),
    queryFn: ({ signal }) => http.get<{ plan: Plan }>(`/api/plans/${id}`, undefined, { signal }).then((r) => r.plan),
    enabled: isId(id),
  });
}

/** Ranked operating points across the calibrated bias range (server scan with the stored pump line). */
export function useOperatingPoints(deviceId: number | undefined, q: OperatingPointsQuery | null) {
  return useQuery({
    queryKey: plansKeys.operatingPoints(deviceId ?? -1, q ?? { mode: 'cavity' }),
    queryFn: ({ signal }) =>
      http.get<OperatingPointsResponse>(
        `/api/devices/${deviceId}/operating-points`,
        { mode: q!.mode, target: q!.target, targetGainDb: q!.targetGainDb, pumpFrequencyHz: q!.pumpFrequencyHz, top: q!.top ?? 5 },
        { signal },
      ),
    enabled: isId(deviceId) && q !== null && (q.target !== undefined || q.targetGainDb !== undefined),
    placeholderData: keepPreviousData,
    retry: false,
  });
}

export function previewPlan(body: { deviceId: number; request: PlanRequest; rank?: boolean }): Promise<PreviewResponse> {
  return http.post<PreviewResponse>('/api/plans/preview', body);
}

export function useSavePlan() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (body: { deviceId: number; request: PlanRequest; note?: string }) => http.post<{ plan: Plan }>('/api/plans', body).then((r) => r.plan),
    onSuccess: (plan) => {
      qc.setQueryData(plansKeys.detail(plan.id), plan);
      void qc.invalidateQueries({ queryKey: plansKeys.lists() });
    },
  });
}

export function useReplan(planId: number) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: () => http.post<{ plan: Plan }>(`/api/plans/${planId}/replan`).then((r) => r.plan),
    onSuccess: (plan) => {
      qc.setQueryData(plansKeys.detail(plan.id), plan);
      void qc.invalidateQueries({ queryKey: plansKeys.lists() });
      void qc.invalidateQueries({ queryKey: plansKeys.detail(planId) });
    },
  });
}

export function useAddPlanNote(planId: number) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (text: string) => http.post<{ note: PlanNote }>(`/api/plans/${planId}/notes`, { text }).then((r) => r.note),
    onSuccess: () => void qc.invalidateQueries({ queryKey: plansKeys.detail(planId) }),
  });
}

export function planExportUrl(planId: number): string {
  return `${apiBaseUrl()}/api/plans/${planId}/export`;
}
