/**
 * Completing a plan request from a device's stored pump line. One rule for the server (which stores
 * what it computes) and the app (whose live figures must equal what a save stores).
 *
 * A dc period through the pump line (with the attenuation chain) is preferred to a measured
 * threshold power: it holds at any bias and in both modes. A threshold P_th,meas measured at bias b_m
 * (pumped on resonance there) holds at that bias only. The generator-to-flux coupling does not depend
 * on bias, so at another operating point P = P_th,meas·(δΦ/δΦ_th(b_m))². The planner computes
 * P = P_th·(δΦ/δΦ_th(op))², so the filled value is P_th = P_th,meas·(δΦ_th(op)/δΦ_th(b_m))², both
 * thresholds from the planner itself.
 */
import type { CalibrationJson } from '../contract';
import { planFromCalibration } from './plan';
import type { PlanRequest } from './types';

/** The pump-line fields the planner uses (the stored record may carry more). */
export interface PumpLineSettings {
  /** Pump-line bias per Φ0 (A), from a dc period measured through that line. */
  dcPeriod: number | null;
  thresholdPowerDbm: number | null;
  /** Bias (calibration unit) at which thresholdPowerDbm was measured. */
  thresholdBias: number | null;
  attenuationDb: readonly number[];
  stageNames: readonly string[];
  coldStageLimitW: number;
  pumpLineZ0Ohm: number;
}

/** δΦ_th at an operating point under the request's own pump settings (no draws), or null. */
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
 * Fills pumpPeriod / thresholdPowerDbm / attenuationDb / stageNames / coldStageLimitW /
 * pumpLineZ0Ohm from the pump line where the request leaves them out; `filled` names them.
 */
export function completeFromPumpLine(
  cal: CalibrationJson,
  req: PlanRequest,
  pl: PumpLineSettings | null | undefined,
): { request: PlanRequest; filled: string[] } {
  if (!pl) return { request: req, filled: [] };
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
  if (out.pumpPeriod !== undefined || out.thresholdPowerDbm !== undefined) {
    if (out.attenuationDb === undefined && pl.attenuationDb.length > 0) {
      set('attenuationDb', [...pl.attenuationDb]);
      if (out.stageNames === undefined && pl.stageNames.length === pl.attenuationDb.length) set('stageNames', [...pl.stageNames]);
    }
    if (out.coldStageLimitW === undefined) set('coldStageLimitW', pl.coldStageLimitW);
    if (out.pumpPeriod !== undefined && out.pumpLineZ0Ohm === undefined) set('pumpLineZ0Ohm', pl.pumpLineZ0Ohm);
  }
  return { request: out, filled };
}
