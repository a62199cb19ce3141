/**
 * Helpers shared by the tuning-curve and phase-versus-flux fits: input checks, robust
 * statistics, the dominant period of a sampled curve, phase unwrapping, offset convention.
 */
import FFT from 'fft.js';
import type { FittedPoint } from '../contract';
import type { FitResult, Loss, ParameterSpec } from '../fit/types';
import { robustCost as engineCost } from '../fit/loss';
import { median, robustSigma, secondDifferenceSigma } from '../util/stats';

// The engine's own loss and the shared robust statistics, re-exported for the fits and callers.
export { rho, robustCost } from '../fit/loss';
export { median, robustSigma } from '../util/stats';

/** Bad input: says what is wrong and at which point (0-based index into the given points). */
export class TuningInputError extends Error {
  constructor(message: string, public readonly index: number | null = null, public readonly field: string | null = null) {
    super(message);
    this.name = 'TuningInputError';
  }
}

/**
 * Noise scale of fitted residuals, robust and efficient: a first pass with 1.4826·MAD, then the
 * RMS of the points within 5 of those, both with the degrees-of-freedom correction n/(n − nvarys)
 * (each fitted residual has variance σ²(1 − h_ii), Σh_ii = nvarys: common practice for the residual
 * standard error). The MAD alone is unbiased but noisy for a few dozen points (about 37 % efficiency),
 * enough to flag ordinary 2.5σ points as outliers; the larger of the two passes is returned.
 */
export function residualScale(residuals: ArrayLike<number>, nvarys: number): number {
  const n = residuals.length;
  const s1 = robustSigma(residuals) * Math.sqrt(n / Math.max(n - nvarys, 1));
  let ss = 0;
  let m = 0;
  for (let i = 0; i < n; i++) {
    const r = residuals[i];
    if (Math.abs(r) <= 5 * s1) {
      ss += r * r;
      m++;
    }
  }
  const s2 = m > nvarys ? Math.sqrt(ss / (m - nvarys)) : 0;
  return Math.max(s1, s2);
}

/**
 * Scale of the outlier rule for σ-weighted residuals r_i/σ_i (residualScale). With σ given by the
 * caller, a point within 5 given σ is never an outlier: the scale is at least 1.
 */
export function outlierScale(weighted: ArrayLike<number>, nvarys: number, sigmaGiven: boolean): number {
  const s = residualScale(weighted, nvarys);
  return Math.max(sigmaGiven ? Math.max(s, 1) : s, 1e-300);
}

/**
 * The starts to refine, best score first, spread over the candidate periods: with less than a
 * period of data the period estimates disagree and the best-scoring ones may all share one wrong
 * period (differing only in d), so first up to ⌈count/2⌉ starts of distinct periods (2 %) are
 * taken, then the set is filled with distinct (period, d) pairs.
 */
export function chooseStarts<S extends { period: number; d: number }>(ranked: readonly S[], count: number): S[] {
  const chosen: S[] = [];
  const samePeriod = (a: S, b: S) => Math.abs(a.period / b.period - 1) < 0.02;
  for (const s of ranked) {
    if (chosen.length >= Math.ceil(count / 2)) break;
    if (!chosen.some((c) => samePeriod(c, s))) chosen.push(s);
  }
  for (const s of ranked) {
    if (chosen.length >= count) break;
    if (!chosen.some((c) => samePeriod(c, s) && Math.abs(c.d - s.d) < 0.01)) chosen.push(s);
  }
  return chosen;
}

/**
 * Per-point result of a flux fit (tuning curve or phase), in the caller's order: the contract's
 * FittedPoint without the source row, plus the weighted residual (residual/σ used by the fit) and
 * the robust weight. Phase fit: model on the branch nearest the measured value, residual wrapped.
 */
export interface FittedPointOut extends Omit<FittedPoint, 'row'> {
  weighted_residual: number;
  robust_weight: number | null;
}

/**
 * The asymmetry entry of a parameter table. `search` carries d² (asymmetry_sq) instead of d:
 * f depends on d only through d², so in d the bound d = 0 is stationary (∂f/∂d = 0 there) and
 * a fit that reaches it, or starts on it, can never leave it again; in d² the bound is an ordinary
 * one with a non-zero gradient. Reported fits are polished in d (contract name, covariance in d).
 */
export function asymmetrySpec(d: number, holdD: boolean, search: boolean): ParameterSpec {
  const d0 = holdD ? 0 : Math.min(Math.max(d, 0), 1);
  return search && !holdD
    ? { name: 'asymmetry_sq', value: d0 * d0, min: 0, max: 1, diffScale: 1e-3 }
    : { name: 'asymmetry', value: d0, min: 0, max: 1, vary: !holdD, diffScale: 1e-3 };
}

/** d of a fit made with asymmetrySpec (either parametrisation). */
export function asymmetryOf(r: FitResult): number {
  const q = r.params.asymmetry_sq;
  return q ? Math.sqrt(Math.max(q.value, 0)) : r.params.asymmetry.value;
}

export interface FluxStart {
  d: number;
  period: number;
  offset: number;
}

export interface MultiStartFit<S extends FluxStart> {
  starts: readonly S[];
  n: number;
  loss: Loss;
  fScale: number;
  symmetric: boolean;
  centre: number;
  /** One fit from a start; `search` as in asymmetrySpec. */
  run: (s: S, covariance: boolean, holdD: boolean, search: boolean) => FitResult;
  /** The start a fit ended at (d from asymmetryOf). */
  valuesOf: (r: FitResult) => S;
  /** Called with the best search fit before the polish (to estimate σ from its residuals). */
  onBest?: (best: FitResult) => void;
  warnings: string[];
}

/**
 * Multi-start refinement shared by the tuning and phase fits: every start is refined in d²
 * (asymmetrySpec), the lowest robust cost wins, the winner's offset moves to the maximum nearest
 * the sweep centre and it is polished in d with the covariance. A symmetric fit is reached by
 * continuation (search with d free, then d := 0: with d = 0 from the outset a slightly wrong
 * period drops points onto the lobe-edge cusp and LM stalls). When d ends at 0 (f is flat in d
 * there, JᵀJ singular) the errors of the other parameters come from a fit with d held at 0; the
 * statistics keep the free d counted. null when no start could be evaluated.
 */
export function refineStarts<S extends FluxStart>(o: MultiStartFit<S>): { fit: FitResult; best: FitResult } | null {
  let best: FitResult | null = null;
  let bestCost = Infinity;
  for (const s of o.starts) {
    const r = o.run(s, false, false, true);
    const c = engineCost(r.residuals, o.loss, o.fScale);
    if (r.residuals.length === o.n && c < bestCost) {
      bestCost = c;
      best = r;
    }
  }
  if (!best) return null;
  o.onBest?.(best);
  const polished = o.valuesOf(best);
  polished.offset = offsetNearestCentre(polished.offset, polished.period, o.centre);
  let fit = o.run(o.symmetric ? { ...polished, d: 0 } : polished, true, o.symmetric, false);
  // the polish starts where the search ended (shifted by whole periods), so it evaluates unless the
  // model itself fails there; then the search point is polished without the shift
  if (fit.residuals.length !== o.n) fit = o.run(o.valuesOf(best), true, o.symmetric, false);
  if (fit.residuals.length !== o.n) return null;
  if (!o.symmetric && fit.params.asymmetry.value < 1e-6) {
    const held = o.run({ ...o.valuesOf(fit), d: 0 }, true, true, false);
    if (held.residuals.length === o.n && held.covariance) {
      fit = {
        ...held,
        nvarys: fit.nvarys, redchi: fit.redchi, aic: fit.aic, bic: fit.bic,
        params: { ...held.params, asymmetry: { ...fit.params.asymmetry, value: 0, stderr: null, atBound: true } },
      };
      o.warnings.push('asymmetry fitted to 0 (its bound): consistent with a symmetric SQUID; no standard error (the model depends on d², flat at d = 0)');
    }
  }
  return { fit, best };
}

/**
 * Column-major Jacobian (fit/types.ts JacobianFunction) of residuals r_i = (data_i − model_i)·w_i
 * from the model gradient: column j = −w·∂model/∂names[j].
 */
export function residualJacobian(grad: Record<string, Float64Array>, names: readonly string[], w: ArrayLike<number>): Float64Array {
  const n = w.length;
  const out = new Float64Array(n * names.length);
  for (let j = 0; j < names.length; j++) {
    const g = grad[names[j]];
    const o = j * n;
    for (let i = 0; i < n; i++) out[o + i] = -g[i] * w[i];
  }
  return out;
}

/** Warnings every flux fit gives about its result: strong correlations, parameters on bounds. */
export function fitQualityWarnings(fit: FitResult, warnings: string[]): void {
  const names = fit.varyingNames;
  const corr = fit.correlation;
  if (corr) {
    for (let a = 0; a < names.length; a++) {
      for (let b = a + 1; b < names.length; b++) {
        const v = corr[a][b];
        if (Math.abs(v) > 0.95) warnings.push(`strong correlation ${names[a]}–${names[b]}: ${v.toFixed(3)}`);
      }
    }
  } else if (fit.success) {
    warnings.push('covariance not available (singular or parameters at a bound): no standard errors');
  }
  for (const nm of names) {
    const p = fit.params[nm];
    if (p.atBound && !(nm === 'asymmetry' && p.value === 0)) warnings.push(`${nm} ended on its bound (${p.value}); its error is not meaningful`);
  }
}

/** χ²_red above which a fit with caller-given σ is reported as not describing the data. */
export const REDCHI_SEVERE = 100;

/**
 * Warning about χ²_red when the σ were given (with estimated σ, χ²_red ≈ 1 by construction).
 * Above 3 the scatter exceeds the stated σ; above REDCHI_SEVERE the model does not describe the
 * data at all (a wrong local minimum, a mode crossing, a wrong model) and the result must not pass
 * as a calibration silently. null when there is nothing to say.
 */
export function goodnessWarning(redchi: number, sigmaGiven: boolean, sigmaName: string): string | null {
  if (!sigmaGiven || !Number.isFinite(redchi) || redchi <= 3) return null;
  const scale = Math.sqrt(redchi);
  if (redchi > REDCHI_SEVERE) {
    return `χ²_red = ${redchi.toExponential(2)} with the given ${sigmaName}: the fitted curve misses the data by about ${scale.toFixed(0)}× the stated uncertainty; the model does not describe these points (wrong minimum, mode crossing or wrong model, or ${sigmaName} far too small): do not use this calibration without checking the residuals`;
  }
  return `χ²_red = ${redchi.toFixed(2)} with the given ${sigmaName}: the scatter is about ${scale.toFixed(1)}× the stated uncertainty; standard errors are scaled up by that factor`;
}

/** σ of a smooth sampled curve from its second differences (util/stats.ts secondDifferenceSigma). */
export function noiseFromSecondDifferences(y: ArrayLike<number>): number {
  return secondDifferenceSigma(y);
}

/** Running median over a window of 2h+1 points (kills isolated spurious picks before peak finding). */
export function runningMedian(y: ArrayLike<number>, h = 2): number[] {
  const out: number[] = [];
  for (let i = 0; i < y.length; i++) {
    const lo = Math.max(0, i - h);
    const hi = Math.min(y.length - 1, i + h);
    const w: number[] = [];
    for (let j = lo; j <= hi; j++) w.push(y[j]);
    out.push(median(w));
  }
  return out;
}

/** Order of the points by increasing bias (ties keep file order). */
export function orderByBias(bias: ArrayLike<number>): number[] {
  return Array.from({ length: bias.length }, (_, i) => i).sort((a, b) => bias[a] - bias[b] || a - b);
}

export interface PeriodEstimate {
  /** Dominant period in bias units (always positive). */
  period: number;
  /** Number of periods the sweep spans at that period. */
  cycles: number;
  /** Spectral power of the peak relative to the total (0..1): how periodic the curve looks. */
  peakFraction: number;
}

/**
 * Dominant period of y(x): linear resampling onto a uniform grid, mean removed, Hann window,
 * zero padding ×8, FFT (fft.js), strongest bin above the first, parabolic interpolation of
 * the log power around it. x must be sorted increasing. Returns null for < 8 points.
 */
export function dominantPeriod(x: ArrayLike<number>, y: ArrayLike<number>): PeriodEstimate | null {
  const n = x.length;
  if (n < 8) return null;
  const span = x[n - 1] - x[0];
  if (!(span > 0)) return null;
  const m = 256;
  const size = 2048;
  const grid = new Float64Array(size);
  let j = 0;
  let mean = 0;
  const samples = new Float64Array(m);
  for (let k = 0; k < m; k++) {
    const xk = x[0] + (span * k) / (m - 1);
    while (j + 1 < n - 1 && x[j + 1] <= xk) j++;
    const x0 = x[j];
    const x1 = x[j + 1];
    const t = x1 > x0 ? (xk - x0) / (x1 - x0) : 0;
    samples[k] = y[j] + Math.min(Math.max(t, 0), 1) * (y[j + 1] - y[j]);
    mean += samples[k] / m;
  }
  for (let k = 0; k < m; k++) {
    const w = 0.5 - 0.5 * Math.cos((2 * Math.PI * k) / (m - 1));
    grid[k] = (samples[k] - mean) * w;
  }
  const fft = new FFT(size);
  const out = fft.createComplexArray() as number[];
  fft.realTransform(out, Array.from(grid));
  const power = (k: number) => out[2 * k] * out[2 * k] + out[2 * k + 1] * out[2 * k + 1];
  // grid spacing dx = span/(m−1); bin k ↔ k/(size·dx) cycles per bias unit
  const dx = span / (m - 1);
  const kMin = Math.max(2, Math.ceil((size * dx) / span)); // at least ~1 cycle over the span
  const kMax = size / 2 - 1;
  let best = -1;
  let bestP = -Infinity;
  let total = 0;
  for (let k = 1; k <= kMax; k++) {
    const p = power(k);
    total += p;
    if (k >= kMin && p > bestP) {
      bestP = p;
      best = k;
    }
  }
  if (best < 0 || !(bestP > 0)) return null;
  let kPeak = best;
  if (best > 1 && best < kMax) {
    const a = Math.log(power(best - 1) + 1e-300);
    const b = Math.log(bestP);
    const c = Math.log(power(best + 1) + 1e-300);
    const den = a - 2 * b + c;
    if (den < 0) kPeak = best + (0.5 * (a - c)) / den;
  }
  const period = (size * dx) / kPeak;
  // fraction of power within ±8 padded bins (the Hann main lobe is ±16 padded bins wide)
  let near = 0;
  for (let k = Math.max(1, best - 8); k <= Math.min(kMax, best + 8); k++) near += power(k);
  return { period, cycles: span / period, peakFraction: total > 0 ? near / total : 0 };
}

/** Unwrap a phase sequence (rad) in the given order: each step is taken modulo 2π into (−π, π]. */
export function unwrapPhase(phase: ArrayLike<number>): number[] {
  const out: number[] = [];
  for (let i = 0; i < phase.length; i++) {
    if (i === 0) {
      out.push(phase[0]);
      continue;
    }
    out.push(out[i - 1] + wrapToPi(phase[i] - phase[i - 1]));
  }
  return out;
}

/** Angle wrapped into (−π, π]. */
export function wrapToPi(a: number): number {
  const twoPi = 2 * Math.PI;
  let w = a - twoPi * Math.floor((a + Math.PI) / twoPi);
  if (w <= -Math.PI) w += twoPi;
  if (w > Math.PI) w -= twoPi;
  return w;
}

/**
 * Offset convention of the calibration contract: the bias of a frequency maximum (integer flux)
 * nearest the sweep centre. Shifts the offset by whole periods.
 */
export function offsetNearestCentre(offset: number, period: number, centre: number): number {
  if (!(period !== 0) || !Number.isFinite(period)) return offset;
  const k = Math.round((centre - offset) / period);
  return offset + k * period;
}

/** 'current' | 'voltage' | 'unknown' from a bias unit such as mA, µA, V, mV. */
export function biasQuantity(unit: string | undefined | null): 'current' | 'voltage' | 'unknown' {
  const u = (unit ?? '').trim().replace('μ', 'µ');
  if (/^(p|n|u|µ|m|k)?A$/.test(u)) return 'current';
  if (/^(p|n|u|µ|m|k)?V$/.test(u)) return 'voltage';
  return 'unknown';
}

/**
 * Reads {bias, <value>, <sigma>?} points, checking every field (TuningInputError names the point
 * and field). `positive`: the value must be > 0 (a frequency). σ must be > 0 when present.
 */
export function readFluxPoints<V extends string, S extends string>(
  points: unknown, valueKey: V, sigmaKey: S, positive: boolean,
): { bias: number[]; value: number[]; sigma: (number | null)[] } {
  if (!Array.isArray(points)) throw new TuningInputError(`points must be an array of {bias, ${valueKey}}`);
  const bias: number[] = [];
  const value: number[] = [];
  const sigma: (number | null)[] = [];
  for (let i = 0; i < points.length; i++) {
    const pt = points[i] as Record<string, unknown> | null;
    if (pt === null || typeof pt !== 'object') throw new TuningInputError(`point ${i}: not an object`, i);
    bias.push(requireFinite(pt.bias, i, 'bias'));
    const v = requireFinite(pt[valueKey], i, valueKey);
    if (positive && !(v > 0)) throw new TuningInputError(`point ${i}: ${valueKey} must be positive (got ${v})`, i, valueKey);
    value.push(v);
    const s = pt[sigmaKey];
    if (s === undefined || s === null) sigma.push(null);
    else {
      const sv = requireFinite(s, i, sigmaKey);
      if (!(sv > 0)) throw new TuningInputError(`point ${i}: ${sigmaKey} must be positive (got ${sv})`, i, sigmaKey);
      sigma.push(sv);
    }
  }
  return { bias, value, sigma };
}

/** Check a numeric field of a point; throws TuningInputError naming the point and field. */
export function requireFinite(value: unknown, index: number, field: string): number {
  if (typeof value !== 'number' || !Number.isFinite(value)) {
    throw new TuningInputError(`point ${index}: ${field} must be a finite number (got ${String(value)})`, index, field);
  }
  return value;
}

/** Least squares on a design [1, s_i] with weights w_i: returns [a, b] minimising Σw(y − a − b s)². */
export function weightedLine(s: ArrayLike<number>, y: ArrayLike<number>, w: ArrayLike<number>): [number, number] | null {
  let sw = 0;
  let ss = 0;
  let sy = 0;
  let sss = 0;
  let ssy = 0;
  for (let i = 0; i < s.length; i++) {
    const wi = w[i];
    if (!(wi > 0)) continue;
    sw += wi;
    ss += wi * s[i];
    sy += wi * y[i];
    sss += wi * s[i] * s[i];
    ssy += wi * s[i] * y[i];
  }
  const det = sw * sss - ss * ss;
  if (!(sw > 0) || !(Math.abs(det) > 1e-12 * sw * sss)) return null;
  const b = (sw * ssy - ss * sy) / det;
  const a = (sy - b * ss) / sw;
  return Number.isFinite(a) && Number.isFinite(b) ? [a, b] : null;
}
