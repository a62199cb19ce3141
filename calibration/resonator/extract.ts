/**
 * Per-trace resonance extraction from complex S21 (notch) or S11 (reflection).
 *
 * Procedure of Probst et al., Rev. Sci. Instrum. 86, 024706 (2015), with the complex coupling
 * quality factor of Khalil et al., J. Appl. Phys. 111, 054510 (2012):
 *  1. cable delay τ from the phase slope on the wings, refined so the data best form a circle;
 *  2. algebraic (Pratt) circle fit of the delay-corrected data;
 *  3. fit of the angle about the circle centre, θ(f) = θ0 + 2·arctan(2Q_l(1 − f/f_r));
 *  4. the off-resonant point P = c − r·e^{iθ0} gives a = |P| and α = arg P; normalising by P,
 *     notch: |Q_c| = Q_l/(2r), φ = arg(1 − c) (= −arcsin(y_c/r) for |φ| < π/2, but defined for any
 *     φ); reflection: diameter 2r = 2Q_l/Q_c;
 *  5. a complex least-squares refinement of all parameters (re and im residuals stacked, weighted
 *     by the off-resonance noise) with an analytic Jacobian, for the standard errors.
 * Internally the delay is referenced to the window centre f_ref (phase a·e^{iα_ref}·e^{−2πi(f−f_ref)τ}),
 * which removes the near-total α–τ correlation of the absolute-frequency form; α is converted back to
 * the absolute convention of models.ts on output.
 *
 * Additions to the published procedure, each for a failure seen on synthetic sweeps:
 *  - delay candidates from each wing as well as both together, the most circular one wins (a
 *    resonance near one edge spoils that wing's slope);
 *  - a resonance narrow compared with the window (one wide window over a whole flux sweep) is
 *    located from |S − P| and the algebraic steps run on ±6 linewidths around it;
 *  - the refinement runs in two stages and is skipped when nothing significant was found, so
 *    empty traces cost little; a counter-clockwise circle (e^{−iωt} files) is fitted conjugated.
 * Flags (checked in this order): no_resonance (f_r outside the window, fewer than 2 linewidths in
 * the window or 2 steps per linewidth, or Δχ² over a flat background below minDeltaChi2) → values
 * null; fit_failed (no convergence, non-finite values) → values null; low_snr (diameter/noise rms
 * below minSnr) → values kept.
 */
import { leastSquares } from '../fit/leastsq';
import type { FitResult, ParameterSpec } from '../fit/types';
import type { TraceJson } from '../contract';
import { fitCirclePratt } from './circle';
import type { ResonatorGeometry } from './models';
import {
  centredPhase,
  delayCandidates,
  locateNarrowResonance,
  noiseFromSecondDifferences,
  refineDelay,
  removeDelay,
  uniformStep,
  validateTrace,
  wrapAngle,
} from './prep';

export type TraceFlag = null | 'no_resonance' | 'low_snr' | 'fit_failed';

export interface ExtractOptions {
  geometry: ResonatorGeometry;
  /** Known cable delay, s: skips the delay estimate and holds τ fixed in the refinement. */
  delayS?: number;
  /**
   * Minimum SNR = circle diameter / complex noise rms. Default 4 (common practice puts the
   * threshold at 3–5).
   */
  minSnr?: number;
  /**
   * Minimum improvement of χ² (in units of the fitted noise variance) of the resonance model over
   * a resonance-free background for a resonance to count as present. Default 50: far above the
   * ~20 that the best of ~1000 trial positions reaches on pure noise (χ² tail with 4 extra
   * parameters; common practice for a look-elsewhere margin).
   */
  minDeltaChi2?: number;
  /** Iteration cap of the complex refinement (tests use a tiny value to provoke fit_failed). */
  maxIterations?: number;
}

export interface TraceExtraction {
  geometry: ResonatorGeometry;
  frHz: number | null;
  frStderrHz: number | null;
  ql: number | null;
  qlStderr: number | null;
  /** |Q_c| (notch) or Q_c (reflection). */
  qcAbs: number | null;
  qcStderr: number | null;
  /** φ of Q_c = |Q_c|e^{−iφ}; 0 for reflection. */
  phiRad: number | null;
  phiStderrRad: number | null;
  qi: number | null;
  qiStderr: number | null;
  a: number | null;
  /** α of a·e^{iα}·e^{−2πifτ} with absolute f, wrapped to (−π, π]. */
  alphaRad: number | null;
  delayS: number | null;
  delayStderrS: number | null;
  /** Circle diameter / complex noise rms (rms of |noise|, = √2 σ per quadrature). */
  snr: number | null;
  /** Complex noise rms from the refinement residuals. */
  noiseRms: number | null;
  /** Complex noise rms estimated off resonance (second differences) and used as weights. */
  noiseRmsOffResonance: number;
  /** χ² improvement of the resonance model over a flat background (noise-variance units). */
  deltaChi2: number | null;
  /** Circle of the result in the delay-removed frame S·e^{+2πifτ} (absolute f). */
  circle: { xc: number; yc: number; r: number } | null;
  flag: TraceFlag;
  reason: string | null;
  /** true when the input was conjugated before fitting (counter-clockwise resonance circle). */
  conjugated: boolean;
  /** Complex refinement: parameters a, alpha_ref (α at f_ref), tau, fr, ql, qc, phi (notch). */
  fit?: FitResult;
  /** Window centre that alpha_ref in `fit` refers to, Hz. */
  fRefHz: number;
  /** Algebraic (pre-refinement) estimates, for diagnostics. */
  initial: {
    frHz: number; ql: number; qcAbs: number; phiRad: number; a: number; alphaRad: number; delayS: number;
    /** Iterations of the centred-phase fit. */
    phaseFitIterations: number;
    /** Index range [lo, hi) the algebraic steps used (a crop around a narrow resonance, or all). */
    window: [number, number];
    /** Net clockwise angle of the centred circle from first to last point, rad. */
    phaseSweepRad: number;
  } | null;
  elapsedMs: number;
}

const DEFAULT_MIN_SNR = 4;
const DEFAULT_MIN_DELTA_CHI2 = 50;
/**
 * Good traces converge in 2–6 iterations from the algebraic start; a cap keeps traces without a
 * resolvable resonance (which make LM wander) from costing 100× a good one in a sweep.
 */
const DEFAULT_MAX_ITERATIONS = 30;
/** Iterations after which a not-yet-converged refinement must show a significant resonance. */
const FIRST_STAGE_ITERATIONS = 8;
/** Window must cover this many linewidths (Q_l·span/f_r), common practice. */
const MIN_LINEWIDTHS_IN_SPAN = 2;
/** A linewidth must cover this many frequency steps to be resolved, common practice. */
const MIN_POINTS_PER_LINEWIDTH = 2;

interface ModelPoint {
  a: number;
  alphaRef: number;
  tau: number;
  fr: number;
  ql: number;
  qc: number;
  phi: number;
}

const now = (): number => (typeof performance !== 'undefined' ? performance.now() : Date.now());

/**
 * Environment phasor e^{i(α_ref − 2π(f − f_ref)τ)} into (c, s). On a uniform grid by a complex
 * recurrence re-anchored every 128 points (one product per point instead of two trig calls).
 */
function environmentPhasor(f: ArrayLike<number>, fRef: number, alphaRef: number, tau: number, step: number | null, c: Float64Array, s: Float64Array): void {
  const n = f.length;
  if (step === null) {
    for (let i = 0; i < n; i++) {
      const ph = alphaRef - 2 * Math.PI * (f[i] - fRef) * tau;
      c[i] = Math.cos(ph);
      s[i] = Math.sin(ph);
    }
    return;
  }
  const ph0 = alphaRef - 2 * Math.PI * (f[0] - fRef) * tau;
  const dph = -2 * Math.PI * step * tau;
  const dc = Math.cos(dph);
  const ds = Math.sin(dph);
  let cr = 1;
  let ci = 0;
  for (let i = 0; i < n; i++) {
    if ((i & 127) === 0) {
      const ph = ph0 + i * dph;
      cr = Math.cos(ph);
      ci = Math.sin(ph);
    }
    c[i] = cr;
    s[i] = ci;
    const t = cr * dc - ci * ds;
    ci = cr * ds + ci * dc;
    cr = t;
  }
}

/** Model in the centre-referenced form; writes re/im (pc/ps: phasor scratch). */
function modelInto(
  geometry: ResonatorGeometry, f: ArrayLike<number>, fRef: number, p: ModelPoint, outRe: Float64Array, outIm: Float64Array,
  step: number | null, pc: Float64Array, ps: Float64Array,
): void {
  const n = f.length;
  const notch = geometry === 'notch';
  const kAbs = notch ? p.ql / p.qc : (2 * p.ql) / p.qc;
  const kr = notch ? kAbs * Math.cos(p.phi) : kAbs;
  const ki = notch ? kAbs * Math.sin(p.phi) : 0;
  environmentPhasor(f, fRef, p.alphaRef, p.tau, step, pc, ps);
  for (let i = 0; i < n; i++) {
    const u = 2 * p.ql * (f[i] / p.fr - 1);
    const d = 1 / (1 + u * u);
    const lr = d;
    const li = -u * d;
    const sr = 1 - (kr * lr - ki * li);
    const si = -(kr * li + ki * lr);
    const br = p.a * pc[i];
    const bi = p.a * ps[i];
    outRe[i] = br * sr - bi * si;
    outIm[i] = br * si + bi * sr;
  }
}

function nullResult(geometry: ResonatorGeometry, fRef: number, noiseOff: number, flag: TraceFlag, reason: string, t0: number): TraceExtraction {
  return {
    geometry, frHz: null, frStderrHz: null, ql: null, qlStderr: null, qcAbs: null, qcStderr: null, phiRad: null,
    phiStderrRad: null, qi: null, qiStderr: null, a: null, alphaRad: null, delayS: null, delayStderrS: null, snr: null,
    noiseRms: null, noiseRmsOffResonance: noiseOff, deltaChi2: null, circle: null, flag, reason, conjugated: false, fRefHz: fRef,
    initial: null, elapsedMs: now() - t0,
  };
}

const fmtHz = (x: number): string => {
  const ax = Math.abs(x);
  if (ax >= 1e9) return `${(x / 1e9).toPrecision(7)} GHz`;
  if (ax >= 1e6) return `${(x / 1e6).toPrecision(5)} MHz`;
  if (ax >= 1e3) return `${(x / 1e3).toPrecision(4)} kHz`;
  return `${x.toPrecision(3)} Hz`;
};

/**
 * Extracts f_r, Q_l, Q_c, φ, Q_i (with standard errors) from one complex trace. Bad input (unequal
 * lengths, non-finite values, non-increasing frequencies, fewer than 20 points) throws; every
 * physics outcome, including failure, is a result with a flag and a reason, never NaN.
 */
export function extractResonance(
  freqHz: ArrayLike<number>, re: ArrayLike<number>, im: ArrayLike<number>, opts: ExtractOptions,
): TraceExtraction {
  const t0 = now();
  validateTrace(freqHz, re, im);
  const first = extractCore(freqHz, re, im, opts, t0);
  // A resonance circle turning counter-clockwise means the file uses the e^{−iωt} sign convention
  // (S conjugated relative to a VNA's e^{+jωt}); fit the conjugate too and keep the better result.
  if (first.initial && first.initial.phaseSweepRad < -1) {
    const conjIm = Float64Array.from(im, (v) => -v);
    const second = extractCore(freqHz, re, conjIm, opts, t0);
    const rank = (e: TraceExtraction) => (e.flag === null ? 0 : e.flag === 'low_snr' ? 1 : 2);
    const better = rank(second) < rank(first) || (rank(second) === rank(first) && (second.deltaChi2 ?? -Infinity) > (first.deltaChi2 ?? -Infinity));
    if (better) {
      second.conjugated = true;
      if (second.reason === null) {
        second.reason = 'phase turns counter-clockwise with frequency: the data were conjugated (e^{−iωt} sign convention) before fitting; α and φ refer to the conjugate';
      }
      second.elapsedMs = now() - t0;
      return second;
    }
  }
  return first;
}

function extractCore(
  freqHz: ArrayLike<number>, re: ArrayLike<number>, im: ArrayLike<number>, opts: ExtractOptions, t0: number,
): TraceExtraction {
  const geometry = opts.geometry;
  if (geometry !== 'notch' && geometry !== 'reflection') {
    throw new Error(`resonator: geometry must be 'notch' or 'reflection' (got ${String(geometry)})`);
  }
  if (opts.delayS !== undefined && !Number.isFinite(opts.delayS)) {
    throw new Error(`resonator: delayS = ${opts.delayS} is not a finite number`);
  }
  const minSnr = opts.minSnr ?? DEFAULT_MIN_SNR;
  const minDeltaChi2 = opts.minDeltaChi2 ?? DEFAULT_MIN_DELTA_CHI2;
  const notch = geometry === 'notch';
  const n = freqHz.length;
  const f0 = freqHz[0];
  const f1 = freqHz[n - 1];
  const span = f1 - f0;
  const fRef = 0.5 * (f0 + f1);
  const step = uniformStep(freqHz);
  const meanStep = span / (n - 1);

  // 1. Cable delay candidates from the wings; with the joint one removed, look for a resonance that
  // is narrow compared with the window and, if found, run the algebraic steps on a crop around it.
  const candidates = opts.delayS !== undefined ? [opts.delayS] : delayCandidates(freqHz, re, im);
  const wr = new Float64Array(n);
  const wi = new Float64Array(n);
  removeDelay(freqHz, re, im, fRef, candidates[0], wr, wi, step);
  const crop = locateNarrowResonance(freqHz, wr, wi, Math.SQRT2 * noiseFromSecondDifferences(freqHz, re, im));
  const lo = crop ? crop.lo : 0;
  const hi = crop ? crop.hi : n;
  const m = hi - lo;
  const fa = crop ? Float64Array.from({ length: m }, (_, i) => freqHz[lo + i]) : freqHz;
  const ra = crop ? Float64Array.from({ length: m }, (_, i) => re[lo + i]) : re;
  const ia = crop ? Float64Array.from({ length: m }, (_, i) => im[lo + i]) : im;
  let tau: number;
  if (opts.delayS !== undefined) {
    tau = opts.delayS;
  } else {
    // Search ±0.3 turn of residual phase across the whole window around the best candidate (the
    // wing estimate is that good); judge circularity on the crop, where the resonance dominates.
    tau = refineDelay(fa, ra, ia, fRef, candidates, 0.3 / span, step).tau;
  }
  const war = crop ? new Float64Array(m) : wr;
  const wai = crop ? new Float64Array(m) : wi;
  removeDelay(fa, ra, ia, fRef, tau, war, wai, step);

  // 2. Circle.
  const circle = fitCirclePratt(war, wai, m);
  if (circle === null) {
    return nullResult(geometry, fRef, Math.SQRT2 * noiseFromSecondDifferences(freqHz, re, im), 'fit_failed', 'circle fit failed: the points are degenerate (all equal or collinear)', t0);
  }

  // 3. Angle about the centre.
  const { theta, guess, sweep } = centredPhase(fa, war, wai, circle);
  const phaseFit = leastSquares(
    (p) => {
      const out = new Float64Array(m);
      const th0 = p.theta0;
      const fr = p.fr;
      const ql = p.ql;
      for (let i = 0; i < m; i++) out[i] = wrapAngle(theta[i] - th0 - 2 * Math.atan(2 * ql * (1 - fa[i] / fr)));
      return out;
    },
    [
      { name: 'theta0', value: guess.theta0 },
      { name: 'fr', value: guess.frHz },
      { name: 'ql', value: guess.ql, min: 1 },
    ],
    { maxIterations: 20, computeCovariance: false },
    (p, names) => {
      // column-major (see fit/types.ts JacobianFunction): column j = ∂r/∂names[j]
      const k = names.length;
      const cols = new Float64Array(m * k);
      const fr = p.fr;
      const ql = p.ql;
      const idx = names.map((nm) => ['theta0', 'fr', 'ql'].indexOf(nm));
      for (let i = 0; i < m; i++) {
        const x = 1 - fa[i] / fr;
        const u = 2 * ql * x;
        const w = 2 / (1 + u * u);
        // residual = θ_i − model; d model/dθ0 = 1, d/dfr = w·2Q f/fr², d/dQ = w·2x.
        const dF = (-w * 2 * ql * fa[i]) / (fr * fr);
        const dQ = -w * 2 * x;
        for (let j = 0; j < k; j++) cols[j * m + i] = idx[j] === 0 ? -1 : idx[j] === 1 ? dF : dQ;
      }
      return cols;
    },
  );
  let theta0 = guess.theta0;
  let frInit = guess.frHz;
  let qlInit = guess.ql;
  const pf = phaseFit.params;
  if (Number.isFinite(pf.theta0.value) && Number.isFinite(pf.fr.value) && pf.ql.value > 0) {
    theta0 = pf.theta0.value;
    frInit = pf.fr.value;
    qlInit = pf.ql.value;
  }

  // 4. Off-resonant point, normalisation, coupling.
  const pr = circle.xc - circle.r * Math.cos(theta0);
  const pi = circle.yc - circle.r * Math.sin(theta0);
  const aInit = Math.hypot(pr, pi);
  const alphaRefInit = Math.atan2(pi, pr);
  // Normalised centre c/P.
  const cnr = (circle.xc * pr + circle.yc * pi) / (aInit * aInit);
  const cni = (circle.yc * pr - circle.xc * pi) / (aInit * aInit);
  const rn = circle.r / aInit;
  const qcInit = notch ? qlInit / (2 * rn) : qlInit / rn;
  const phiInit = notch ? Math.atan2(-cni, 1 - cnr) : 0;
  const initial = {
    frHz: frInit, ql: qlInit, qcAbs: qcInit, phiRad: phiInit, a: aInit,
    alphaRad: wrapAngle(alphaRefInit + 2 * Math.PI * fRef * tau), delayS: tau,
    phaseFitIterations: phaseFit.iterations, window: [lo, hi] as [number, number], phaseSweepRad: sweep,
  };

  // Noise off resonance: exclude ±5 linewidths around the first estimate.
  const sigmaOff = Math.max(
    noiseFromSecondDifferences(freqHz, re, im, frInit, (5 * frInit) / Math.max(qlInit, 1)),
    1e-300,
  );

  // 5. Complex refinement.
  const names = notch ? ['a', 'alpha_ref', 'tau', 'fr', 'ql', 'qc', 'phi'] : ['a', 'alpha_ref', 'tau', 'fr', 'ql', 'qc'];
  const mr = new Float64Array(n);
  const mi = new Float64Array(n);
  const pc = new Float64Array(n);
  const ps = new Float64Array(n);
  const point = (p: Readonly<Record<string, number>>): ModelPoint => ({
    a: p.a, alphaRef: p.alpha_ref, tau: p.tau, fr: p.fr, ql: p.ql, qc: p.qc, phi: notch ? p.phi : 0,
  });
  const inv = 1 / sigmaOff;
  const residual = (p: Readonly<Record<string, number>>): Float64Array => {
    modelInto(geometry, freqHz, fRef, point(p), mr, mi, step, pc, ps);
    const out = new Float64Array(2 * n);
    for (let i = 0; i < n; i++) {
      out[i] = (re[i] - mr[i]) * inv;
      out[n + i] = (im[i] - mi[i]) * inv;
    }
    return out;
  };
  // column-major (see fit/types.ts JacobianFunction): rows 0…n−1 are Re, n…2n−1 are Im
  const jacobian = (p: Readonly<Record<string, number>>, varying: readonly string[]): Float64Array => {
    const q = point(p);
    const col = varying.map((nm) => names.indexOf(nm));
    const kAbs = notch ? q.ql / q.qc : (2 * q.ql) / q.qc;
    const kr = notch ? kAbs * Math.cos(q.phi) : kAbs;
    const ki = notch ? kAbs * Math.sin(q.phi) : 0;
    const nr = 2 * n;
    const k = col.length;
    const cols = new Float64Array(nr * k);
    const dRe = new Float64Array(7);
    const dIm = new Float64Array(7);
    environmentPhasor(freqHz, fRef, q.alphaRef, q.tau, step, pc, ps);
    for (let i = 0; i < n; i++) {
      const f = freqHz[i];
      const x = f / q.fr - 1;
      const u = 2 * q.ql * x;
      const d = 1 / (1 + u * u);
      const lr = d;
      const li = -u * d;
      // KL, L² (complex)
      const klr = kr * lr - ki * li;
      const kli = kr * li + ki * lr;
      const l2r = lr * lr - li * li;
      const l2i = 2 * lr * li;
      const kl2r = kr * l2r - ki * l2i;
      const kl2i = kr * l2i + ki * l2r;
      const sr = 1 - klr;
      const si = -kli;
      const br = q.a * pc[i];
      const bi = q.a * ps[i];
      const m_r = br * sr - bi * si;
      const m_i = br * si + bi * sr;
      // ∂S/∂p for the resonance parameters, then ∂m = B·∂S.
      // ∂S/∂Q = −KL/Q + KL²·2ix ; ∂S/∂Qc = KL/Qc ; ∂S/∂φ = −iKL ; ∂S/∂fr = −KL²·2iQ f/fr².
      const dsQr = -klr / q.ql - 2 * x * kl2i;
      const dsQi = -kli / q.ql + 2 * x * kl2r;
      const dsCr = klr / q.qc;
      const dsCi = kli / q.qc;
      const cf = (2 * q.ql * f) / (q.fr * q.fr);
      const dsFr = cf * kl2i;
      const dsFi = -cf * kl2r;
      const dsPr = kli;
      const dsPi = -klr;
      const w = -2 * Math.PI * (f - fRef);
      // a, alpha_ref, tau
      // ∂m/∂a = (B/a)·S, written without dividing by a (a may sit on its bound 0).
      dRe[0] = pc[i] * sr - ps[i] * si; dIm[0] = pc[i] * si + ps[i] * sr;
      dRe[1] = -m_i; dIm[1] = m_r;
      dRe[2] = -w * m_i; dIm[2] = w * m_r;
      dRe[3] = br * dsFr - bi * dsFi; dIm[3] = br * dsFi + bi * dsFr;
      dRe[4] = br * dsQr - bi * dsQi; dIm[4] = br * dsQi + bi * dsQr;
      dRe[5] = br * dsCr - bi * dsCi; dIm[5] = br * dsCi + bi * dsCr;
      dRe[6] = br * dsPr - bi * dsPi; dIm[6] = br * dsPi + bi * dsPr;
      for (let j = 0; j < k; j++) {
        cols[j * nr + i] = -dRe[col[j]] * inv;
        cols[j * nr + n + i] = -dIm[col[j]] * inv;
      }
    }
    return cols;
  };

  const specs: ParameterSpec[] = [
    { name: 'a', value: aInit, min: 0 },
    { name: 'alpha_ref', value: alphaRefInit },
    { name: 'tau', value: tau, vary: opts.delayS === undefined },
    // f_r may leave the window (then flagged) but not wander off without bound.
    { name: 'fr', value: frInit, min: f0 - span, max: f1 + span },
    { name: 'ql', value: qlInit, min: 1 },
    { name: 'qc', value: qcInit, min: 1e-6 },
  ];
  if (notch) specs.push({ name: 'phi', value: phiInit, min: -Math.PI, max: Math.PI });
  const initialOk = [aInit, alphaRefInit, frInit, qlInit, qcInit, phiInit].every(Number.isFinite) && aInit > 0 && qcInit > 0;
  // An algebraic f_r more than half a span outside the window means only a tail (or nothing) is
  // visible: refining would only wander, and the trace is flagged from the estimate.
  const initialNearWindow = frInit > f0 - 0.5 * span && frInit < f1 + 0.5 * span;
  const valuesOf = (ft: FitResult): ModelPoint => point(Object.fromEntries(Object.entries(ft.params).map(([k, p]) => [k, p.value])));
  const isFinitePoint = (q: ModelPoint) => [q.a, q.alphaRef, q.tau, q.fr, q.ql, q.qc, q.phi].every(Number.isFinite) && q.ql > 0 && q.qc > 0 && q.a > 0;

  // Significance against a resonance-free background a·e^{iα}·e^{−2πifτ} at the same τ:
  // Δχ² = (SS_background − SS_resonance)/σ², σ² = SS_resonance/(2N − p).
  const significance = (q: ModelPoint): { deltaChi2: number; noiseRms: number } => {
    modelInto(geometry, freqHz, fRef, q, mr, mi, step, pc, ps);
    let ssRes = 0;
    for (let i = 0; i < n; i++) ssRes += (re[i] - mr[i]) ** 2 + (im[i] - mi[i]) ** 2;
    removeDelay(freqHz, re, im, fRef, q.tau, wr, wi, step);
    let mR = 0;
    let mI = 0;
    for (let i = 0; i < n; i++) {
      mR += wr[i];
      mI += wi[i];
    }
    mR /= n;
    mI /= n;
    let ssBg = 0;
    for (let i = 0; i < n; i++) ssBg += (wr[i] - mR) ** 2 + (wi[i] - mI) ** 2;
    const sigma2 = Math.max(ssRes / (2 * n - names.length), 1e-300);
    return { deltaChi2: (ssBg - ssRes) / sigma2, noiseRms: Math.sqrt(2 * sigma2) };
  };

  // Refinement in two stages: a short first run; if it has not converged and what it found is not
  // significant, the trace has no resonance and the remaining iterations are not spent on it.
  const cap = opts.maxIterations ?? DEFAULT_MAX_ITERATIONS;
  const firstStage = Math.min(cap, FIRST_STAGE_ITERATIONS);
  const initialPoint: ModelPoint = { a: aInit, alphaRef: alphaRefInit, tau, fr: frInit, ql: qlInit, qc: qcInit, phi: phiInit };
  // Pure noise: the centred-phase fit wanders to its cap and the algebraic estimate explains
  // nothing; then the refinement is skipped (the trace is judged on the estimate).
  const hopeless = initialOk && !phaseFit.success && isFinitePoint(initialPoint) && significance(initialPoint).deltaChi2 < minDeltaChi2;
  let fit: FitResult | undefined;
  if (initialOk && initialNearWindow && !hopeless) {
    fit = leastSquares(residual, specs, { maxIterations: firstStage }, jacobian);
    if (!fit.success && fit.iterations >= firstStage && cap > firstStage) {
      const q = valuesOf(fit);
      if (isFinitePoint(q) && significance(q).deltaChi2 >= minDeltaChi2) {
        const restart = specs.map((sp) => ({ ...sp, value: fit!.params[sp.name].value }));
        fit = leastSquares(residual, restart, { maxIterations: cap - firstStage }, jacobian);
      }
    }
  }

  // Values to judge: the refinement when it converged, else the algebraic estimate.
  // A non-converged refinement still returns its last accepted point, which fits at least as well
  // as the algebraic start: judge presence of a resonance on it.
  const converged = fit !== undefined && fit.success;
  const fitPoint = fit ? valuesOf(fit) : null;
  const v: ModelPoint = fitPoint && Object.values(fitPoint).every(Number.isFinite) ? fitPoint : initialPoint;
  const finite = isFinitePoint(v);
  let deltaChi2: number | null = null;
  let noiseRms: number | null = null;
  if (finite) ({ deltaChi2, noiseRms } = significance(v));

  const radius = finite ? (notch ? (v.a * v.ql) / (2 * v.qc) : (v.a * v.ql) / v.qc) : null;
  const snr = radius !== null && noiseRms !== null ? (2 * radius) / noiseRms : null;
  const linewidth = finite ? v.fr / v.ql : null;

  // Classification: absence first (nothing to report), then failure, then weak signal.
  let flag: TraceFlag = null;
  let reason: string | null = null;
  if (finite && linewidth !== null) {
    if (v.fr < f0 || v.fr > f1) {
      flag = 'no_resonance';
      reason = `no resonance in the window: ${converged ? 'fitted' : 'estimated'} f_r = ${fmtHz(v.fr)} lies outside ${fmtHz(f0)} – ${fmtHz(f1)}`;
    } else if (span / linewidth < MIN_LINEWIDTHS_IN_SPAN) {
      flag = 'no_resonance';
      reason = `linewidth not resolved: f_r/Q_l = ${fmtHz(linewidth)} but the window spans only ${(span / linewidth).toFixed(2)} linewidths (need ≥ ${MIN_LINEWIDTHS_IN_SPAN})`;
    } else if (linewidth / meanStep < MIN_POINTS_PER_LINEWIDTH) {
      flag = 'no_resonance';
      reason = `linewidth not resolved: f_r/Q_l = ${fmtHz(linewidth)} is only ${(linewidth / meanStep).toFixed(2)} frequency steps (need ≥ ${MIN_POINTS_PER_LINEWIDTH})`;
    } else if (deltaChi2 !== null && deltaChi2 < minDeltaChi2) {
      flag = 'no_resonance';
      reason = `no resonance in the window: the resonance model improves χ² over a flat background by only ${deltaChi2.toFixed(1)} (need ≥ ${minDeltaChi2}); the dip is comparable to the noise`;
    }
  }
  if (flag === null && !converged) {
    flag = 'fit_failed';
    reason = fit === undefined
      ? 'fit failed: the algebraic estimate is not finite (circle or off-resonant point degenerate)'
      : `fit failed: complex refinement did not converge (${fit.message})`;
  } else if (flag === null && !finite) {
    flag = 'fit_failed';
    reason = 'fit failed: the refined parameters are not finite or not positive';
  }
  if (flag === 'no_resonance' || flag === 'fit_failed') {
    const out = nullResult(geometry, fRef, Math.SQRT2 * sigmaOff, flag, reason as string, t0);
    out.fit = fit;
    out.initial = initial;
    out.deltaChi2 = deltaChi2;
    out.noiseRms = noiseRms;
    out.elapsedMs = now() - t0;
    return out;
  }
  if (snr !== null && snr < minSnr) {
    flag = 'low_snr';
    reason = `SNR too low: circle diameter / noise rms = ${snr.toFixed(2)} (need ≥ ${minSnr})`;
  }

  // Q_i and its standard error from the covariance (first-order propagation).
  const par = fit!.params;
  const cov = fit!.covariance;
  const vn = fit!.varyingNames;
  const sd = (k: string): number | null => {
    const s = par[k]?.stderr;
    return s !== undefined && s !== null && Number.isFinite(s) ? s : null;
  };
  const g = 1 / v.ql - (notch ? Math.cos(v.phi) / v.qc : 1 / v.qc);
  let qi: number | null = null;
  let qiStderr: number | null = null;
  if (g > 0 && Number.isFinite(g)) {
    qi = 1 / g;
    if (cov) {
      const grad: Record<string, number> = {
        ql: -1 / (v.ql * v.ql),
        qc: (notch ? Math.cos(v.phi) : 1) / (v.qc * v.qc),
        phi: notch ? Math.sin(v.phi) / v.qc : 0,
      };
      let varG = 0;
      let ok = true;
      for (const ka of ['ql', 'qc', 'phi']) {
        const ia = vn.indexOf(ka);
        if (ia < 0 || grad[ka] === 0) continue;
        if (par[ka].atBound) ok = false;
        for (const kb of ['ql', 'qc', 'phi']) {
          const ib = vn.indexOf(kb);
          if (ib < 0 || grad[kb] === 0) continue;
          varG += grad[ka] * grad[kb] * cov[ia][ib];
        }
      }
      if (ok && varG >= 0 && Number.isFinite(varG)) qiStderr = Math.sqrt(varG) / (g * g);
    }
  } else if (reason === null) {
    reason = `Q_i not resolved: 1/Q_l − ${notch ? 'cos φ/|Q_c|' : '1/Q_c'} = ${g.toExponential(3)} ≤ 0 (internal losses below the resolution of this trace)`;
  }

  const alphaAbs = wrapAngle(v.alphaRef + 2 * Math.PI * fRef * v.tau);
  const kk = notch ? v.ql / (2 * v.qc) : v.ql / v.qc;
  // Centre a·e^{iα}(1 − r_n·e^{iφ}) in the frame S·e^{+2πifτ}.
  const cr = 1 - kk * Math.cos(v.phi);
  const ci = -kk * Math.sin(v.phi);
  return {
    geometry,
    frHz: v.fr,
    frStderrHz: sd('fr'),
    ql: v.ql,
    qlStderr: sd('ql'),
    qcAbs: v.qc,
    qcStderr: sd('qc'),
    phiRad: notch ? wrapAngle(v.phi) : 0,
    phiStderrRad: notch ? sd('phi') : null,
    qi,
    qiStderr,
    a: v.a,
    alphaRad: alphaAbs,
    delayS: v.tau,
    delayStderrS: sd('tau'),
    snr,
    noiseRms,
    noiseRmsOffResonance: Math.SQRT2 * sigmaOff,
    deltaChi2,
    circle: {
      xc: v.a * (Math.cos(alphaAbs) * cr - Math.sin(alphaAbs) * ci),
      yc: v.a * (Math.sin(alphaAbs) * cr + Math.cos(alphaAbs) * ci),
      r: v.a * kk,
    },
    flag,
    reason,
    conjugated: false,
    fit,
    fRefHz: fRef,
    initial,
    elapsedMs: now() - t0,
  };
}

const finiteOrNull = (x: number | null | undefined): number | null => (x !== null && x !== undefined && Number.isFinite(x) ? x : null);

/** Maps one extraction to the calibration JSON trace entry (contract.ts TraceJson). */
export function traceToJson(bias: number, e: TraceExtraction, rows?: [number, number] | null, file?: string | null): TraceJson {
  return {
    bias,
    fr_hz: finiteOrNull(e.frHz),
    fr_stderr_hz: finiteOrNull(e.frStderrHz),
    ql: finiteOrNull(e.ql),
    ql_stderr: finiteOrNull(e.qlStderr),
    qc: finiteOrNull(e.qcAbs),
    qc_stderr: finiteOrNull(e.qcStderr),
    qi: finiteOrNull(e.qi),
    qi_stderr: finiteOrNull(e.qiStderr),
    phi_rad: e.geometry === 'notch' ? finiteOrNull(e.phiRad) : null,
    flag: e.flag,
    reason: e.reason,
    snr: finiteOrNull(e.snr),
    rows: rows ?? null,
    file: file ?? null,
  };
}

export interface SweepTrace {
  bias: number;
  freqHz: ArrayLike<number>;
  re: ArrayLike<number>;
  im: ArrayLike<number>;
  rows?: [number, number] | null;
  file?: string | null;
}

export interface SweepSummary {
  total: number;
  good: number;
  noResonance: number;
  lowSnr: number;
  fitFailed: number;
  /** Mean wall time per trace, ms. */
  msPerTrace: number;
  /** One line per flagged trace: bias, where, reason. */
  flagged: string[];
}

export interface SweepExtraction {
  traces: TraceJson[];
  results: TraceExtraction[];
  summary: SweepSummary;
}

/**
 * Runs every trace of a sweep. Bad input in a trace throws with the trace's bias, file and rows
 * in the message; physics failures are flagged per trace.
 */
export function extractSweep(traces: readonly SweepTrace[], opts: ExtractOptions): SweepExtraction {
  const t0 = now();
  const results: TraceExtraction[] = [];
  const json: TraceJson[] = [];
  const summary: SweepSummary = { total: traces.length, good: 0, noResonance: 0, lowSnr: 0, fitFailed: 0, msPerTrace: 0, flagged: [] };
  traces.forEach((t, k) => {
    const where = [
      t.file ? `file ${t.file}` : null,
      t.rows ? `rows ${t.rows[0]}–${t.rows[1]}` : null,
    ].filter(Boolean).join(', ');
    let e: TraceExtraction;
    try {
      e = extractResonance(t.freqHz, t.re, t.im, opts);
    } catch (err) {
      const msg = err instanceof Error ? err.message : String(err);
      throw new Error(`trace ${k + 1} of ${traces.length} (bias ${t.bias}${where ? `, ${where}` : ''}): ${msg}`);
    }
    results.push(e);
    json.push(traceToJson(t.bias, e, t.rows, t.file));
    if (e.flag === null) summary.good++;
    else {
      if (e.flag === 'no_resonance') summary.noResonance++;
      else if (e.flag === 'low_snr') summary.lowSnr++;
      else summary.fitFailed++;
      summary.flagged.push(`bias ${t.bias}${where ? ` (${where})` : ''}: ${e.reason}`);
    }
  });
  summary.msPerTrace = traces.length ? (now() - t0) / traces.length : 0;
  return { traces: json, results, summary };
}

/** Joins the extractions of consecutive chunks of one sweep (worker pools split sweeps by trace). */
export function mergeExtractions(parts: readonly SweepExtraction[]): SweepExtraction {
  const summaries = parts.map((p) => p.summary);
  const total = summaries.reduce((s, p) => s + p.total, 0);
  const sum = (k: 'good' | 'noResonance' | 'lowSnr' | 'fitFailed') => summaries.reduce((s, p) => s + p[k], 0);
  return {
    traces: parts.flatMap((p) => p.traces),
    results: parts.flatMap((p) => p.results),
    summary: {
      total,
      good: sum('good'),
      noResonance: sum('noResonance'),
      lowSnr: sum('lowSnr'),
      fitFailed: sum('fitFailed'),
      msPerTrace: total ? summaries.reduce((s, p) => s + p.msPerTrace * p.total, 0) / total : 0,
      flagged: summaries.flatMap((p) => p.flagged),
    },
  };
}
