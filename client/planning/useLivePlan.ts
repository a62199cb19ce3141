// Live planning in the client: the shared core (pure TypeScript) runs on every input change, so the
// numbers follow the bias slider within a frame. Fewer uncertainty draws while dragging; the full
// default when the slider settles (same seed, so the settled figures equal the server's).
import { useMemo, useRef } from 'react';
import type { CalibrationJson } from '@/shared/api/calibration';
import { DEFAULT_DRAWS, PlanError, planFromCalibration } from '@/calibration/planner';
import type { PlanRequest, PlanResult } from './types';

export const DRAG_DRAWS = 200;

export interface LivePlan {
  result: PlanResult | null;
  refusal: { code: string; message: string; option?: string } | null;
  /** Wall time of the last planFromCalibration call, ms. */
  ms: number | null;
  draws: number;
  /** Running count of computations (the timing readout shows it). */
  runs: number;
}

function now(): number {
  return typeof performance !== 'undefined' ? performance.now() : Date.now();
}

export function computePlan(cal: CalibrationJson, request: PlanRequest, draws: number): Omit<LivePlan, 'runs'> {
  const t0 = now();
  try {
    const result = planFromCalibration(cal, { ...request, uncertaintyDraws: draws });
    return { result, refusal: null, ms: now() - t0, draws };
  } catch (e) {
    const ms = now() - t0;
    if (e instanceof PlanError) return { result: null, refusal: { code: e.code, message: e.message, option: e.option }, ms, draws };
    return { result: null, refusal: { code: 'error', message: e instanceof Error ? e.message : String(e) }, ms, draws };
  }
}

export function useLivePlan(cal: CalibrationJson | null | undefined, request: PlanRequest | null, dragging: boolean): LivePlan {
  const runs = useRef(0);
  const draws = dragging ? DRAG_DRAWS : DEFAULT_DRAWS;
  return useMemo(() => {
    if (!cal || !request) return { result: null, refusal: null, ms: null, draws, runs: runs.current };
    runs.current += 1;
    return { ...computePlan(cal, request, draws), runs: runs.current };
  }, [cal, request, draws]);
}
