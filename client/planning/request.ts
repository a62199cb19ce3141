// Planner inputs as typed on the screen → the core's PlanRequest, plus the calibrated bias range.
import type { CalibrationJson } from '@/shared/api/calibration';
import { calibratedBiasRange, completeFromPumpLine, qualityFactorsAtBias } from '@/calibration/planner';
import { parseNumber } from './format';
import type { PlanMode, PlanRequest, PumpLine } from './types';

export interface PlannerInputs {
  mode: PlanMode;
  targetKind: 'rate' | 'gain';
  /** pairs/s (rate) or dB (gain, cavity only). */
  target: string;
  bias: number;
  ql: string;
  qc: string;
  temperatureMk: string;
  bandMHz: string;
  /** GHz; required in line mode, optional (fixes the pump) in cavity mode. */
  pumpGHz: string;
}

export type InputErrors = Partial<Record<'target' | 'ql' | 'qc' | 'temperatureMk' | 'bandMHz' | 'pumpGHz', string>>;

/** The bias range the calibration covers (points and traces), the slider's span: the planner's own. */
export const calibratedRange = calibratedBiasRange;

/** A first operating point off the sweet spot: Φ = 0.25 Φ0 (slope large, far from the lobe edge), clamped to the range. */
export function defaultBias(cal: CalibrationJson): number {
  const [lo, hi] = calibratedRange(cal);
  const period = cal.params.flux_period?.value;
  const offset = cal.params.flux_offset?.value;
  if (period && offset !== undefined && Number.isFinite(period) && Number.isFinite(offset)) {
    for (const phi of [0.25, -0.25, 0.75, -0.75]) {
      const b = offset + phi * period;
      if (b >= lo && b <= hi) return b;
    }
  }
  return lo + 0.25 * (hi - lo);
}

export function cavityAllowed(cal: CalibrationJson): boolean {
  return cal.model !== 'phase';
}

/** Default line-mode pump: twice the probe frequency of a phase fit, else twice the top of the tuning curve. */
export function defaultLinePumpGHz(cal: CalibrationJson): string {
  const probe = cal.fixed?.probe_frequency_hz;
  if (typeof probe === 'number' && probe > 0) return String(Number(((2 * probe) / 1e9).toPrecision(4)));
  const f0 = cal.params.f0_hz?.value;
  const g = cal.params.gamma0?.value ?? 0;
  if (f0 && f0 > 0) return String(Number(((2 * f0) / (1 + g) / 1e9).toPrecision(4)));
  return '10';
}

/** Q_l, Q_c the calibration's traces give at this bias (what the Q fields show as placeholder). */
export function calibrationQ(cal: CalibrationJson, bias: number): { ql: number; qc: number; extrapolated: boolean } | null {
  return qualityFactorsAtBias(cal.traces, bias);
}

/**
 * The request as the server completes it from the stored pump line: the planner core's own rule
 * (calibration/planner/pumpLine.ts), so the live figures equal what a save stores.
 */
export function fillFromPumpLine(cal: CalibrationJson, req: PlanRequest, pl: PumpLine | null | undefined): { request: PlanRequest; filled: string[] } {
  return completeFromPumpLine(cal, req, pl);
}

function positive(s: string, what: string, errors: InputErrors, key: keyof InputErrors, scale = 1): number | undefined {
  const x = parseNumber(s);
  if (x === null) return undefined;
  if (x === 'bad') {
    errors[key] = `${what}: not a number`;
    return undefined;
  }
  if (!(x > 0)) {
    errors[key] = `${what} must be greater than 0`;
    return undefined;
  }
  return x * scale;
}

/**
 * Builds the request as typed (what Save and preview send; the server adds the pump line's fields);
 * field problems come back per input and the planner is not called with them.
 */
export function buildRequest(inp: PlannerInputs): { request: PlanRequest | null; errors: InputErrors } {
  const errors: InputErrors = {};
  const req: PlanRequest = { mode: inp.mode, bias: inp.bias };
  const t = parseNumber(inp.target);
  const gain = inp.mode === 'cavity' && inp.targetKind === 'gain';
  if (t === null) errors.target = gain ? 'Give the target gain in dB' : 'Give the target pair rate in pairs/s';
  else if (t === 'bad') errors.target = 'Target: not a number';
  else if (!(t > 0)) errors.target = gain ? 'Gain must be above 0 dB (a passive resonator reflects at most 0 dB)' : 'The pair rate must be greater than 0';
  else if (gain) req.targetGainDb = t;
  else req.targetPairRate = t;
  const ql = positive(inp.ql, 'Q_l', errors, 'ql');
  const qc = positive(inp.qc, 'Q_c', errors, 'qc');
  if (ql !== undefined) req.ql = ql;
  if (qc !== undefined) req.qc = qc;
  if (ql !== undefined && qc !== undefined && qc < ql) errors.qc = 'Q_c must be at least Q_l (1/Q_i = 1/Q_l − 1/Q_c ≥ 0)';
  const tm = parseNumber(inp.temperatureMk);
  if (tm === 'bad') errors.temperatureMk = 'Temperature: not a number';
  else if (tm !== null && tm < 0) errors.temperatureMk = 'Temperature must be ≥ 0 mK';
  else if (tm !== null && tm > 0) req.temperatureK = tm / 1e3;
  const band = positive(inp.bandMHz, 'Band', errors, 'bandMHz', 1e6);
  if (band !== undefined) req.bandHz = band;
  const fp = positive(inp.pumpGHz, 'Pump frequency', errors, 'pumpGHz', 1e9);
  if (fp !== undefined) req.pumpFrequencyHz = fp;
  if (inp.mode === 'line' && fp === undefined && !errors.pumpGHz) errors.pumpGHz = 'Line mode needs the pump frequency';
  return { request: Object.keys(errors).length ? null : req, errors };
}
