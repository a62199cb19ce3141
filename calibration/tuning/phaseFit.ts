/**
 * Reflected phase versus flux of a non-resonant SQUID termination (a long line shorted by the
 * SQUID): the SQUID acts as a mirror displaced by L_eff = L_s/L′, so a tone at ω picks up the
 * extra round-trip phase 2ω·τ_eff(Φ) (Johansson, Johansson, Wilson, Nori, PRL 103, 147003 (2009);
 * PRA 82, 052509 (2010)):
 *   θ(Φ) = θ0 − 2ω·τ_eff(Φ),  τ_eff(Φ) = τ_eff0 · L_s(Φ)/L_s(0) = τ_eff0/sqrt(cos²πφ + d²sin²πφ).
 * Parameters: tau_eff0_s, asymmetry, flux_period, flux_offset, theta0_rad.
 *
 * Phase wrapping: the measured phase may be wrapped (e.g. into (−π, π]). For the starting values
 * the phase is unwrapped along increasing bias (each step between neighbours taken into (−π, π]).
 * The fit itself uses residuals wrapped into (−π, π], so it does not depend on that unwrapping
 * being right at a steep point; theta0_rad is reported wrapped into (−π, π].
 * Offset convention: bias of the phase maximum (τ_eff minimum, integer flux) nearest the sweep
 * centre; period > 0 internally, reported with options.periodSign (the curve is even in flux).
 * Noise, loss and outlier rule as in fitTuning.ts (σ in rad; outlier floor 1e-6 rad).
 */
import { leastSquares } from '../fit/leastsq';
import type { FitResult, JacobianFunction, Loss, ParameterSpec } from '../fit/types';
import { effectiveDelayDerivatives, fluxFromBias, HYSTERESIS_BETA_L, screeningParameter } from '../squid/model';
import { FLUX_QUANTUM } from '../constants';
import {
  asymmetryOf, asymmetrySpec, chooseStarts, dominantPeriod, fitQualityWarnings, type FittedPointOut, goodnessWarning,
  median, noiseFromSecondDifferences, orderByBias, outlierScale, readFluxPoints, refineStarts, residualJacobian, residualScale, robustSigma,
  runningMedian, TuningInputError, unwrapPhase, weightedLine, wrapToPi,
} from './common';
import type { TuningParamValue } from './fitTuning';

export interface PhasePoint {
  bias: number;
  phaseRad: number;
  sigmaRad?: number | null;
}

export interface PhaseFitOptions {
  probeFrequencyHz: number;
  symmetric?: boolean;
  loss?: Loss;
  biasUnit?: string;
  /** Line impedance, Ω: then L_s(0) = Z0·τ_eff0 (since L′v = Z0) and I_cΣ follow. */
  z0Ohm?: number | null;
  /** Phase velocity, m/s: then L_eff0 = v·τ_eff0. */
  phaseVelocityMps?: number | null;
  loopInductanceH?: number | null;
  starts?: number;
  periodSign?: 1 | -1;
  fScale?: number;
}

export interface PhaseParamsOut {
  tau_eff0_s: TuningParamValue;
  asymmetry: TuningParamValue;
  flux_period: TuningParamValue;
  flux_offset: TuningParamValue;
  theta0_rad: TuningParamValue;
}

/** Per-point result: phase in rad, model on the branch nearest the measured value, residual wrapped. */
export type PhasePointOut = FittedPointOut;

export interface PhaseFitResult {
  success: boolean;
  message: string;
  model: 'phase';
  loss: Loss;
  biasUnit: string;
  fit: FitResult | null;
  params: PhaseParamsOut;
  line: { tauEff0S: number; asymmetry: number; period: number; offset: number; theta0Rad: number; probeFrequencyHz: number };
  outliers: number[];
  points: PhasePointOut[];
  derived: Record<string, unknown>;
  warnings: string[];
  fixed: Record<string, number | null>;
}

interface PhaseStart {
  tau: number;
  d: number;
  period: number;
  offset: number;
  theta0: number;
  score: number;
}

export function phaseModelWithGradient(bias: ArrayLike<number>, p: Readonly<Record<string, number>>, omega: number, wantGrad: boolean) {
  const n = bias.length;
  const th = new Float64Array(n);
  const grad = wantGrad
    ? {
        tau_eff0_s: new Float64Array(n), asymmetry: new Float64Array(n), asymmetry_sq: new Float64Array(n),
        flux_period: new Float64Array(n), flux_offset: new Float64Array(n), theta0_rad: new Float64Array(n),
      }
    : null;
  const { tau_eff0_s: tau, flux_period: P, flux_offset: o, theta0_rad: t0 } = p;
  // the search may carry d² (asymmetry_sq) instead of d, see fitTuning.ts runFit
  const d = p.asymmetry_sq !== undefined ? Math.sqrt(Math.max(p.asymmetry_sq, 0)) : p.asymmetry;
  for (let i = 0; i < n; i++) {
    const phi = (bias[i] - o) / P;
    const cp = Math.cos(Math.PI * phi);
    const sp = Math.sin(Math.PI * phi);
    const D = Math.max(cp * cp + d * d * sp * sp, 1e-300);
    const s = 1 / Math.sqrt(D);
    th[i] = t0 - 2 * omega * tau * s;
    if (grad) {
      const s3 = s / D; // D^{-3/2}
      const D1 = -Math.PI * (1 - d * d) * Math.sin(2 * Math.PI * phi);
      grad.tau_eff0_s[i] = -2 * omega * s;
      grad.asymmetry_sq[i] = omega * tau * sp * sp * s3;
      grad.asymmetry[i] = 2 * d * grad.asymmetry_sq[i];
      const dthdphi = omega * tau * D1 * s3;
      grad.flux_offset[i] = -dthdphi / P;
      grad.flux_period[i] = (-dthdphi * phi) / P;
      grad.theta0_rad[i] = 1;
    }
  }
  return { th, grad };
}

export function fitPhaseVsFlux(points: readonly PhasePoint[], options: PhaseFitOptions): PhaseFitResult {
  if (!options || !(options.probeFrequencyHz > 0 && Number.isFinite(options.probeFrequencyHz))) {
    throw new TuningInputError(`probeFrequencyHz must be a positive number (got ${options?.probeFrequencyHz})`);
  }
  const fp = options.probeFrequencyHz;
  const omega = 2 * Math.PI * fp;
  const loss: Loss = options.loss ?? 'soft_l1';
  const symmetric = options.symmetric === true;
  const biasUnit = options.biasUnit ?? '';
  const periodSign = options.periodSign === -1 ? -1 : 1;
  const fScale = options.fScale ?? 2;
  const z0 = options.z0Ohm ?? null;
  const vph = options.phaseVelocityMps ?? null;
  const loopL = options.loopInductanceH ?? null;
  const warnings: string[] = [];
  const { bias, value: ph, sigma: sg } = readFluxPoints(points, 'phaseRad', 'sigmaRad', false);
  const n = bias.length;
  const nGiven = sg.filter((s) => s !== null).length;
  const medGiven = nGiven ? median(sg.filter((s): s is number => s !== null)) : 1;
  const order = orderByBias(bias);
  const bs = order.map((i) => bias[i]);
  const span = n ? bs[n - 1] - bs[0] : 0;
  const centre = n ? 0.5 * (bs[0] + bs[n - 1]) : 0;
  const unwrappedSorted = unwrapPhase(order.map((i) => ph[i]));
  const fixed = { probe_frequency_hz: fp, z0_ohm: z0, phase_velocity_mps: vph, loop_inductance_h: loopL };
  const nvary = symmetric ? 4 : 5;

  const failure = (message: string): PhaseFitResult => {
    const fx = (v: number): TuningParamValue => ({ value: v, stderr: null, vary: false, min: v, max: v });
    return {
      success: false, message, model: 'phase', loss, biasUnit, fit: null,
      params: { tau_eff0_s: fx(0), asymmetry: fx(0), flux_period: fx(span || 1), flux_offset: fx(centre), theta0_rad: fx(0) },
      line: { tauEff0S: 0, asymmetry: 0, period: span || 1, offset: centre, theta0Rad: 0, probeFrequencyHz: fp },
      outliers: [],
      points: bias.map((b, i) => ({ index: i, bias: b, flux_phi0: 0, measured: ph[i], sigma: sg[i], model: 0, residual: 0, weighted_residual: 0, robust_weight: null, outlier: false })),
      derived: {}, warnings, fixed,
    };
  };
  if (n < nvary + 2) return failure(`too few points: ${n} given, at least ${nvary + 2} needed to fit ${nvary} parameters`);
  if (!(span > 0)) return failure('all points have the same bias: no flux dependence can be fitted');

  // starting values from the unwrapped phase: θ = θ0 + b·s(φ) is linear for fixed d, period, offset
  const smooth = runningMedian(unwrappedSorted, 2);
  let iMax = 0;
  for (let i = 1; i < n; i++) if (smooth[i] > smooth[iMax]) iMax = i;
  const noise0 = Math.max(noiseFromSecondDifferences(unwrappedSorted), 1e-6);
  const est = dominantPeriod(bs, smooth);
  const periods = est && est.cycles >= 1.5 ? [est.period, 2 * est.period, est.period / 2] : [0.5, 1, 2, 4, 8].map((m) => m * span);
  const ds = [0, 0.03, 0.1, 0.2, 0.35, 0.6]; // also for a symmetric fit: see fitTuning.ts (continuation)
  const starts: PhaseStart[] = [];
  for (const P of periods) {
    if (!(P > (4 * span) / Math.max(n - 1, 1))) continue;
    for (const d of ds) {
      const s = bs.map((b) => {
        const phi = (b - bs[iMax]) / P;
        return 1 / Math.sqrt(Math.max(Math.cos(Math.PI * phi) ** 2 + d * d * Math.sin(Math.PI * phi) ** 2, 1e-12));
      });
      const ab = weightedLine(s, unwrappedSorted, s.map(() => 1));
      if (!ab || !(ab[1] < 0)) continue;
      let score = 0;
      for (let i = 0; i < n; i++) {
        const r = wrapToPi(unwrappedSorted[i] - ab[0] - ab[1] * s[i]) / noise0;
        score += 2 * (Math.sqrt(1 + r * r) - 1);
      }
      starts.push({ tau: -ab[1] / (2 * omega), d, period: P, offset: bs[iMax], theta0: ab[0], score });
    }
  }
  starts.sort((a, b) => a.score - b.score);
  if (starts.length === 0) return failure('no starting point found: the phase does not decrease away from a maximum as τ_eff(Φ) requires');

  let sigmaAll = nGiven ? 0 : noise0;
  const sigmaOf = (i: number) => sg[i] ?? (nGiven ? medGiven : sigmaAll);
  const tauScale = Math.max(starts[0].tau, 1e-15);
  // search = true fits d² instead of d (common.ts asymmetrySpec)
  const runFit = (s: PhaseStart, covariance: boolean, holdD = false, search = false): FitResult => {
    const spec: ParameterSpec[] = [
      { name: 'tau_eff0_s', value: s.tau, min: 0, max: 1e3 * tauScale, diffScale: 1e-3 * tauScale },
      asymmetrySpec(s.d, holdD, search),
      { name: 'flux_period', value: s.period, min: (2 * span) / Math.max(n - 1, 1), max: 100 * span, diffScale: 1e-3 * span },
      { name: 'flux_offset', value: s.offset, min: centre - 50 * span, max: centre + 50 * span, diffScale: 1e-3 * span },
      { name: 'theta0_rad', value: s.theta0, min: -1e4, max: 1e4, diffScale: 1e-3 },
    ];
    const w = bias.map((_, i) => 1 / sigmaOf(i));
    const residual = (p: Readonly<Record<string, number>>) => {
      const { th } = phaseModelWithGradient(bias, p, omega, false);
      const r = new Float64Array(n);
      for (let i = 0; i < n; i++) r[i] = wrapToPi(ph[i] - th[i]) * w[i];
      return r;
    };
    const jacobian: JacobianFunction = (p, names) =>
      residualJacobian(phaseModelWithGradient(bias, p, omega, true).grad as Record<string, Float64Array>, names, w);
    return leastSquares(residual, spec, { loss, fScale, computeCovariance: covariance }, jacobian);
  };
  const chosen = chooseStarts(starts, Math.max(1, Math.floor(options.starts ?? 5)));
  const refined = refineStarts({
    starts: chosen, n, loss, fScale, symmetric, centre, warnings,
    run: runFit,
    valuesOf: (r: FitResult): PhaseStart => ({
      tau: r.params.tau_eff0_s.value, d: asymmetryOf(r), period: r.params.flux_period.value,
      offset: r.params.flux_offset.value, theta0: wrapToPi(r.params.theta0_rad.value), score: 0,
    }),
    onBest: (best) => {
      if (!nGiven) sigmaAll = Math.max(residualScale(best.residuals.map((r) => r * sigmaAll), nvary), 1e-9);
    },
  });
  if (!refined) return failure('every start failed to evaluate');
  const fit = refined.fit;

  const v = Object.fromEntries(Object.entries(fit.params).map(([k, q]) => [k, q.value]));
  const theta0 = wrapToPi(v.theta0_rad);
  const line = { tauEff0S: v.tau_eff0_s, asymmetry: v.asymmetry, period: periodSign * v.flux_period, offset: v.flux_offset, theta0Rad: theta0, probeFrequencyHz: fp };
  const { th } = phaseModelWithGradient(bias, v, omega, false);
  const wres = fit.residuals;
  const sRob = outlierScale(wres, fit.nvarys, nGiven > 0);
  const outliers: number[] = [];
  const pts: PhasePointOut[] = bias.map((b, i) => {
    const residual = wrapToPi(ph[i] - th[i]);
    const outlier = Math.abs(wres[i]) > 5 * sRob && Math.abs(residual) > 1e-6;
    if (outlier) outliers.push(i);
    return {
      index: i, bias: b, flux_phi0: fluxFromBias(b, line.period, line.offset), measured: ph[i], sigma: sg[i],
      model: ph[i] - residual, residual, weighted_residual: wres[i],
      robust_weight: fit.robustWeights ? fit.robustWeights[i] : null, outlier,
    };
  });
  const sq = { f0Hz: 1, gamma0: 4 * v.tau_eff0_s, asymmetry: v.asymmetry }; // τ = γ/(4 f0) with f0 = 1
  const phis = pts.map((p) => p.flux_phi0);
  const derived: Record<string, unknown> = {
    tau_eff0_s: v.tau_eff0_s,
    flux_coverage_phi0: [Math.min(...phis), Math.max(...phis)],
    phase_swing_rad: Math.max(...th) - Math.min(...th),
    noise_rad: robustSigma(pts.filter((p) => !p.outlier).map((p) => p.residual)),
    sigma_source: nGiven ? 'given' : 'estimated',
    reference_points: [0, 0.1, 0.2, 0.25, 0.3, 0.4].map((phi) => {
      const t = effectiveDelayDerivatives(phi, sq);
      return { flux_phi0: phi, bias: line.offset + line.period * phi, tau_eff_s: t.tau, dtau_dphi_s_per_phi0: t.dtaudphi, d2tau_dphi2_s_per_phi0sq: t.d2taudphi2 };
    }),
  };
  if (vph !== null) derived.l_eff0_m = vph * v.tau_eff0_s;
  if (z0 !== null) {
    const ls0 = z0 * v.tau_eff0_s;
    derived.ls0_h = ls0;
    const icSum = FLUX_QUANTUM / (2 * Math.PI * ls0);
    derived.ic_sum_a = icSum;
    if (loopL !== null) {
      const beta = screeningParameter(loopL, icSum / 2);
      derived.beta_l = beta;
      if (beta > HYSTERESIS_BETA_L) warnings.push(`β_L = ${beta.toFixed(3)} > 2/π: hysteretic SQUID; the apparent offset depends on the sweep direction`);
    }
  }
  const coverage = Math.max(...phis) - Math.min(...phis);
  if (coverage < 0.5) warnings.push(`the data cover only ${coverage.toFixed(2)} Φ0: asymmetry and period are correlated`);
  fitQualityWarnings(fit, warnings);
  if (outliers.length) warnings.push(`${outliers.length} point(s) flagged as outliers (|r| > 5 robust σ)`);
  const goodness = goodnessWarning(fit.redchi, nGiven > 0, 'sigmaRad');
  if (goodness) warnings.push(goodness);
  let success = fit.success;
  let message = fit.message;
  const swing = Math.max(...th) - Math.min(...th);
  const noise = derived.noise_rad as number;
  if (!(swing > 3 * noise)) {
    success = false;
    message = `phase swing ${swing.toExponential(2)} rad is not above 3× the noise ${noise.toExponential(2)} rad: no flux dependence resolved`;
  }
  const pv = (name: string, sign = 1): TuningParamValue => {
    const q = fit.params[name];
    const val = name === 'theta0_rad' ? theta0 : q.value * sign;
    return {
      value: val, stderr: q.stderr !== null && Number.isFinite(q.stderr) ? q.stderr : null, vary: q.vary,
      min: sign > 0 ? q.min : -q.max, max: sign > 0 ? q.max : -q.min,
    };
  };
  return {
    success, message, model: 'phase', loss, biasUnit, fit,
    params: {
      tau_eff0_s: pv('tau_eff0_s'), asymmetry: pv('asymmetry'), flux_period: pv('flux_period', periodSign),
      flux_offset: pv('flux_offset'), theta0_rad: pv('theta0_rad'),
    },
    line, outliers, points: pts, derived, warnings, fixed,
  };
}
