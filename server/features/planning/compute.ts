// The server's side of the planner: fill the request from the device's pump line, run the core,
// and turn its refusals into 422 PLAN_REFUSED answers. The result object is the core's, unchanged,
// so a preview equals `plan --json` for the same (filled) request.
import type { CalibrationJson } from '@/calibration/contract';
import { completeFromPumpLine, PlanError, planFromCalibration, rankOperatingPoints } from '@/calibration/planner';
import type { PlanRequest, PlanResult, RankResult } from '@/calibration/planner/types';
import { PLAN_REFUSED, type PlanRefusedDetails, type PumpLine } from '@/shared/api/planning';
import type { PumpLineRow } from '../../db/entities';
import { AppError } from '../../http/errors';

export function pumpLineJson(p: PumpLineRow): PumpLine {
  return {
    dcPeriod: p.dcPeriod,
    attenuationDb: p.attenuationDb,
    stageNames: p.stageNames,
    thresholdPowerDbm: p.thresholdPowerDbm,
    thresholdBias: p.thresholdBias,
    coldStageLimitW: p.coldStageLimitW,
    pumpLineZ0Ohm: p.pumpLineZ0Ohm,
    note: p.note,
  };
}

export function refusal(e: PlanError): AppError {
  const details: PlanRefusedDetails = { code: e.code, option: e.option ?? null };
  return new AppError(422, PLAN_REFUSED, e.message, details);
}

/** Run a core call; PlanError → 422 PLAN_REFUSED with the core's message, code and option. */
export function core<T>(fn: () => T): T {
  try {
    return fn();
  } catch (e) {
    if (e instanceof PlanError) throw refusal(e);
    throw e;
  }
}

export interface Filled {
  request: PlanRequest;
  /** Request fields taken from the pump line. */
  filled: string[];
  /** The pump line as used (null when none of its fields was needed). */
  pumpLine: PumpLine | null;
}

/** The request completed from the device's pump line (the core's rule), with the line as used. */
export function fillFromPumpLine(cal: CalibrationJson, req: PlanRequest, pl: PumpLineRow | null): Filled {
  if (!pl) return { request: req, filled: [], pumpLine: null };
  const { request, filled } = completeFromPumpLine(cal, req, pl);
  return { request, filled, pumpLine: filled.length ? pumpLineJson(pl) : null };
}

export function runPlan(cal: CalibrationJson, req: PlanRequest): PlanResult {
  return core(() => planFromCalibration(cal, req));
}

export function runRank(cal: CalibrationJson, req: PlanRequest, top: number): RankResult {
  return core(() => rankOperatingPoints(cal, req, { top }));
}
