/**
 * Tuning-curve fit: resonance frequency versus bias of a λ/4 line terminated by a dc SQUID.
 * Parameters (contract names, calibration/contract.ts): f0_hz, gamma0, asymmetry, flux_period,
 * flux_offset (both in the bias unit), optionally cs_over_cr. Model: calibration/squid/model.ts.
 *
 * Conventions
 * - φ = (bias − flux_offset)/flux_period. A tuning curve is even in flux about every maximum
 *   (f depends on cos²πφ and sin²πφ only), so the sign of the period is NOT observable from
 *   frequencies alone: the fit works with period > 0 and reports sign·|period| with
 *   sign = options.periodSign (default +1; pass −1 when the coil is known to be reversed).
 * - flux_offset is the bias of the frequency maximum (integer φ) nearest the sweep centre,
 *   (min bias + max bias)/2; the fit is polished once more after that shift so the covariance
 *   refers to the reported offset.
 * - Noise: per-point sigmaHz when every point has one; otherwise one σ for all points estimated
 *   from the residuals of the best start (tuning/common.ts residualScale: MAD pass, then the RMS
 *   of the inliers, degrees-of-freedom corrected), so σ-weighted residuals are ~N(0,1).
 *   The engine scales the covariance by redchi either way (lmfit scale_covar).
 * - Robust loss (default soft_l1) with fScale = 2 in σ units: Gaussian inliers keep weight ≥ 0.7,
 *   picks of a spurious mode far away get little weight.
 * - Outlier rule: point i is an outlier when |r_i/σ_i| > 5·s, s = residualScale of the σ-weighted
 *   residuals, at least 1 with given σ (tuning/common.ts outlierScale), and |r_i| > 1e-8·f0 (so
 *   numerical noise on clean data is never flagged).
 */
import { leastSquares } from '../fit/leastsq';
import type { FitResult, JacobianFunction, Loss, ParameterSpec } from '../fit/types';
import {
  criticalCurrentSum, effectiveDelayDerivatives, exactRootSensitivity, fluxFromBias, HYSTERESIS_BETA_L,
  lineInductance, resonanceDerivatives, resonanceFrequency, screeningParameter, SquidLineParams, TuningModel,
} from '../squid/model';
import {
  asymmetryOf, asymmetrySpec, biasQuantity, chooseStarts, dominantPeriod, fitQualityWarnings, type FittedPointOut,
  goodnessWarning, median, noiseFromSecondDifferences, orderByBias, outlierScale, readFluxPoints, refineStarts, residualJacobian,
  residualScale, robustSigma, runningMedian, TuningInputError, weightedLine,
} from './common';

export interface TuningPoint {
  bias: number;
  frHz: number;
  sigmaHz?: number | null;
}

export interface TuningFitOptions {
  model?: TuningModel;
  /** true holds d = 0 (symmetric SQUID). */
  symmetric?: boolean;
  /** C_s/C_r, held fixed at this value (default 0). Ignored by the approx model (warning). */
  csOverCr?: number;
  /** true lets C_s/C_r vary (exact model only; strongly correlated with f0 and γ0). */
  fitCsOverCr?: boolean;
  loss?: Loss;
  /** Characteristic impedance of the line, Ω: enables l_r_h, ic_sum_a, ls0_h. */
  z0Ohm?: number | null;
  /** SQUID loop inductance, H: enables beta_l and the hysteresis warning (needs z0Ohm). */
  loopInductanceH?: number | null;
  biasUnit?: string;
  /** Number of starting points refined by the nonlinear fit (best by robust cost kept). Default 6. */
  starts?: number;
  /** Sign given to the reported period (a tuning curve cannot tell). Default +1. */
  periodSign?: 1 | -1;
  /** Robust-loss scale in σ units. Default 2. */
  fScale?: number;
}

export interface TuningParamValue {
  value: number;
  stderr: number | null;
  vary: boolean;
  min: number;
  max: number;
}

export interface TuningParamsOut {
  f0_hz: TuningParamValue;
  gamma0: TuningParamValue;
  asymmetry: TuningParamValue;
  flux_period: TuningParamValue;
  flux_offset: TuningParamValue;
  cs_over_cr: TuningParamValue;
}

/** Per-point result: model and residual in Hz, weighted residual = residual/σ. */
export type TuningPointOut = FittedPointOut;

export interface ReferenceFluxPoint {
  flux_phi0: number;
  bias: number;
  f_hz: number;
  df_dphi_hz_per_phi0: number;
  d2f_dphi2_hz_per_phi0sq: number;
  tau_eff_s: number;
  dtau_dphi_s_per_phi0: number;
}

export interface TuningDerived {
  tuning_range_hz: [number, number];
  f_at_offset_hz: number;
  tau_eff0_s: number;
  /** Flux range the data cover, Φ0. */
  flux_coverage_phi0: [number, number];
  noise_hz: number;
  sigma_source: 'given' | 'estimated';
  reference_points: ReferenceFluxPoint[];
  l_r_h?: number;
  ls0_h?: number;
  ic_sum_a?: number;
  beta_l?: number;
  beta_l_larger_junction?: number;
  mutual_inductance_h?: number;
}

export interface TuningFitResult {
  success: boolean;
  message: string;
  model: TuningModel;
  symmetric: boolean;
  loss: Loss;
  biasUnit: string;
  /** Engine result of the final (polished) fit; null when no fit could be run. */
  fit: FitResult | null;
  params: TuningParamsOut;
  /** Plain numbers of the final model, for evaluating it (period with the reported sign). */
  line: SquidLineParams & { period: number; offset: number };
  outliers: number[];
  points: TuningPointOut[];
  derived: TuningDerived;
  warnings: string[];
  fixed: { z0_ohm: number | null; loop_inductance_h: number | null; cs_over_cr: number | null };
  startsTried: number;
}

const REFERENCE_FLUXES = [0, 0.1, 0.2, 0.25, 0.3, 0.4];
const GAMMA0_MAX = 10;

/** Model f at every bias plus its parameter Jacobian (∂f/∂p), shared by the residual and the Jacobian (exported for tests). */
export function tuningModelWithGradient(
  bias: ArrayLike<number>,
  p: Readonly<Record<string, number>>,
  model: TuningModel,
  wantGrad: boolean,
): { f: Float64Array; grad: Record<string, Float64Array> | null } {
  const n = bias.length;
  const f0 = p.f0_hz;
  const g0 = p.gamma0;
  // the search may carry d² (asymmetry_sq) instead of d, see fitTuningCurve
  const d = p.asymmetry_sq !== undefined ? Math.sqrt(Math.max(p.asymmetry_sq, 0)) : p.asymmetry;
  const P = p.flux_period;
  const o = p.flux_offset;
  const c = p.cs_over_cr ?? 0;
  const f = new Float64Array(n);
  const grad = wantGrad
    ? {
        f0_hz: new Float64Array(n), gamma0: new Float64Array(n), asymmetry: new Float64Array(n), asymmetry_sq: new Float64Array(n),
        flux_period: new Float64Array(n), flux_offset: new Float64Array(n), cs_over_cr: new Float64Array(n),
      }
    : null;
  const k = f0 / (Math.PI / 2);
  for (let i = 0; i < n; i++) {
    const phi = (bias[i] - o) / P;
    const cp = Math.cos(Math.PI * phi);
    const sp = Math.sin(Math.PI * phi);
    const D = cp * cp + d * d * sp * sp;
    if (!(D > 0)) {
      f[i] = 0;
      continue;
    }
    const sD = Math.sqrt(D);
    const D1 = -Math.PI * (1 - d * d) * Math.sin(2 * Math.PI * phi); // ∂D/∂φ
    const Dq = sp * sp; // ∂D/∂(d²)
    const Dd = 2 * d * Dq; // ∂D/∂d
    if (model === 'approx') {
      const gam = g0 / sD;
      const one = 1 + gam;
      f[i] = f0 / one;
      if (grad) {
        const dfdgam = -f0 / (one * one);
        const dgamdD = -gam / (2 * D);
        grad.f0_hz[i] = 1 / one;
        grad.gamma0[i] = (dfdgam * gam) / g0;
        grad.asymmetry[i] = dfdgam * dgamdD * Dd;
        grad.asymmetry_sq[i] = dfdgam * dgamdD * Dq;
        const dfdphi = dfdgam * dgamdD * D1;
        grad.flux_offset[i] = -dfdphi / P;
        grad.flux_period[i] = (-dfdphi * phi) / P;
      }
    } else {
      const g = sD / g0;
      const r = exactRootSensitivity(g, c);
      f[i] = k * r.x;
      if (grad) {
        const dfdg = k * r.dxdg;
        const dgdD = g / (2 * D);
        grad.f0_hz[i] = r.x / (Math.PI / 2);
        grad.gamma0[i] = (-dfdg * g) / g0;
        grad.asymmetry[i] = dfdg * dgdD * Dd;
        grad.asymmetry_sq[i] = dfdg * dgdD * Dq;
        const dfdphi = dfdg * dgdD * D1;
        grad.flux_offset[i] = -dfdphi / P;
        grad.flux_period[i] = (-dfdphi * phi) / P;
        grad.cs_over_cr[i] = k * r.dxdc;
      }
    }
  }
  return { f, grad };
}

interface Start {
  f0: number;
  gamma0: number;
  d: number;
  period: number;
  offset: number;
  score: number;
}

/** 1/f ≈ (1 + γ0·s(φ))/f0 is linear in (1/f0, γ0/f0) for fixed d, period, offset: solve it. */
function linearStart(
  b: ArrayLike<number>, y: ArrayLike<number>, d: number, period: number, offset: number, scoreScale: number,
): Start | null {
  const n = b.length;
  const s = new Float64Array(n);
  const inv = new Float64Array(n);
  const w = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const phi = (b[i] - offset) / period;
    const D = Math.cos(Math.PI * phi) ** 2 + d * d * Math.sin(Math.PI * phi) ** 2;
    s[i] = D > 1e-12 ? 1 / Math.sqrt(D) : 1e6;
    inv[i] = 1 / y[i];
    w[i] = y[i] ** 4; // δ(1/f)·f² = δf: weights so the fit is least squares in f
  }
  let ab = weightedLine(s, inv, w);
  if (!ab) return null;
  // one reweighting pass that drops gross misfits (spurious picks)
  const res = Array.from({ length: n }, (_, i) => y[i] - (1 / (ab as number[])[0]) / (1 + ((ab as number[])[1] / (ab as number[])[0]) * s[i]));
  const rs = Math.max(robustSigma(res), scoreScale);
  const mres = median(res);
  for (let i = 0; i < n; i++) if (Math.abs(res[i] - mres) > 5 * rs) w[i] = 0;
  ab = weightedLine(s, inv, w) ?? ab;
  const [a, bb] = ab;
  if (!(a > 0) || !(bb > 0)) return null;
  const f0 = 1 / a;
  const gamma0 = bb / a;
  if (!(gamma0 <= GAMMA0_MAX)) return null;
  let score = 0;
  for (let i = 0; i < n; i++) {
    const r = (y[i] - f0 / (1 + gamma0 * s[i])) / scoreScale;
    score += 2 * (Math.sqrt(1 + r * r) - 1);
  }
  return { f0, gamma0, d, period, offset, score };
}

/**
 * Candidate starting points from the data. Periods: the dominant period of the resampled curve
 * (FFT, when ≥ 1.5 periods are visible; also ×2 and ÷2 against harmonic confusion), twice the
 * distance between an interior maximum and minimum, the top curvature for several γ0, and
 * multiples of the span when the curve is shorter than 1.5 periods. Offsets: the bias of the
 * (running-median) maximum and the vertex of a parabola through the top. For each (period,
 * offset, d on a grid) the approx model is linear in (1/f0, γ0/f0) and solved directly; the
 * candidates are ranked by a soft-l1 score.
 */
function makeStarts(b: number[], y: number[], scoreScale: number): Start[] {
  const n = b.length;
  const span = b[n - 1] - b[0];
  const smooth = runningMedian(y, 2);
  let iMax = 0;
  let iMin = 0;
  for (let i = 1; i < n; i++) {
    if (smooth[i] > smooth[iMax]) iMax = i;
    if (smooth[i] < smooth[iMin]) iMin = i;
  }
  const fTop = smooth[iMax];
  const depth = fTop - smooth[iMin];
  const periods: number[] = [];
  const est = dominantPeriod(b, smooth);
  if (est && est.cycles >= 1.5) periods.push(est.period, 2 * est.period, est.period / 2);
  // lobe width: an interior maximum and an interior minimum are half a period apart
  if (iMax > 0 && iMax < n - 1 && iMin > 0 && iMin < n - 1) periods.push(2 * Math.abs(b[iMin] - b[iMax]));
  // curvature at the top: f''_b ≈ −f_top·π²(1−d²)·γ0/(1+γ0)/P² (approx model, small φ)
  const top: number[] = [];
  for (let i = 0; i < n; i++) if (smooth[i] >= fTop - 0.3 * depth) top.push(i);
  let vertex: number | null = null;
  if (top.length >= 5) {
    const xs = top.map((i) => b[i] - b[iMax]);
    const q = quadraticFit(xs, top.map((i) => smooth[i]));
    if (q && q[2] < 0) {
      const v = b[iMax] - q[1] / (2 * q[2]);
      if (v > b[0] - span && v < b[n - 1] + span) vertex = v;
      for (const g of [0.01, 0.03, 0.1, 0.3, 1]) {
        periods.push(Math.PI * Math.sqrt((fTop * g) / ((1 + g) * 2 * Math.abs(q[2]))));
      }
    }
  }
  if (!(est && est.cycles >= 1.5)) for (const m of [0.5, 1, 2, 4, 8]) periods.push(m * span);
  const offsets = [b[iMax]];
  if (vertex !== null && Math.abs(vertex - b[iMax]) > 1e-9 * span) offsets.push(vertex);
  // the d grid is used even for a symmetric fit: with d = 0 a slightly wrong period maps points
  // onto the lobe edge where 1/|cos πφ| explodes and the linear start is useless
  const ds = [0, 0.02, 0.05, 0.1, 0.2, 0.35, 0.6];
  const starts: Start[] = [];
  const minPeriod = (4 * span) / Math.max(n - 1, 1);
  for (const P of periods) {
    if (!(P > minPeriod) || !Number.isFinite(P)) continue;
    for (const o of offsets) {
      for (const d of ds) {
        const s = linearStart(b, y, d, P, o, scoreScale);
        if (s) starts.push(s);
      }
    }
  }
  starts.sort((p, q) => p.score - q.score);
  return starts;
}

/** Least-squares parabola c0 + c1 x + c2 x². */
function quadraticFit(x: number[], y: number[]): [number, number, number] | null {
  const n = x.length;
  const sc = Math.max(...x.map(Math.abs)) || 1;
  const S = [0, 0, 0, 0, 0];
  const T = [0, 0, 0];
  const y0 = median(y);
  for (let i = 0; i < n; i++) {
    const u = x[i] / sc;
    let pw = 1;
    for (let k = 0; k < 5; k++) {
      S[k] += pw;
      if (k < 3) T[k] += pw * (y[i] - y0);
      pw *= u;
    }
  }
  const A = [
    [S[0], S[1], S[2]],
    [S[1], S[2], S[3]],
    [S[2], S[3], S[4]],
  ];
  const det3 = (m: number[][]) =>
    m[0][0] * (m[1][1] * m[2][2] - m[1][2] * m[2][1]) -
    m[0][1] * (m[1][0] * m[2][2] - m[1][2] * m[2][0]) +
    m[0][2] * (m[1][0] * m[2][1] - m[1][1] * m[2][0]);
  const D = det3(A);
  if (!(Math.abs(D) > 1e-14 * Math.abs(S[0] * S[2] * S[4]))) return null;
  const sol: number[] = [];
  for (let c = 0; c < 3; c++) {
    const M = A.map((row, r) => row.map((v, j) => (j === c ? T[r] : v)));
    sol.push(det3(M) / D);
  }
  return [sol[0] + y0, sol[1] / sc, sol[2] / (sc * sc)];
}

function toOut(fit: FitResult | null, name: string, fallback: number, sign = 1): TuningParamValue {
  const p = fit?.params[name];
  if (!p) return { value: fallback * sign, stderr: null, vary: false, min: fallback, max: fallback };
  const min = sign > 0 ? p.min : -p.max;
  const max = sign > 0 ? p.max : -p.min;
  return {
    value: p.value * sign,
    stderr: p.stderr !== null && Number.isFinite(p.stderr) ? p.stderr : null,
    vary: p.vary,
    min,
    max,
  };
}

/** Fit a resonance-versus-bias sweep. Throws TuningInputError for malformed points; otherwise never throws. */
export function fitTuningCurve(points: readonly TuningPoint[], options: TuningFitOptions = {}): TuningFitResult {
  const model: TuningModel = options.model ?? 'exact';
  const symmetric = options.symmetric === true;
  const loss: Loss = options.loss ?? 'soft_l1';
  const biasUnit = options.biasUnit ?? '';
  const periodSign = options.periodSign === -1 ? -1 : 1;
  const fScale = options.fScale ?? 2;
  const csFixed = options.csOverCr ?? 0;
  const fitCs = options.fitCsOverCr === true && model === 'exact';
  const z0 = options.z0Ohm ?? null;
  const loopL = options.loopInductanceH ?? null;
  const warnings: string[] = [];
  const { bias, value: fr, sigma: sigmaGiven } = readFluxPoints(points, 'frHz', 'sigmaHz', true);
  const n = bias.length;
  if (z0 !== null && !(z0 > 0 && Number.isFinite(z0))) throw new TuningInputError(`z0Ohm must be a positive number (got ${z0})`);
  if (loopL !== null && !(loopL >= 0 && Number.isFinite(loopL))) {
    throw new TuningInputError(`loopInductanceH must be a non-negative number (got ${loopL})`);
  }
  if (!(csFixed >= 0 && Number.isFinite(csFixed))) throw new TuningInputError(`csOverCr must be >= 0 (got ${csFixed})`);
  if (model === 'approx' && (csFixed !== 0 || options.fitCsOverCr)) {
    warnings.push('the approx model f0/(1+γ) ignores C_s/C_r; use the exact model to include it');
  }
  const nGiven = sigmaGiven.filter((s) => s !== null).length;
  if (nGiven > 0 && nGiven < n) {
    warnings.push(`sigmaHz given for ${nGiven} of ${n} points: the others use the median of the given values`);
  }
  const sigmaSource: 'given' | 'estimated' = nGiven > 0 ? 'given' : 'estimated';
  const medianGiven = nGiven > 0 ? median(sigmaGiven.filter((s): s is number => s !== null)) : 1;

  const order = orderByBias(bias);
  const bs = order.map((i) => bias[i]);
  const ys = order.map((i) => fr[i]);
  const bMin = bs[0] ?? 0;
  const bMax = bs[n - 1] ?? 0;
  const span = bMax - bMin;
  const centre = 0.5 * (bMin + bMax);
  const fMax = n > 0 ? Math.max(...fr) : 0;
  const nvary = 5 - (symmetric ? 1 : 0) + (fitCs ? 1 : 0);

  const fixed = { z0_ohm: z0, loop_inductance_h: loopL, cs_over_cr: fitCs ? null : csFixed };
  const failure = (message: string, start?: Start): TuningFitResult => {
    const s = start ?? { f0: fMax || 1, gamma0: 0, d: 0, period: span || 1, offset: centre, score: 0 };
    const line = { f0Hz: s.f0, gamma0: s.gamma0, asymmetry: s.d, csOverCr: csFixed, period: periodSign * s.period, offset: s.offset };
    const fixedOut = (v: number): TuningParamValue => ({ value: v, stderr: null, vary: false, min: v, max: v });
    return {
      success: false, message, model, symmetric, loss, biasUnit, fit: null,
      params: {
        f0_hz: fixedOut(s.f0), gamma0: fixedOut(s.gamma0), asymmetry: fixedOut(s.d),
        flux_period: fixedOut(periodSign * s.period), flux_offset: fixedOut(s.offset), cs_over_cr: fixedOut(csFixed),
      },
      line, outliers: [],
      points: bias.map((b, i) => ({
        index: i, bias: b, flux_phi0: fluxFromBias(b, line.period, line.offset), measured: fr[i],
        sigma: sigmaGiven[i], model: 0, residual: 0, weighted_residual: 0, robust_weight: null, outlier: false,
      })),
      derived: {
        tuning_range_hz: [n ? Math.min(...fr) : 0, fMax], f_at_offset_hz: 0, tau_eff0_s: 0,
        flux_coverage_phi0: [0, 0], noise_hz: 0, sigma_source: sigmaSource, reference_points: [],
      },
      warnings, fixed, startsTried: 0,
    };
  };

  if (n < nvary + 2) return failure(`too few points: ${n} given, at least ${nvary + 2} needed to fit ${nvary} parameters`);
  if (!(span > 0)) return failure('all points have the same bias: no flux dependence can be fitted');
  if (!(Math.max(...fr) > Math.min(...fr))) return failure('all resonance frequencies are equal: no tuning to fit');

  // scale of the start scores: the point-to-point noise (upper bound), floored well above rounding
  const noise0 = Math.max(noiseFromSecondDifferences(ys), 1e-7 * fMax);
  const starts = makeStarts(bs, ys, noise0);
  if (starts.length === 0) return failure('no starting point found: the curve does not look like a SQUID tuning curve');

  // σ for the first round: given, or the second-difference estimate
  let sigmaAll = nGiven > 0 ? 0 : noise0;
  const sigmaOf = (i: number) => sigmaGiven[i] ?? (nGiven > 0 ? medianGiven : sigmaAll);

  /** One bounded fit from a start (`search`: d² instead of d, see common.ts asymmetrySpec). */
  const runFit = (s: Start, covariance: boolean, holdD = false, search = false): FitResult => {
    const spec: ParameterSpec[] = [
      { name: 'f0_hz', value: s.f0, min: 0.5 * fMax, max: 20 * fMax, diffScale: 1e-3 * fMax },
      { name: 'gamma0', value: Math.min(Math.max(s.gamma0, 1e-6), GAMMA0_MAX), min: 1e-9, max: GAMMA0_MAX, diffScale: 1e-3 },
      asymmetrySpec(s.d, holdD, search),
      { name: 'flux_period', value: s.period, min: (2 * span) / Math.max(n - 1, 1), max: 100 * span, diffScale: 1e-3 * span },
      { name: 'flux_offset', value: s.offset, min: centre - 50 * span, max: centre + 50 * span, diffScale: 1e-3 * span },
      { name: 'cs_over_cr', value: csFixed, min: 0, max: 100, vary: fitCs, diffScale: 1e-3 },
    ];
    const w = bias.map((_, i) => 1 / sigmaOf(i));
    const residual = (p: Readonly<Record<string, number>>) => {
      const { f } = tuningModelWithGradient(bias, p, model, false);
      const r = new Float64Array(n);
      for (let i = 0; i < n; i++) r[i] = (fr[i] - f[i]) * w[i];
      return r;
    };
    const jacobian: JacobianFunction = (p, names) =>
      residualJacobian(tuningModelWithGradient(bias, p, model, true).grad as Record<string, Float64Array>, names, w);
    return leastSquares(residual, spec, { loss, fScale, computeCovariance: covariance }, jacobian);
  };

  const chosen = chooseStarts(starts, Math.max(1, Math.floor(options.starts ?? 6)));
  const refined = refineStarts({
    starts: chosen, n, loss, fScale, symmetric, centre, warnings,
    run: runFit,
    valuesOf: (r: FitResult): Start => ({
      f0: r.params.f0_hz.value, gamma0: r.params.gamma0.value, d: asymmetryOf(r),
      period: r.params.flux_period.value, offset: r.params.flux_offset.value, score: 0,
    }),
    // σ from the residuals of the best start when none was given, before the final polish
    onBest: (best) => {
      if (nGiven === 0) sigmaAll = Math.max(residualScale(best.residuals.map((r) => r * sigmaAll), nvary), 1e-12 * fMax);
    },
  });
  if (!refined) return failure('every start failed to evaluate', chosen[0]);
  const fit = refined.fit;

  const f0 = fit.params.f0_hz.value;
  const gamma0 = fit.params.gamma0.value;
  const d = fit.params.asymmetry.value;
  const Pabs = fit.params.flux_period.value;
  const offset = fit.params.flux_offset.value;
  const cs = fit.params.cs_over_cr.value;
  const line = { f0Hz: f0, gamma0, asymmetry: d, csOverCr: cs, period: periodSign * Pabs, offset };

  // per-point results and the outlier rule
  const { f: fm } = tuningModelWithGradient(bias, fit.params ? Object.fromEntries(Object.entries(fit.params).map(([k, v]) => [k, v.value])) : {}, model, false);
  const wres = fit.residuals;
  const sRob = outlierScale(wres, fit.nvarys, nGiven > 0);
  const outliers: number[] = [];
  const pts: TuningPointOut[] = bias.map((b, i) => {
    const residual = fr[i] - fm[i];
    const outlier = Math.abs(wres[i]) > 5 * sRob && Math.abs(residual) > 1e-8 * f0;
    if (outlier) outliers.push(i);
    return {
      index: i, bias: b, flux_phi0: fluxFromBias(b, line.period, offset), measured: fr[i],
      sigma: sigmaGiven[i], model: fm[i], residual, weighted_residual: wres[i],
      robust_weight: fit.robustWeights ? fit.robustWeights[i] : null, outlier,
    };
  });
  const inl = pts.filter((p) => !p.outlier).map((p) => p.residual);
  const noiseHz = robustSigma(inl.length ? inl : pts.map((p) => p.residual));

  // derived quantities
  const sq: SquidLineParams = { f0Hz: f0, gamma0, asymmetry: d, csOverCr: cs };
  const phis = pts.map((p) => p.flux_phi0);
  const modelVals = Array.from(fm);
  const derived: TuningDerived = {
    tuning_range_hz: [Math.min(...modelVals), Math.max(...modelVals)],
    f_at_offset_hz: resonanceFrequency(0, sq, model),
    tau_eff0_s: gamma0 / (4 * f0),
    flux_coverage_phi0: [Math.min(...phis), Math.max(...phis)],
    noise_hz: noiseHz,
    sigma_source: sigmaSource,
    reference_points: REFERENCE_FLUXES.map((phi) => {
      const r = resonanceDerivatives(phi, sq, model);
      const t = effectiveDelayDerivatives(phi, sq);
      return {
        flux_phi0: phi, bias: offset + line.period * phi, f_hz: r.f, df_dphi_hz_per_phi0: r.dfdphi,
        d2f_dphi2_hz_per_phi0sq: r.d2fdphi2, tau_eff_s: t.tau, dtau_dphi_s_per_phi0: t.dtaudphi,
      };
    }),
  };
  const q = biasQuantity(biasUnit);
  if (q === 'current') {
    // M = Φ0/period, with the period converted to amperes
    const scale = unitScale(biasUnit);
    if (scale !== null) derived.mutual_inductance_h = 2.067833848461929e-15 / (Pabs * scale);
  }
  if (z0 !== null) {
    derived.l_r_h = lineInductance(f0, z0);
    derived.ls0_h = gamma0 * derived.l_r_h;
    derived.ic_sum_a = criticalCurrentSum(gamma0, f0, z0);
    if (loopL !== null) {
      // The 2/π criterion is derived for a symmetric SQUID with I_c0 = I_cΣ/2 per junction; for d > 0
      // we use the mean junction (I_cΣ/2) and also report β_L of the larger junction, I_cΣ(1+d)/2.
      derived.beta_l = screeningParameter(loopL, derived.ic_sum_a / 2);
      derived.beta_l_larger_junction = screeningParameter(loopL, (derived.ic_sum_a * (1 + d)) / 2);
      if (derived.beta_l > HYSTERESIS_BETA_L) {
        warnings.push(
          `β_L = ${derived.beta_l.toFixed(3)} > 2/π: the SQUID flux response is hysteretic; the apparent offset depends on the sweep direction and the negligible-loop-inductance model does not hold`,
        );
      } else if (derived.beta_l > 0.3) {
        warnings.push(`β_L = ${derived.beta_l.toFixed(3)}: loop inductance distorts the lobe shape; d and γ0 absorb it`);
      }
    }
  } else if (loopL !== null) {
    warnings.push('loopInductanceH given without z0Ohm: β_L needs I_cΣ, which needs Z0');
  }

  // honest warnings about what the data can determine
  const coverage = derived.flux_coverage_phi0[1] - derived.flux_coverage_phi0[0];
  if (coverage < 0.5) {
    warnings.push(
      `the data cover only ${coverage.toFixed(2)} Φ0: asymmetry, period and γ0 are correlated; treat their errors with care`,
    );
  }
  fitQualityWarnings(fit, warnings);
  if (model === 'approx' && gamma0 > 0.05) {
    warnings.push(
      `γ0 = ${gamma0.toFixed(3)}: the approx model is off by about π²γ³/12 = ${((Math.PI ** 2 * gamma0 ** 3) / 12).toExponential(1)} relative at the top of the lobe; prefer the exact model`,
    );
  }
  if (outliers.length > 0) warnings.push(`${outliers.length} point(s) flagged as outliers (|r| > 5 robust σ)`);
  const goodness = goodnessWarning(fit.redchi, nGiven > 0, 'sigmaHz');
  if (goodness) warnings.push(goodness);

  // a fit that explains nothing is not a calibration
  let success = fit.success;
  let message = fit.message;
  const inlierIdx = pts.filter((p) => !p.outlier).map((p) => p.index);
  const meanY = inlierIdx.reduce((s, i) => s + fr[i], 0) / Math.max(inlierIdx.length, 1);
  const ssTot = inlierIdx.reduce((s, i) => s + (fr[i] - meanY) ** 2, 0);
  const ssRes = inlierIdx.reduce((s, i) => s + (fr[i] - fm[i]) ** 2, 0);
  if (ssTot > 0 && ssRes / ssTot > 0.5) {
    success = false;
    message = `the model explains only ${(100 * (1 - ssRes / ssTot)).toFixed(0)} % of the variance: no flux tuning resolved above the noise (${fit.message})`;
  }
  if (outliers.length > 0.3 * n) {
    success = false;
    message = `${outliers.length} of ${n} points are outliers: the data do not follow one tuning curve`;
  }

  return {
    success, message, model, symmetric, loss, biasUnit, fit,
    params: {
      f0_hz: toOut(fit, 'f0_hz', f0),
      gamma0: toOut(fit, 'gamma0', gamma0),
      asymmetry: toOut(fit, 'asymmetry', d),
      flux_period: toOut(fit, 'flux_period', Pabs, periodSign),
      flux_offset: toOut(fit, 'flux_offset', offset),
      cs_over_cr: toOut(fit, 'cs_over_cr', cs),
    },
    line, outliers, points: pts, derived, warnings, fixed, startsTried: chosen.length,
  };
}

/** SI factor of a bias unit such as mA, µA, V (null when not recognised). */
export function unitScale(unit: string): number | null {
  const u = unit.trim().replace('μ', 'µ');
  const m = /^(p|n|u|µ|m|k)?(A|V)$/.exec(u);
  if (!m) return null;
  const prefix: Record<string, number> = { p: 1e-12, n: 1e-9, u: 1e-6, µ: 1e-6, m: 1e-3, k: 1e3 };
  return m[1] ? prefix[m[1]] : 1;
}

/** Frequency and flux derivatives of a fitted curve at a bias (for callers such as the planner). */
export function tuningAtBias(result: TuningFitResult, bias: number) {
  const phi = fluxFromBias(bias, result.line.period, result.line.offset);
  return { flux_phi0: phi, ...resonanceDerivatives(phi, result.line, result.model) };
}
