// The server's side of the planner: fill the request from the device's pump line, run the core,
// and turn its refusals into 422 PLAN_REFUSED answers. The result object is the core's, unchanged,
// so a preview equals `plan --json` for the same (filled) request.
import type { CalibrationJson } from '@/calibration/contract';
import { PlanError, planFromCalibration, rankOperatingPoints } from '@/calibration/planner';
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

/** δΦ_th at an operating point under the request's own pump settings, from the core (no draws). */
function thresholdAt(cal: CalibrationJson, req: PlanRequest, point: { fluxPhi0?: number; bias?: number }, resonantPump: boolean): number | null {
  const probe: PlanRequest = {
    ...req,
    fluxPhi0: point.fluxPhi0,
    bias: point.bias,
    // Any target far below threshold: only threshold_amplitude_phi0 is read.
    targetPairRate: 1e-6,
    targetGainDb: undefined,
    pumpPeriod: undefined,
    attenuationDb: undefined,
    stageNames: undefined,
    thresholdPowerDbm: undefined,
    uncertaintyDraws: 0,
  };
  if (resonantPump) {
    probe.pumpFrequencyHz = undefined;
    probe.detuningHz = undefined;
  }
  try {
    const t = planFromCalibration(cal, probe).threshold_amplitude_phi0;
    return t !== null && Number.isFinite(t) && t > 0 ? t : null;
  } catch {
    return null;
  }
}

/**
 * Fill pumpPeriod / thresholdPowerDbm / attenuationDb / stageNames / coldStageLimitW / pumpLineZ0Ohm
 * from the pump line where the request leaves them out. A dc period (with the attenuation chain) is
 * preferred to a measured threshold: it holds at any bias and in both modes.
 *
 * A measured threshold P_th,meas holds at the bias it was measured at (pumped on resonance there).
 * The generator-to-flux coupling does not depend on bias, so at another operating point the
 * generator power is P = P_th,meas·(δΦ/δΦ_th(b_meas))². The core computes P = P_th·(δΦ/δΦ_th(op))²,
 * so the filled value is P_th = P_th,meas·(δΦ_th(op)/δΦ_th(b_meas))², both thresholds from the core.
 */
export function fillFromPumpLine(cal: CalibrationJson, req: PlanRequest, pl: PumpLineRow | null): Filled {
  if (!pl) return { request: req, filled: [], pumpLine: null };
  const out: PlanRequest = { ...req };
  const filled: string[] = [];
  const set = <K extends keyof PlanRequest>(k: K, v: PlanRequest[K]) => {
    out[k] = v;
    filled.push(k);
  };
  if (out.pumpPeriod === undefined && out.thresholdPowerDbm === undefined) {
    if (pl.dcPeriod !== null) {
      set('pumpPeriod', pl.dcPeriod);
    } else if (pl.thresholdPowerDbm !== null && pl.thresholdBias !== null && out.mode === 'cavity') {
      const op = out.fluxPhi0 !== undefined ? { fluxPhi0: out.fluxPhi0 } : { bias: out.bias };
      const atOp = thresholdAt(cal, out, op, false);
      const atMeas = thresholdAt(cal, out, { bias: pl.thresholdBias }, true);
      if (atOp !== null && atMeas !== null) set('thresholdPowerDbm', pl.thresholdPowerDbm + 20 * Math.log10(atOp / atMeas));
    }
  }
  const chain = out.pumpPeriod !== undefined || out.thresholdPowerDbm !== undefined;
  if (chain) {
    if (out.attenuationDb === undefined && pl.attenuationDb.length > 0) {
      set('attenuationDb', [...pl.attenuationDb]);
      if (out.stageNames === undefined && pl.stageNames.length === pl.attenuationDb.length) set('stageNames', [...pl.stageNames]);
    }
    if (out.coldStageLimitW === undefined) set('coldStageLimitW', pl.coldStageLimitW);
    if (out.pumpPeriod !== undefined && out.pumpLineZ0Ohm === undefined) set('pumpLineZ0Ohm', pl.pumpLineZ0Ohm);
  }
  return { request: out, filled, pumpLine: filled.length ? pumpLineJson(pl) : null };
}

export function runPlan(cal: CalibrationJson, req: PlanRequest): PlanResult {
  return core(() => planFromCalibration(cal, req));
}

export function runRank(cal: CalibrationJson, req: PlanRequest, top: number): RankResult {
  return core(() => rankOperatingPoints(cal, req, { top }));
}
