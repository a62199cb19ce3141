/**
 * Drive planner: inverts the calibrated SQUID model for the pump amplitude that gives a target
 * photon-pair rate (or, cavity mode, a target gain), below the parametric-oscillation threshold.
 * Physics in ./cavity.ts and ./line.ts; power chain in ./power.ts.
 *
 * Conventions (also returned in `conventions` of every result):
 *  - κ = ω_r/Q_l, κ_c = ω_r/Q_c (energy decay rates, rad/s); κ_i = κ − κ_c ≥ 0.
 *  - Spectra in photons/s per Hz of bandwidth (rates = ∫ spectrum df = ∫ spectrum dω/2π).
 *  - Pair rate = half the excess photon rate over the thermal background (cavity: out of the coupling
 *    port; line: inside the detection band). For a band symmetric about f_p/2 each pair has both
 *    partners in the band.
 *  - Thermal input: both baths (line/coupling port and internal loss) at the same temperature T.
 *  - Cavity slope and curvature from the exact SQUID-line model.
 */
import { BOLTZMANN_K, FLUX_QUANTUM, PLANCK_H } from '../constants';
import type { CalibrationJson, TraceJson } from '../contract';
import {
  criticalCurrentSum, effectiveDelayDerivatives, fluxFromBias, HYSTERESIS_BETA_L, resonanceDerivatives,
  screeningParameter, type SquidLineParams,
} from '../squid/model';
import {
  integrateSpectrum, modulationForCentreGain, modulationForOccupation, signalGain, thermalOccupation,
  thresholdModulation, vacuumOccupation, vacuumOutputSpectrum, type CavityDrive,
} from './cavity';
import {
  delayHarmonics, lineBandRateThermal, lineBandRateVacuum, lineTotalRate, mirrorAmplitudeForRate,
  twoFacedMirrorRate, veffOverV, type PumpTone,
} from './line';
import {
  dbmToWatts, incidentPowerForShortCurrent, pumpCurrentForFlux, stageDissipation, wattsToDbm,
} from './power';
import { factorCovariance, normalSource, percentile, seededRandom } from './stats';
import type {
  CautionObject, PlanRequest, PlanResult, PlanWarning, RankedPoint, RankResult, UncertaintySummary,
} from './types';

export const SPEED_OF_LIGHT = 299792458; // m/s, exact (SI)
export const DEFAULT_QL = 1e4;
export const DEFAULT_QC = 2e4;
export const DEFAULT_COLD_STAGE_LIMIT_W = 1e-6;
export const DEFAULT_SEED = 12345;
export const DEFAULT_DRAWS = 1000;
/** Warning thresholds (common practice, chosen here). */
export const NEAR_THRESHOLD_RATIO = 0.9;
export const LINEAR_RESPONSE_LIMIT_PHI0 = 0.05;
export const DEFAULT_LOBE_MARGIN_PHI0 = 0.05;
export const THERMAL_OCCUPATION_LIMIT = 0.01;

export const CONVENTIONS = [
  'kappa = 2*pi*f_r/Q_l and kappa_c = 2*pi*f_r/Q_c are energy decay rates in rad/s',
  'spectra are photons/s per Hz of bandwidth; rates integrate them over frequency in Hz',
  'pair rate = half the excess photon rate over the thermal background (cavity: coupling port; line: detection band)',
  'thermal input: line and internal-loss baths at the same temperature',
  'cavity slope and curvature from the exact SQUID-terminated line model',
];

/** Planner refusal or bad request; `option` names the offending input when there is one. */
export class PlanError extends Error {
  constructor(public readonly code: string, message: string, public readonly option?: string) {
    super(message);
    this.name = 'PlanError';
  }
}

// ---------------------------------------------------------------------------------------------
// Device model from calibration values

type Values = Record<string, number>;

interface Device {
  kind: 'tuning' | 'phase';
  squid: SquidLineParams;
  period: number;
  offset: number;
}

function calibrationValues(cal: CalibrationJson): Values {
  const v: Values = {};
  for (const [k, p] of Object.entries(cal.params ?? {})) if (p && Number.isFinite(p.value)) v[k] = p.value;
  return v;
}

function need(v: Values, name: string): number {
  const x = v[name];
  if (!Number.isFinite(x)) throw new PlanError('calibration_incomplete', `calibration is missing params.${name}`, 'calibration');
  return x;
}

function deviceFromValues(kind: 'tuning' | 'phase', v: Values): Device {
  const period = need(v, 'flux_period');
  const offset = need(v, 'flux_offset');
  if (period === 0) throw new PlanError('calibration_incomplete', 'calibration params.flux_period is zero', 'calibration');
  for (const name of kind === 'tuning' ? ['f0_hz', 'gamma0'] : ['tau_eff0_s']) {
    if (!(need(v, name) > 0)) throw new PlanError('calibration_incomplete', `calibration params.${name} must be > 0, got ${v[name]}`, 'calibration');
  }
  if (kind === 'tuning') {
    return {
      kind,
      squid: { f0Hz: need(v, 'f0_hz'), gamma0: need(v, 'gamma0'), asymmetry: Math.abs(need(v, 'asymmetry')), csOverCr: v.cs_over_cr ?? 0 },
      period,
      offset,
    };
  }
  // τ_eff = γ0·factor/(4 f0): choose f0 = 1/4 Hz and γ0 = τ_eff0 so the same closed forms apply.
  return { kind, squid: { f0Hz: 0.25, gamma0: need(v, 'tau_eff0_s'), asymmetry: Math.abs(need(v, 'asymmetry')) }, period, offset };
}

function deviceKind(cal: CalibrationJson): 'tuning' | 'phase' {
  return cal.model === 'phase' ? 'phase' : 'tuning';
}

function thermalOcc(fHz: number, tK: number): number {
  if (!(tK > 0) || !(fHz > 0)) return 0;
  return 1 / Math.expm1((PLANCK_H * fHz) / (BOLTZMANN_K * tK));
}

function thermalOfOmega(tK: number): ((omega: number) => number) | null {
  if (!(tK > 0)) return null;
  const a = PLANCK_H / (2 * Math.PI * BOLTZMANN_K * tK);
  return (omega: number) => (omega > 0 ? 1 / Math.expm1(a * omega) : 0);
}

/** Distance of φ to the nearest lobe edge (half-integer flux), Φ0. */
function lobeEdgeDistance(phi: number): number {
  const r = phi - Math.round(phi); // in [−0.5, 0.5]
  return 0.5 - Math.abs(r);
}

// ---------------------------------------------------------------------------------------------
// Request checks and operating point

function checkFinite(x: unknown, option: string, positive = false): void {
  if (x === undefined) return;
  if (typeof x !== 'number' || !Number.isFinite(x)) throw new PlanError('bad_request', `${option} must be a finite number`, option);
  if (positive && !(x > 0)) throw new PlanError('bad_request', `${option} must be > 0, got ${x}`, option);
}

function validateRequest(req: PlanRequest): void {
  if (req.mode !== 'cavity' && req.mode !== 'line') throw new PlanError('bad_request', `mode must be 'cavity' or 'line', got ${String(req.mode)}`, 'mode');
  if ((req.fluxPhi0 === undefined) === (req.bias === undefined)) throw new PlanError('bad_request', 'give exactly one of flux or bias', 'flux');
  if ((req.targetPairRate === undefined) === (req.targetGainDb === undefined)) throw new PlanError('bad_request', 'give exactly one of target-pair-rate or target-gain-db', 'target-pair-rate');
  checkFinite(req.fluxPhi0, 'flux');
  checkFinite(req.bias, 'bias');
  checkFinite(req.targetPairRate, 'target-pair-rate', true);
  checkFinite(req.targetGainDb, 'target-gain-db');
  if (req.targetGainDb !== undefined && !(req.targetGainDb > 0)) throw new PlanError('bad_request', `target-gain-db must be > 0 dB (a passive resonator reflects at most 0 dB), got ${req.targetGainDb}`, 'target-gain-db');
  if (req.targetGainDb !== undefined && req.mode === 'line') throw new PlanError('bad_request', 'target-gain-db applies to cavity mode only', 'target-gain-db');
  checkFinite(req.ql, 'ql', true);
  checkFinite(req.qc, 'qc', true);
  checkFinite(req.bandHz, 'band', true);
  checkFinite(req.bandCentreHz, 'band-centre', true);
  checkFinite(req.pumpFrequencyHz, 'pump-frequency', true);
  checkFinite(req.detuningHz, 'detuning');
  checkFinite(req.temperatureK, 'temperature');
  if (req.temperatureK !== undefined && req.temperatureK < 0) throw new PlanError('bad_request', 'temperature must be ≥ 0 K', 'temperature');
  checkFinite(req.pumpPeriod, 'pump-period', true);
  checkFinite(req.thresholdPowerDbm, 'threshold-power-dbm');
  checkFinite(req.pumpLineZ0Ohm, 'pump-line-z0', true);
  checkFinite(req.coldStageLimitW, 'cold-stage-limit-w', true);
  for (const a of req.attenuationDb ?? []) if (!Number.isFinite(a) || a < 0) throw new PlanError('bad_request', `attenuation-db entries must be finite and ≥ 0 dB, got ${a}`, 'attenuation-db');
  if (req.pumpPeriod !== undefined && req.thresholdPowerDbm !== undefined) throw new PlanError('bad_request', 'give either pump-period (with attenuation-db) or threshold-power-dbm, not both', 'threshold-power-dbm');
  if (req.thresholdPowerDbm !== undefined && req.mode === 'line') throw new PlanError('bad_request', 'threshold-power-dbm applies to cavity mode only (a line has no threshold)', 'threshold-power-dbm');
  if (req.mode === 'cavity' && req.bandCentreHz !== undefined) throw new PlanError('bad_request', 'band-centre applies to line mode only (the cavity band is centred on f_p/2)', 'band-centre');
  if (req.mode === 'line' && req.detuningHz !== undefined) throw new PlanError('bad_request', 'detuning applies to cavity mode only', 'detuning');
  if (req.mode === 'line' && req.pumpFrequencyHz === undefined) throw new PlanError('bad_request', 'line mode needs pump-frequency', 'pump-frequency');
  if (req.ql !== undefined && req.qc !== undefined && req.qc < req.ql) throw new PlanError('bad_request', `qc (${req.qc}) must be ≥ ql (${req.ql}): 1/Q_i = 1/Q_l − 1/Q_c would be negative`, 'qc');
  if (req.waveform) {
    if (req.mode !== 'line') throw new PlanError('bad_request', 'waveform applies to line mode only', 'waveform');
    if (!req.waveform.some((t) => t.harmonic === 1 && t.amplitudePhi0 > 0)) throw new PlanError('bad_request', 'waveform needs a harmonic-1 tone with amplitude > 0', 'waveform');
    for (const t of req.waveform) if (!(Number.isInteger(t.harmonic) && t.harmonic >= 1 && t.harmonic <= 8 && Number.isFinite(t.amplitudePhi0))) throw new PlanError('bad_request', 'waveform tones need integer harmonic 1..8 and a finite amplitude', 'waveform');
  }
}

interface QualityFactors { ql: number; qc: number; source: 'given' | 'traces' | 'default'; extrapolated: boolean }

/** Linear interpolation of Q_l and Q_c among good traces (flag null), clamped outside their range. */
export function qualityFactorsAtBias(traces: readonly TraceJson[] | undefined, bias: number): { ql: number; qc: number; extrapolated: boolean } | null {
  const good = (traces ?? [])
    .filter((t) => t.flag === null && Number.isFinite(t.bias) && Number.isFinite(t.ql ?? NaN) && Number.isFinite(t.qc ?? NaN) && (t.ql as number) > 0 && (t.qc as number) > 0)
    .map((t) => ({ b: t.bias, ql: t.ql as number, qc: t.qc as number }))
    .sort((a, b) => a.b - b.b);
  if (good.length === 0) return null;
  if (bias <= good[0].b) return { ql: good[0].ql, qc: good[0].qc, extrapolated: bias < good[0].b };
  const last = good[good.length - 1];
  if (bias >= last.b) return { ql: last.ql, qc: last.qc, extrapolated: bias > last.b };
  let i = 1;
  while (good[i].b < bias) i++;
  const a = good[i - 1];
  const c = good[i];
  const w = c.b === a.b ? 0 : (bias - a.b) / (c.b - a.b);
  return { ql: a.ql + w * (c.ql - a.ql), qc: a.qc + w * (c.qc - a.qc), extrapolated: false };
}

function resolveQ(cal: CalibrationJson, req: PlanRequest, bias: number): QualityFactors {
  if (req.ql !== undefined && req.qc !== undefined) return { ql: req.ql, qc: req.qc, source: 'given', extrapolated: false };
  const fromTraces = qualityFactorsAtBias(cal.traces, bias);
  const base = fromTraces
    ? { ql: fromTraces.ql, qc: fromTraces.qc, source: 'traces' as const, extrapolated: fromTraces.extrapolated }
    : { ql: req.defaultQl ?? DEFAULT_QL, qc: req.defaultQc ?? DEFAULT_QC, source: 'default' as const, extrapolated: false };
  const ql = req.ql ?? base.ql;
  const qc = req.qc ?? base.qc;
  if (qc < ql) throw new PlanError('bad_request', `Q_c (${qc}) < Q_l (${ql}) at bias ${bias}: internal loss would be negative`, req.qc !== undefined ? 'qc' : 'ql');
  return { ql, qc, source: req.ql !== undefined || req.qc !== undefined ? 'given' : base.source, extrapolated: base.extrapolated };
}

function screening(cal: CalibrationJson, v: Values, kind: 'tuning' | 'phase'): number | null {
  for (const key of ['beta_l', 'screening_parameter', 'beta_L']) {
    const x = cal.derived?.[key];
    if (typeof x === 'number' && Number.isFinite(x)) return x;
  }
  const lLoop = cal.fixed?.loop_inductance_h;
  if (typeof lLoop !== 'number' || !(lLoop > 0)) return null;
  const z0 = cal.fixed?.z0_ohm ?? 50;
  let icSum: number;
  if (kind === 'tuning') icSum = criticalCurrentSum(v.gamma0, v.f0_hz, z0 as number);
  else icSum = FLUX_QUANTUM / (2 * Math.PI * v.tau_eff0_s * (z0 as number)); // L_s(0) = τ0·Z0
  return screeningParameter(lLoop, icSum / 2);
}

// ---------------------------------------------------------------------------------------------
// Root finding: first crossing of an increasing-on-average function on [lo, hi]

function solveRising(fn: (x: number) => number, target: number, lo: number, hi: number): number | null {
  const scan = 48;
  let a = lo;
  let fa = fn(a) - target;
  if (fa >= 0) return a;
  for (let i = 1; i <= scan; i++) {
    const b = lo + ((hi - lo) * i) / scan;
    const fb = fn(b) - target;
    if (Number.isFinite(fb) && fb >= 0) {
      // bisection to full precision (round trips must agree to 1e-9)
      let x0 = a;
      let x1 = b;
      for (let it = 0; it < 200 && x1 - x0 > 1e-15 * Math.max(Math.abs(x1), 1e-300); it++) {
        const m = 0.5 * (x0 + x1);
        const fm = fn(m) - target;
        if (fm >= 0 || !Number.isFinite(fm)) x1 = m;
        else x0 = m;
      }
      return 0.5 * (x0 + x1);
    }
    a = b;
    fa = fb;
  }
  return null;
}

// ---------------------------------------------------------------------------------------------
// Cavity mode

interface CavityPoint {
  f: number;
  dfdphi: number;
  d2f: number;
  slopeRad: number;
  kappa: number;
  kappaC: number;
}

function cavityPoint(dev: Device, phi: number, q: { ql: number; qc: number }): CavityPoint {
  const der = resonanceDerivatives(phi, dev.squid, 'exact');
  return {
    f: der.f,
    dfdphi: der.dfdphi,
    d2f: der.d2fdphi2,
    slopeRad: 2 * Math.PI * Math.abs(der.dfdphi),
    kappa: (2 * Math.PI * der.f) / q.ql,
    kappaC: (2 * Math.PI * der.f) / q.qc,
  };
}

interface CavityEval {
  deltaPhi: number;
  detuning: number; // rad/s
  shiftHz: number;
  pumpHz: number;
  drive: CavityDrive;
  pairRate: number;
  photonRate: number;
  intracavity: number;
  thresholdPhi: number;
  gain: number;
}

interface CavitySettings {
  fixedPumpHz: number | null;
  detuningRad: number;
  nth: number;
  bandHalfRad: number | null;
}

function cavityDetuning(pt: CavityPoint, s: CavitySettings, deltaPhi: number): number {
  if (s.fixedPumpHz === null) return s.detuningRad;
  return 2 * Math.PI * (pt.f + 0.25 * pt.d2f * deltaPhi * deltaPhi - s.fixedPumpHz / 2);
}

function cavityThreshold(pt: CavityPoint, s: CavitySettings): number | null {
  if (s.fixedPumpHz === null) return thresholdModulation(pt.kappa, s.detuningRad) / pt.slopeRad;
  return fixedPumpThreshold(pt.slopeRad, pt.kappa, cavityDetuning(pt, s, 0), (2 * Math.PI * pt.d2f) / 4);
}

/**
 * Threshold with the pump frequency fixed: Δ(δΦ) = Δ0 + c·δΦ² (c = 2π·f″/4, the pump shift), and
 * (s·δΦ/2)² = Δ(δΦ)² + κ²/4 is quadratic in u = δΦ²:  c²u² − (s²/4 − 2Δ0c)u + Δ0² + κ²/4 = 0.
 * Smallest positive root in the cancellation-free form u = 2C/(B + sqrt(B² − 4AC)); null when none.
 */
export function fixedPumpThreshold(slopeRad: number, kappa: number, detuning0: number, c: number): number | null {
  const A = c * c;
  const B = (slopeRad * slopeRad) / 4 - 2 * detuning0 * c;
  const C = detuning0 * detuning0 + (kappa * kappa) / 4;
  const disc = B * B - 4 * A * C;
  if (!(B > 0) || !(disc >= 0)) return null;
  return Math.sqrt((2 * C) / (B + Math.sqrt(disc)));
}

function cavityEvaluate(pt: CavityPoint, s: CavitySettings, deltaPhi: number, thresholdPhi: number): CavityEval {
  const detuning = cavityDetuning(pt, s, deltaPhi);
  const drive: CavityDrive = { kappa: pt.kappa, kappaC: pt.kappaC, deltaOmega: pt.slopeRad * deltaPhi, detuning };
  const nVac = vacuumOccupation(drive.deltaOmega, pt.kappa, detuning);
  let photonRate: number;
  if (s.bandHalfRad === null) photonRate = (2 * s.nth + 1) * pt.kappaC * nVac;
  else photonRate = (2 * s.nth + 1) * integrateSpectrum((nu) => vacuumOutputSpectrum(nu, drive), drive, s.bandHalfRad);
  const shiftHz = 0.25 * pt.d2f * deltaPhi * deltaPhi;
  const pumpHz = s.fixedPumpHz ?? 2 * (pt.f + shiftHz - detuning / (2 * Math.PI));
  return {
    deltaPhi, detuning, shiftHz, pumpHz, drive,
    pairRate: photonRate / 2,
    photonRate,
    intracavity: thermalOccupation(drive.deltaOmega, pt.kappa, detuning, s.nth),
    thresholdPhi,
    gain: signalGain(0, drive),
  };
}

/** Pump amplitude δΦ (Φ0) for the target; throws PlanError('above_threshold') when unreachable. */
function cavityInverse(pt: CavityPoint, s: CavitySettings, req: PlanRequest, thresholdPhi: number): number {
  const limit = thresholdPhi * (1 - 1e-9);
  let dp: number | null;
  if (req.targetPairRate !== undefined) {
    if (s.fixedPumpHz === null && s.bandHalfRad === null) {
      const nVac = (2 * req.targetPairRate) / ((2 * s.nth + 1) * pt.kappaC);
      dp = modulationForOccupation(nVac, pt.kappa, s.detuningRad) / pt.slopeRad;
    } else {
      dp = solveRising((x) => cavityEvaluate(pt, s, x, thresholdPhi).pairRate, req.targetPairRate, 0, limit);
    }
  } else {
    const g = 10 ** ((req.targetGainDb as number) / 10);
    if (s.fixedPumpHz === null) {
      const dw = modulationForCentreGain(g, pt.kappa, pt.kappaC, s.detuningRad);
      dp = dw === null ? null : dw / pt.slopeRad;
    } else {
      dp = solveRising((x) => cavityEvaluate(pt, s, x, thresholdPhi).gain, g, 0, limit);
    }
  }
  const what = req.targetPairRate !== undefined ? `target pair rate ${req.targetPairRate} /s` : `target gain ${req.targetGainDb} dB`;
  if (dp === null || !Number.isFinite(dp)) {
    throw new PlanError('above_threshold', `${what} cannot be reached below the parametric-oscillation threshold (δω would have to reach δω_th = ${thresholdPhi.toPrecision(4)} Φ0 × |dω_r/dΦ|); lower the target`, req.targetPairRate !== undefined ? 'target-pair-rate' : 'target-gain-db');
  }
  if (dp >= limit) {
    throw new PlanError('above_threshold', `${what} needs δω ≥ δω_th (δΦ/δΦ_th = ${(dp / thresholdPhi).toFixed(12)}): at or above the parametric-oscillation threshold, where the below-threshold theory does not apply; lower the target`, req.targetPairRate !== undefined ? 'target-pair-rate' : 'target-gain-db');
  }
  return dp;
}

// ---------------------------------------------------------------------------------------------
// Line mode

interface LineSettings {
  fpHz: number;
  lo: number;
  hi: number;
  nthOmega: ((omega: number) => number) | null;
  tones: PumpTone[] | null; // relative, harmonic-1 amplitude normalised to 1
}

/** Excess photons/s in band per δτ² = 1 s² for a tone at k·f_p. */
function lineUnitBandRate(s: LineSettings, k = 1): number {
  const fp = k * s.fpHz;
  return s.nthOmega ? lineBandRateThermal(fp, 1, s.lo, s.hi, s.nthOmega) : lineBandRateVacuum(fp, 1, s.lo, s.hi);
}

function lineHarmonics(dev: Device, phi: number, s: LineSettings, scale: number): number[] {
  const tones = (s.tones as PumpTone[]).map((t) => ({ ...t, amplitudePhi0: t.amplitudePhi0 * scale }));
  return delayHarmonics((x) => effectiveDelayDerivatives(x, dev.squid).tau, phi, tones);
}

function linePhotonRateFromHarmonics(h: readonly number[], s: LineSettings, unit: number[]): number {
  let r = 0;
  for (let k = 1; k < h.length; k++) if (h[k] > 0) r += h[k] * h[k] * unit[k];
  return r;
}

// ---------------------------------------------------------------------------------------------
// Public API

/** Plan a drive for one operating point; dispatches on request.mode. */
export function planFromCalibration(calibration: CalibrationJson, request: PlanRequest): PlanResult {
  return request.mode === 'line' ? planLine(calibration, request) : planCavity(calibration, request);
}

function operatingPoint(cal: CalibrationJson, dev: Device, req: PlanRequest): { phi: number; bias: number } {
  if (req.fluxPhi0 !== undefined) return { phi: req.fluxPhi0, bias: dev.offset + dev.period * req.fluxPhi0 };
  const bias = req.bias as number;
  if (!(dev.period !== 0 && Number.isFinite(dev.period))) throw new PlanError('calibration_incomplete', 'calibration flux_period is zero', 'calibration');
  return { phi: fluxFromBias(bias, dev.period, dev.offset), bias };
}

function baseWarnings(phi: number, dp: number, req: PlanRequest, betaL: number | null, nth: number, q: QualityFactors | null): PlanWarning[] {
  const w: PlanWarning[] = [];
  if (dp > LINEAR_RESPONSE_LIMIT_PHI0) w.push({ code: 'beyond_linear_response', message: `pump amplitude δΦ = ${dp.toPrecision(3)} Φ0 exceeds ${LINEAR_RESPONSE_LIMIT_PHI0} Φ0: the linear-response formulas (slope × δΦ) become unreliable` });
  const margin = req.lobeMarginPhi0 ?? DEFAULT_LOBE_MARGIN_PHI0;
  const closest = Math.min(lobeEdgeDistance(phi + dp), lobeEdgeDistance(phi - dp), dp >= lobeEdgeDistance(phi) ? 0 : Infinity);
  if (closest < margin) w.push({ code: 'near_lobe_edge', message: `the pump swings the flux to within ${closest.toPrecision(2)} Φ0 of the lobe edge (|Φ| → 0.5 Φ0; margin ${margin} Φ0), where the SQUID inductance diverges` });
  if (betaL !== null && betaL > HYSTERESIS_BETA_L) w.push({ code: 'hysteretic_squid', message: `screening parameter β_L = ${betaL.toPrecision(3)} > 2/π: the flux response is hysteretic; bias from one sweep direction and expect jumps` });
  if (nth > THERMAL_OCCUPATION_LIMIT) w.push({ code: 'thermal_occupation', message: `thermal occupation n_th = ${nth.toPrecision(3)} at the signal frequency is not negligible (> ${THERMAL_OCCUPATION_LIMIT}); the rate includes the (2 n_th + 1) stimulated enhancement` });
  if (q?.source === 'default') w.push({ code: 'default_quality_factors', message: `no Q given and none in the calibration traces: using defaults Q_l = ${q.ql}, Q_c = ${q.qc}` });
  if (q?.extrapolated) w.push({ code: 'quality_factors_extrapolated', message: 'operating bias lies outside the biases of the calibration traces: Q_l, Q_c taken from the nearest trace' });
  return w;
}

interface PowerOutcome {
  pump_current_a: number | null;
  power_at_chip_dbm: number | null;
  generator_power_dbm: number | null;
  stage_dissipation: PlanResult['stage_dissipation'];
  caution: CautionObject | null;
}

function powerOutcome(req: PlanRequest, dp: number, thresholdPhi: number | null): PowerOutcome {
  const none: PowerOutcome = { pump_current_a: null, power_at_chip_dbm: null, generator_power_dbm: null, stage_dissipation: null, caution: null };
  const stages = req.attenuationDb ?? [];
  const total = stages.reduce((a, b) => a + b, 0);
  let genW: number;
  let chipW: number | null = null;
  let current: number | null = null;
  if (req.pumpPeriod !== undefined) {
    current = pumpCurrentForFlux(dp, req.pumpPeriod);
    chipW = incidentPowerForShortCurrent(current, req.pumpLineZ0Ohm ?? 50);
    genW = chipW * 10 ** (total / 10);
  } else if (req.thresholdPowerDbm !== undefined && thresholdPhi !== null) {
    genW = dbmToWatts(req.thresholdPowerDbm) * (dp / thresholdPhi) ** 2;
    if (stages.length > 0) chipW = genW * 10 ** (-total / 10);
  } else {
    return none;
  }
  const diss = stages.length > 0 ? stageDissipation(genW, stages, chipW ?? 0, req.stageNames) : null;
  let caution: CautionObject | null = null;
  const limit = req.coldStageLimitW ?? DEFAULT_COLD_STAGE_LIMIT_W;
  const coldest = diss ? diss[diss.length - 1] : null;
  const coldW = coldest ? coldest.dissipated_w : chipW;
  if (coldW !== null && coldW > limit) {
    caution = {
      coldest_stage: coldest ? coldest.stage : 'chip',
      coldest_stage_dissipation_w: coldW,
      limit_w: limit,
      text: `Estimated pump dissipation at the coldest stage (${coldW.toPrecision(3)} W, counting the reflected pump there) exceeds the lab-set limit of ${limit} W. This is a rough estimate: defer to the lab's own rules for cryostat and RF safety.`,
    };
  }
  return {
    pump_current_a: current,
    power_at_chip_dbm: chipW !== null ? wattsToDbm(chipW) : null,
    generator_power_dbm: wattsToDbm(genW),
    stage_dissipation: diss,
    caution,
  };
}

function emptyResult(mode: PlanResult['mode']): PlanResult {
  return {
    mode, operating_flux_phi0: NaN, operating_bias: null, resonance_hz: null, pump_frequency_hz: NaN,
    pump_frequency_shift_hz: null, detuning_hz: null, pump_amplitude_phi0: NaN, threshold_amplitude_phi0: null,
    drive_ratio: null, threshold_ratio: null, predicted_pair_rate: NaN, photon_rate: NaN, intracavity_photons: null,
    gain_db: null, veff_over_v: null, delta_tau_s: null, tau_eff_s: null, total_photon_rate: null,
    both_in_band_pair_rate: null, band_hz: null, ql: null, qc: null, qi: null, q_source: null,
    kappa_over_2pi_hz: null, slope_hz_per_phi0: null, curvature_hz_per_phi0_sq: null, dtau_dphi_s_per_phi0: null,
    n_thermal: 0, temperature_k: 0, beta_l: null, pump_current_a: null, power_at_chip_dbm: null,
    generator_power_dbm: null, stage_dissipation: null, caution: null, context: null, harmonics_delta_tau_s: null,
    warnings: [], uncertainty: null, conventions: CONVENTIONS,
  };
}

/** Cavity-mode plan (resonator pumped near 2f_r). */
export function planCavity(calibration: CalibrationJson, request: PlanRequest): PlanResult {
  const req = { ...request, mode: 'cavity' as const };
  validateRequest(req);
  const kind = deviceKind(calibration);
  if (kind !== 'tuning') throw new PlanError('model_mismatch', 'cavity mode needs a tuning-curve calibration (model exact or approx); this calibration is a phase-versus-flux fit', 'mode');
  const values = calibrationValues(calibration);
  const dev = deviceFromValues(kind, values);
  const { phi, bias } = operatingPoint(calibration, dev, req);
  const q = resolveQ(calibration, req, bias);
  const pt = cavityPoint(dev, phi, q);
  if (!(pt.f > 0) || !(pt.slopeRad > 0)) {
    throw new PlanError('zero_slope', `|df_r/dΦ| = 0 at Φ = ${phi} Φ0 (sweet spot or lobe edge): a flux pump gives no first-order modulation here; choose another bias`, req.fluxPhi0 !== undefined ? 'flux' : 'bias');
  }
  const tK = req.temperatureK ?? 0;
  const settings: CavitySettings = {
    fixedPumpHz: req.pumpFrequencyHz ?? null,
    detuningRad: 2 * Math.PI * (req.detuningHz ?? 0),
    nth: 0,
    bandHalfRad: req.bandHz !== undefined ? Math.PI * req.bandHz : null,
  };
  // Signal near ω_p/2 ≈ ω_r (linewidths ≪ k_BT/h, so n_th is flat across the line).
  settings.nth = thermalOcc(settings.fixedPumpHz !== null ? settings.fixedPumpHz / 2 : pt.f - (req.detuningHz ?? 0), tK);
  const thresholdPhi = cavityThreshold(pt, settings);
  if (thresholdPhi === null) throw new PlanError('above_threshold', `with the pump fixed at ${req.pumpFrequencyHz} Hz the threshold is not reached below 1 Φ0; the pump is too far detuned`, 'pump-frequency');
  const dp = cavityInverse(pt, settings, req, thresholdPhi);
  const ev = cavityEvaluate(pt, settings, dp, thresholdPhi);
  const betaL = screening(calibration, values, kind);
  const warnings = baseWarnings(phi, dp, req, betaL, settings.nth, q);
  const ratio = dp / thresholdPhi;
  if (ratio > NEAR_THRESHOLD_RATIO) warnings.unshift({ code: 'near_threshold', message: `δΦ/δΦ_th = ${ratio.toFixed(3)} > ${NEAR_THRESHOLD_RATIO}: the rate is very sensitive to pump amplitude and to drifts of Q and flux` });
  const power = powerOutcome(req, dp, thresholdPhi);
  if (power.caution) warnings.push({ code: 'cold_stage_power', message: power.caution.text });
  const res: PlanResult = {
    ...emptyResult('cavity'),
    operating_flux_phi0: phi,
    operating_bias: bias,
    resonance_hz: pt.f,
    pump_frequency_hz: ev.pumpHz,
    pump_frequency_shift_hz: ev.shiftHz,
    detuning_hz: ev.detuning / (2 * Math.PI),
    pump_amplitude_phi0: dp,
    threshold_amplitude_phi0: thresholdPhi,
    drive_ratio: ev.drive.deltaOmega / pt.kappa,
    threshold_ratio: ratio,
    predicted_pair_rate: ev.pairRate,
    photon_rate: ev.photonRate,
    intracavity_photons: ev.intracavity,
    gain_db: 10 * Math.log10(ev.gain),
    band_hz: req.bandHz !== undefined ? { low: ev.pumpHz / 2 - req.bandHz / 2, high: ev.pumpHz / 2 + req.bandHz / 2 } : null,
    ql: q.ql, qc: q.qc, qi: 1 / (1 / q.ql - 1 / q.qc), q_source: q.source,
    kappa_over_2pi_hz: pt.kappa / (2 * Math.PI),
    slope_hz_per_phi0: pt.dfdphi,
    curvature_hz_per_phi0_sq: pt.d2f,
    n_thermal: settings.nth,
    temperature_k: tK,
    beta_l: betaL,
    ...power,
    warnings,
  };
  const draws = req.uncertaintyDraws ?? DEFAULT_DRAWS;
  if (draws > 0) {
    const squid: SquidLineParams = { ...dev.squid };
    res.uncertainty = sampleUncertainty(calibration, kind, values, req, draws, (v) => {
      squid.f0Hz = v.f0_hz;
      squid.gamma0 = v.gamma0;
      squid.asymmetry = Math.abs(v.asymmetry);
      squid.csOverCr = v.cs_over_cr ?? 0;
      const phiD = req.fluxPhi0 !== undefined ? req.fluxPhi0 : fluxFromBias(bias, v.flux_period, v.flux_offset);
      const p = cavityPoint({ kind, squid, period: v.flux_period, offset: v.flux_offset }, phiD, q);
      if (!(p.slopeRad > 0) || !(p.f > 0)) return null;
      const th = cavityThreshold(p, settings);
      if (th === null) return null;
      if (!(dp < th)) return { rate: Infinity, threshold: th };
      if (settings.fixedPumpHz === null && settings.bandHalfRad === null) {
        // closed form, as in cavityEvaluate
        const nVac = vacuumOccupation(p.slopeRad * dp, p.kappa, settings.detuningRad);
        return { rate: ((2 * settings.nth + 1) * p.kappaC * nVac) / 2, threshold: th };
      }
      return { rate: cavityEvaluate(p, settings, dp, th).pairRate, threshold: th };
    }, 'pump amplitude δΦ, Q_l, Q_c and the requested detuning (the pump is re-centred on each draw\'s resonance unless a pump frequency was given)');
    if (res.uncertainty === null) res.warnings.push({ code: 'no_covariance', message: 'the calibration has no usable covariance: no uncertainty estimate' });
  }
  return res;
}

/** Line-mode plan (SQUID terminating a long line, broadband emission). */
export function planLine(calibration: CalibrationJson, request: PlanRequest): PlanResult {
  const req = { ...request, mode: 'line' as const };
  validateRequest(req);
  const kind = deviceKind(calibration);
  const values = calibrationValues(calibration);
  const dev = deviceFromValues(kind, values);
  const { phi, bias } = operatingPoint(calibration, dev, req);
  const fp = req.pumpFrequencyHz as number;
  const omegaP = 2 * Math.PI * fp;
  const centre = req.bandCentreHz ?? fp / 2;
  const width = req.bandHz ?? fp;
  const lo = Math.max(0, centre - width / 2);
  const hi = centre + width / 2;
  const tK = req.temperatureK ?? 0;
  const settings: LineSettings = {
    fpHz: fp, lo, hi, nthOmega: thermalOfOmega(tK),
    tones: req.waveform ? normaliseTones(req.waveform) : null,
  };
  const der = effectiveDelayDerivatives(phi, dev.squid);
  const slope = Math.abs(der.dtaudphi);
  if (!(slope > 0) || !Number.isFinite(der.tau)) {
    throw new PlanError('zero_slope', `|dτ_eff/dΦ| = 0 at Φ = ${phi} Φ0 (sweet spot or lobe edge): no first-order modulation; choose another bias`, req.fluxPhi0 !== undefined ? 'flux' : 'bias');
  }
  const target = req.targetPairRate as number;
  const unit: number[] = [0];
  for (let k = 1; k <= 16; k++) unit.push(settings.tones ? lineUnitBandRate(settings, k) : k === 1 ? lineUnitBandRate(settings, 1) : 0);
  if (!(unit[1] > 0) && !settings.tones) throw new PlanError('bad_request', `the detection band [${lo}, ${hi}] Hz contains no emission (photons are emitted below f_p = ${fp} Hz)`, 'band');
  let dp: number;
  let harmonics: number[];
  if (!settings.tones) {
    const dtau = Math.sqrt((2 * target) / unit[1]);
    dp = dtau / slope;
    harmonics = [der.tau, dtau];
  } else {
    // δτ_k scale with the waveform amplitude; find the scale s (Φ0, amplitude of the harmonic-1 tone).
    const rate = (s: number) => linePhotonRateFromHarmonics(lineHarmonics(dev, phi, settings, s), settings, unit) / 2;
    const guess = Math.sqrt((2 * target) / Math.max(unit[1], 1e-300)) / slope;
    let top = Math.max(guess, 1e-9);
    while (rate(top) < target && top < 0.5) top *= 2;
    const s = solveRising(rate, target, 0, Math.min(top, 0.5));
    if (s === null) throw new PlanError('unreachable', `target pair rate ${target} /s needs a pump waveform beyond 0.5 Φ0 amplitude`, 'target-pair-rate');
    dp = s;
    harmonics = lineHarmonics(dev, phi, settings, s);
  }
  const dtau = harmonics[1];
  const photonRate = settings.tones ? linePhotonRateFromHarmonics(harmonics, settings, unit) : dtau * dtau * unit[1];
  // Both partners in band: pairs at (f, f_p − f) with f and f_p − f inside [lo, hi].
  const mirLo = Math.max(lo, fp - hi);
  const mirHi = Math.min(hi, fp - lo);
  const bothRate = mirHi > mirLo ? (dtau * dtau * (settings.nthOmega ? lineBandRateThermal(fp, 1, mirLo, mirHi, settings.nthOmega) : lineBandRateVacuum(fp, 1, mirLo, mirHi))) / 2 : 0;
  const total = lineTotalRate(omegaP, dtau);
  const nth = thermalOcc(centre, tK);
  const betaL = screening(calibration, values, kind);
  const warnings = baseWarnings(phi, peakExcursion(settings.tones, dp), req, betaL, nth, null);
  if (Math.abs(centre - fp / 2) > 1e-9 * fp || hi > fp) warnings.push({ code: 'band_asymmetric', message: 'the detection band is not symmetric about f_p/2 inside (0, f_p): some partners fall outside it; predicted_pair_rate counts photons in band / 2, both_in_band_pair_rate counts pairs with both partners detected' });
  // Tones at different frequencies carry additive power: the power-equivalent amplitude is sqrt(Σ A_k²).
  const power = powerOutcome(req, settings.tones ? dp * Math.hypot(...settings.tones.map((t) => t.amplitudePhi0)) : dp, null);
  if (power.caution) warnings.push({ code: 'cold_stage_power', message: power.caution.text });
  const v = req.phaseVelocityMPerS ?? (typeof calibration.fixed?.phase_velocity_m_s === 'number' ? (calibration.fixed.phase_velocity_m_s as number) : null);
  const mirrorA = mirrorAmplitudeForRate(total, omegaP, SPEED_OF_LIGHT);
  const context: Record<string, unknown> = {
    reference: 'one-sided line: total rate is half the two-faced moving-mirror rate (Omega/6pi)(v/c)^2 of Lambrecht, Jaekel, Reynaud, PRL 77, 615 (1996) [from memory]',
    one_sided_over_two_faced: lineTotalRate(omegaP, dtau) / twoFacedMirrorRate(dtau * SPEED_OF_LIGHT, omegaP, SPEED_OF_LIGHT),
    mechanical_mirror_amplitude_m: mirrorA,
    mechanical_mirror_peak_velocity_m_s: mirrorA * omegaP,
    effective_length_m: v !== null ? der.tau * v : null,
    effective_length_modulation_m: v !== null ? dtau * v : null,
    peak_spectral_density_per_hz: dtau * dtau * (omegaP / 2) ** 2,
  };
  const res: PlanResult = {
    ...emptyResult('line'),
    operating_flux_phi0: phi,
    operating_bias: bias,
    resonance_hz: null,
    pump_frequency_hz: fp,
    pump_amplitude_phi0: dp,
    predicted_pair_rate: photonRate / 2,
    photon_rate: photonRate,
    veff_over_v: veffOverV(omegaP, dtau),
    delta_tau_s: dtau,
    tau_eff_s: der.tau,
    total_photon_rate: total,
    both_in_band_pair_rate: bothRate,
    band_hz: { low: lo, high: hi },
    dtau_dphi_s_per_phi0: der.dtaudphi,
    n_thermal: nth,
    temperature_k: tK,
    beta_l: betaL,
    harmonics_delta_tau_s: settings.tones ? harmonics.slice(1) : null,
    ...power,
    context,
    warnings,
  };
  const draws = req.uncertaintyDraws ?? DEFAULT_DRAWS;
  if (draws > 0) {
    res.uncertainty = sampleUncertainty(calibration, kind, values, req, draws, (vals) => {
      const d = deviceFromValues(kind, vals);
      const phiD = req.fluxPhi0 !== undefined ? req.fluxPhi0 : fluxFromBias(bias, d.period, d.offset);
      if (settings.tones) {
        return { rate: linePhotonRateFromHarmonics(lineHarmonics(d, phiD, settings, dp), settings, unit) / 2, threshold: null };
      }
      const dt = Math.abs(effectiveDelayDerivatives(phiD, d.squid).dtaudphi) * dp;
      return { rate: (dt * dt * unit[1]) / 2, threshold: null };
    }, 'pump amplitude δΦ, pump frequency and detection band');
    if (res.uncertainty === null) res.warnings.push({ code: 'no_covariance', message: 'the calibration has no usable covariance: no uncertainty estimate' });
  }
  return res;
}

function normaliseTones(tones: readonly PumpTone[]): PumpTone[] {
  const a1 = tones.filter((t) => t.harmonic === 1).reduce((s, t) => s + t.amplitudePhi0, 0);
  return tones.map((t) => ({ ...t, amplitudePhi0: t.amplitudePhi0 / a1 }));
}

function peakExcursion(tones: PumpTone[] | null, scale: number): number {
  if (!tones) return scale;
  return scale * tones.reduce((s, t) => s + Math.abs(t.amplitudePhi0), 0);
}

// ---------------------------------------------------------------------------------------------
// Uncertainty

function sampleUncertainty(
  cal: CalibrationJson, kind: 'tuning' | 'phase', values: Values, req: PlanRequest, draws: number,
  evaluate: (v: Values) => { rate: number; threshold: number | null } | null, heldFixed: string,
): UncertaintySummary | null {
  const cov = cal.covariance;
  if (!cov || !Array.isArray(cov.names) || cov.names.length === 0) return null;
  const names = cov.names;
  const m = cov.matrix;
  if (!Array.isArray(m) || m.length !== names.length || m.some((r) => !Array.isArray(r) || r.length !== names.length || r.some((x) => !Number.isFinite(x)))) return null;
  const fac = factorCovariance(m);
  if (!fac) return null;
  const seed = req.seed ?? DEFAULT_SEED;
  const normal = normalSource(seededRandom(seed));
  const rates: number[] = [];
  const ths: number[] = [];
  let rejected = 0;
  const n = names.length;
  const z = new Array<number>(n);
  const v: Values = { ...values };
  for (let i = 0; i < draws; i++) {
    for (let j = 0; j < n; j++) z[j] = normal();
    // one scratch object reused across draws (evaluate() must not keep it)
    for (let a = 0; a < n; a++) {
      let d = 0;
      const row = fac.factor[a];
      for (let b = 0; b <= a; b++) d += row[b] * z[b];
      v[names[a]] = (values[names[a]] ?? 0) + d;
    }
    if (kind === 'tuning' ? !(v.gamma0 > 0 && v.f0_hz > 0) : !(v.tau_eff0_s > 0)) { rejected++; continue; }
    if (!(Math.abs(v.asymmetry ?? 0) <= 1) || !(v.flux_period !== 0)) { rejected++; continue; }
    const r = evaluate(v);
    if (!r || Number.isNaN(r.rate)) { rejected++; continue; }
    rates.push(r.rate);
    if (r.threshold !== null) ths.push(r.threshold);
  }
  if (rates.length === 0) return null;
  rates.sort((a, b) => a - b);
  ths.sort((a, b) => a - b);
  const th = (p: number) => (ths.length > 0 ? percentile(ths, p) : null);
  return {
    draws, rejected, seed, method: fac.method, jitter: fac.jitter, parameters: names,
    pair_rate_p16: percentile(rates, 16), pair_rate_p50: percentile(rates, 50), pair_rate_p84: percentile(rates, 84),
    threshold_amplitude_p16_phi0: th(16), threshold_amplitude_p50_phi0: th(50), threshold_amplitude_p84_phi0: th(84),
    held_fixed: heldFixed,
  };
}

// ---------------------------------------------------------------------------------------------
// Operating-point ranking

export interface RankOptions {
  /** Bias points scanned across the calibrated range (≥ 200 enforced). */
  points?: number;
  /** How many ranked points to return. */
  top?: number;
  /** Uncertainty (calibration draws) is computed for this many of the best points only. */
  uncertaintyTop?: number;
  /** Flux-noise amplitude for the noise criterion, Φ0 rms (default RANK_FLUX_NOISE_PHI0). */
  fluxNoisePhi0?: number;
}

export const RANK_WEIGHTS = { power: 0.3, margin: 0.25, fluxNoise: 0.3, quality: 0.15 } as const;
export const RANK_WARNING_PENALTY = 0.1;
/** Each this many dB of pump power above the scan's lowest costs a full power score. */
export const RANK_POWER_SPAN_DB = 40;
/** Low-frequency flux-noise amplitude used to judge flux-noise sensitivity, Φ0 rms (order of magnitude, common practice). */
export const RANK_FLUX_NOISE_PHI0 = 1e-5;
/** Jitter at which S_noise = 1/2: frequency jitter / linewidth (cavity), reflected-phase jitter in rad (line). */
export const RANK_NOISE_HALF_CAVITY = 0.1;
export const RANK_NOISE_HALF_LINE_RAD = 0.01;
export const RANK_SCORING =
  'score = 0.3·S_power + 0.25·S_margin + 0.3·S_noise + 0.15·S_Q − 0.1 per serious warning, each S in [0, 1]: ' +
  'S_power = 1 − (P − P_min)/40 dB, clamped (P = generator power in dBm, or 20·log10 δΦ when no power chain is given); ' +
  'S_margin = 1 − δΦ/δΦ_th (cavity); S_noise = 1/(1 + (j/j_half)²) with flux noise Φ_n = 1e-5 Φ0 rms: cavity j = |df_r/dΦ|·Φ_n/(κ/2π), ' +
  'j_half = 0.1; line j = (ω_p/2)·|dτ_eff/dΦ|·Φ_n (reflected-phase jitter, rad), j_half = 0.01; S_Q = Q_i/max Q_i over the scan (cavity). ' +
  'Line mode has no threshold or Q: their weights move to power. Serious warnings: near_threshold, beyond_linear_response, ' +
  'near_lobe_edge, hysteretic_squid, cold_stage_power. Power and flux-noise pull in opposite directions (δΦ ∝ 1/slope).';

const SERIOUS = new Set(['near_threshold', 'beyond_linear_response', 'near_lobe_edge', 'hysteretic_squid', 'cold_stage_power']);

/**
 * The bias range a calibration covers (its points and traces), the span the ranking scans and the
 * app's bias slider offers; without data, ±0.45 period around the offset.
 */
export function calibratedBiasRange(cal: CalibrationJson): [number, number] {
  const b: number[] = [];
  for (const p of cal.points ?? []) if (Number.isFinite(p.bias)) b.push(p.bias);
  for (const t of cal.traces ?? []) if (Number.isFinite(t.bias)) b.push(t.bias);
  if (b.length >= 2) {
    const lo = Math.min(...b);
    const hi = Math.max(...b);
    if (hi > lo) return [lo, hi];
  }
  const period = cal.params.flux_period?.value ?? 1;
  const offset = cal.params.flux_offset?.value ?? 0;
  const a = offset - 0.45 * period;
  const c = offset + 0.45 * period;
  return [Math.min(a, c), Math.max(a, c)];
}

const clamp01 = (x: number) => (Number.isFinite(x) ? Math.min(1, Math.max(0, x)) : 0);

/** Scan the calibrated bias range, plan at each point, rank. The request's flux/bias is ignored. */
export function rankOperatingPoints(calibration: CalibrationJson, request: PlanRequest, options: RankOptions = {}): RankResult {
  const kind = deviceKind(calibration);
  const values = calibrationValues(calibration);
  const dev = deviceFromValues(kind, values);
  const nPts = Math.max(200, Math.floor(options.points ?? 200));
  const top = Math.max(1, Math.floor(options.top ?? 5));
  const uTop = Math.max(0, Math.floor(options.uncertaintyTop ?? 3));
  const [b0, b1] = calibratedBiasRange(calibration);
  const base: PlanRequest = { ...request, fluxPhi0: undefined, bias: b0, uncertaintyDraws: 0 };
  validateRequest(base); // bad options surface once, before the scan
  const plans: PlanResult[] = [];
  const refused: Record<string, number> = {};
  for (let i = 0; i < nPts; i++) {
    const bias = b0 + ((b1 - b0) * i) / (nPts - 1);
    try {
      plans.push(planFromCalibration(calibration, { ...base, bias }));
    } catch (e) {
      if (!(e instanceof PlanError) || e.code === 'bad_request') throw e;
      refused[e.code] = (refused[e.code] ?? 0) + 1;
    }
  }
  const cavity = request.mode === 'cavity';
  const powerDb = plans.map((p) => p.generator_power_dbm ?? 20 * Math.log10(p.pump_amplitude_phi0));
  const margin = plans.map((p) => (p.threshold_ratio !== null ? 1 - p.threshold_ratio : 0));
  const phiN = options.fluxNoisePhi0 ?? RANK_FLUX_NOISE_PHI0;
  const noise = plans.map((p) => (cavity ? Math.abs(p.slope_hz_per_phi0 ?? 0) : Math.PI * p.pump_frequency_hz * Math.abs(p.dtau_dphi_s_per_phi0 ?? 0)));
  const jitter = plans.map((p, i) => (cavity ? (noise[i] * phiN) / (p.kappa_over_2pi_hz as number) / RANK_NOISE_HALF_CAVITY : (noise[i] * phiN) / RANK_NOISE_HALF_LINE_RAD));
  const quality = plans.map((p) => p.qi ?? 0);
  const pMin = Math.min(...powerDb);
  const qMax = Math.max(...quality);
  const w = cavity ? RANK_WEIGHTS : { power: RANK_WEIGHTS.power + RANK_WEIGHTS.margin + RANK_WEIGHTS.quality, margin: 0, fluxNoise: RANK_WEIGHTS.fluxNoise, quality: 0 };
  const scored = plans.map((p, i) => {
    const sp = clamp01(1 - (powerDb[i] - pMin) / RANK_POWER_SPAN_DB);
    const sm = clamp01(margin[i]);
    const sn = 1 / (1 + jitter[i] * jitter[i]);
    const sq = qMax > 0 ? clamp01(quality[i] / qMax) : 0;
    const seriousCodes = p.warnings.filter((x) => SERIOUS.has(x.code)).map((x) => x.code);
    const score = w.power * sp + w.margin * sm + w.fluxNoise * sn + w.quality * sq - RANK_WARNING_PENALTY * seriousCodes.length;
    return { p, i, score, seriousCodes };
  });
  scored.sort((a, b) => b.score - a.score || a.i - b.i);
  const best = scored.slice(0, top);
  const points: RankedPoint[] = best.map((s, k) => {
    const p = s.p;
    const reasons: string[] = [];
    const above = powerDb[s.i] - pMin;
    reasons.push(p.generator_power_dbm !== null
      ? `generator power ${p.generator_power_dbm.toFixed(1)} dBm (${above.toFixed(1)} dB above the scan's lowest)`
      : `pump amplitude ${p.pump_amplitude_phi0.toPrecision(3)} Φ0 (${above.toFixed(1)} dB above the scan's lowest)`);
    if (cavity) reasons.push(`threshold margin ${(margin[s.i] * 100).toFixed(1)} % (δΦ/δΦ_th = ${(p.threshold_ratio ?? NaN).toFixed(3)})`);
    reasons.push(cavity
      ? `flux-noise sensitivity |df/dΦ| = ${(noise[s.i] / 1e6).toPrecision(4)} MHz/Φ0: ${phiN} Φ0 of flux noise moves f_r by ${((noise[s.i] * phiN) / (p.kappa_over_2pi_hz as number)).toPrecision(2)} linewidths`
      : `reflected-phase sensitivity ${noise[s.i].toPrecision(3)} rad/Φ0 at the band centre (${(noise[s.i] * phiN).toPrecision(2)} rad for ${phiN} Φ0 of flux noise)`);
    if (cavity && p.qi !== null) reasons.push(`Q_i = ${p.qi.toPrecision(3)} (${p.q_source})`);
    if (s.seriousCodes.length > 0) reasons.push(`warnings: ${s.seriousCodes.join(', ')}`);
    let plan = p;
    if (k < uTop && (request.uncertaintyDraws ?? DEFAULT_DRAWS) > 0) {
      plan = planFromCalibration(calibration, { ...request, fluxPhi0: undefined, bias: p.operating_bias as number });
    }
    return { rank: k + 1, bias: p.operating_bias as number, operating_flux_phi0: p.operating_flux_phi0, score: s.score, reasons, plan };
  });
  return { mode: request.mode, scanned: nPts, feasible: plans.length, bias_range: [b0, b1], scoring: RANK_SCORING, points, refused };
}
