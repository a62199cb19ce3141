/**
 * Algebraic preparation steps of the resonance extraction (Probst et al., Rev. Sci. Instrum. 86,
 * 024706 (2015)): input checks, noise estimate off resonance, cable delay from the phase slope and
 * its refinement by circle-fit quality, centred-circle phase and initial guesses.
 */
import { fitCirclePratt, type CircleFit } from './circle';
import { medianInPlace as median, secondDifferenceSigma } from '../util/stats';

export const MIN_POINTS = 20;

/** Throws a clear error naming the first bad sample. */
export function validateTrace(freqHz: ArrayLike<number>, re: ArrayLike<number>, im: ArrayLike<number>): void {
  const n = freqHz.length;
  if (re.length !== n || im.length !== n) {
    throw new Error(`resonator: freqHz, re and im must have equal lengths (got ${n}, ${re.length}, ${im.length})`);
  }
  if (n < MIN_POINTS) throw new Error(`resonator: a trace needs at least ${MIN_POINTS} points (got ${n})`);
  for (let i = 0; i < n; i++) {
    if (!Number.isFinite(freqHz[i])) throw new Error(`resonator: freqHz[${i}] = ${freqHz[i]} is not a finite number`);
    if (!Number.isFinite(re[i])) throw new Error(`resonator: re[${i}] = ${re[i]} is not a finite number`);
    if (!Number.isFinite(im[i])) throw new Error(`resonator: im[${i}] = ${im[i]} is not a finite number`);
    if (i > 0 && !(freqHz[i] > freqHz[i - 1])) {
      throw new Error(`resonator: frequencies must increase strictly; freqHz[${i}] = ${freqHz[i]} follows ${freqHz[i - 1]}`);
    }
  }
  if (!(freqHz[0] > 0)) throw new Error(`resonator: frequencies must be positive (freqHz[0] = ${freqHz[0]})`);
}

/**
 * Noise per quadrature from second differences, σ = 1.4826·MAD/√6 (for white noise
 * Var(z_{i+1} − 2z_i + z_{i−1}) = 6σ²; 1.4826·MAD estimates a Gaussian σ robustly, common practice).
 * Uses only samples farther than `exclude` Hz from `centerHz` when at least 20 remain, so the
 * curvature of the resonance itself does not count as noise.
 */
export function noiseFromSecondDifferences(
  freqHz: ArrayLike<number>, re: ArrayLike<number>, im: ArrayLike<number>, centerHz?: number, exclude?: number,
): number {
  const n = freqHz.length;
  const pick: number[] = [];
  if (centerHz !== undefined && exclude !== undefined) {
    for (let i = 1; i < n - 1; i++) if (Math.abs(freqHz[i] - centerHz) > exclude) pick.push(i);
  }
  if (pick.length < 20) {
    pick.length = 0;
    for (let i = 1; i < n - 1; i++) pick.push(i);
  }
  const sr = secondDifferenceSigma(re, pick);
  const si = secondDifferenceSigma(im, pick);
  return Math.sqrt(0.5 * (sr * sr + si * si));
}

/** Unwrapped phase of z. */
export function unwrappedPhase(re: ArrayLike<number>, im: ArrayLike<number>, n = re.length): Float64Array {
  const ph = new Float64Array(n);
  let prev = 0;
  let offset = 0;
  for (let i = 0; i < n; i++) {
    const p = Math.atan2(im[i], re[i]);
    if (i > 0) {
      const d = p - prev;
      if (d > Math.PI) offset -= 2 * Math.PI;
      else if (d < -Math.PI) offset += 2 * Math.PI;
    }
    prev = p;
    ph[i] = p + offset;
  }
  return ph;
}

/**
 * Cable-delay candidates from the slope of the unwrapped phase on the off-resonant wings (first and
 * last `frac` of the points): arg S = −2πfτ + const → τ = −slope/2π. Returns the joint estimate
 * (common slope, one intercept per wing, so the 2π the resonance may add between the wings does not
 * bias it) and each wing's own estimate: when the resonance sits near one edge, that wing is
 * curved and only the other one measures the cable; the circle-fit quality decides between them.
 */
export function delayCandidates(freqHz: ArrayLike<number>, re: ArrayLike<number>, im: ArrayLike<number>, frac = 0.1): number[] {
  const n = freqHz.length;
  const ph = unwrappedPhase(re, im, n);
  const m = Math.max(5, Math.floor(frac * n));
  let sxyAll = 0;
  let sxxAll = 0;
  const out: number[] = [];
  for (const [lo, hi] of [[0, m], [n - m, n]] as const) {
    let fm = 0;
    let pm = 0;
    for (let i = lo; i < hi; i++) {
      fm += freqHz[i];
      pm += ph[i];
    }
    fm /= hi - lo;
    pm /= hi - lo;
    let sxx = 0;
    let sxy = 0;
    for (let i = lo; i < hi; i++) {
      const df = freqHz[i] - fm;
      sxx += df * df;
      sxy += df * (ph[i] - pm);
    }
    sxxAll += sxx;
    sxyAll += sxy;
    if (sxx > 0) out.push(-sxy / sxx / (2 * Math.PI));
  }
  out.unshift(sxxAll > 0 ? -sxyAll / sxxAll / (2 * Math.PI) : 0);
  return out.filter(Number.isFinite);
}

/** Joint two-wing delay estimate (first entry of delayCandidates). */
export function delayFromPhaseSlope(freqHz: ArrayLike<number>, re: ArrayLike<number>, im: ArrayLike<number>, frac = 0.1): number {
  return delayCandidates(freqHz, re, im, frac)[0] ?? 0;
}

/**
 * Removes the delay: w_i = z_i · e^{+2πi(f_i − fRef)τ}. Written into outRe/outIm. Uses a complex
 * recurrence on uniform grids (one complex product per point instead of two trig calls).
 */
export function removeDelay(
  freqHz: ArrayLike<number>, re: ArrayLike<number>, im: ArrayLike<number>, fRef: number, tau: number,
  outRe: Float64Array, outIm: Float64Array, uniformStep: number | null,
): void {
  const n = freqHz.length;
  if (uniformStep !== null) {
    const w0 = 2 * Math.PI * (freqHz[0] - fRef) * tau;
    const dw = 2 * Math.PI * uniformStep * tau;
    let cr = Math.cos(w0);
    let ci = Math.sin(w0);
    const sr = Math.cos(dw);
    const si = Math.sin(dw);
    for (let i = 0; i < n; i++) {
      // Re-anchor every 256 points so rounding in the recurrence cannot accumulate.
      if ((i & 255) === 0 && i > 0) {
        const w = w0 + i * dw;
        cr = Math.cos(w);
        ci = Math.sin(w);
      }
      const xr = re[i];
      const xi = im[i];
      outRe[i] = xr * cr - xi * ci;
      outIm[i] = xr * ci + xi * cr;
      const t = cr * sr - ci * si;
      ci = cr * si + ci * sr;
      cr = t;
    }
    return;
  }
  for (let i = 0; i < n; i++) {
    const w = 2 * Math.PI * (freqHz[i] - fRef) * tau;
    const c = Math.cos(w);
    const s = Math.sin(w);
    outRe[i] = re[i] * c - im[i] * s;
    outIm[i] = re[i] * s + im[i] * c;
  }
}

/** Grid step when the frequencies are uniform to 1e-9 of the span, else null. */
export function uniformStep(freqHz: ArrayLike<number>): number | null {
  const n = freqHz.length;
  const step = (freqHz[n - 1] - freqHz[0]) / (n - 1);
  const tol = 1e-9 * (freqHz[n - 1] - freqHz[0]);
  for (let i = 0; i < n; i++) if (Math.abs(freqHz[i] - (freqHz[0] + i * step)) > tol) return null;
  return step;
}

/**
 * Refines τ so that the delay-corrected data best form a circle: 1-D minimisation of the rms
 * geometric distance from the Pratt circle (Probst et al. 2015 refine the delay by the circle-fit
 * residual). Coarse scan over τ0 ± halfRange around the best candidate, then golden-section search
 * around the best node.
 * The unnormalised distance is used: normalising by r would reward the large circle that a wrongly
 * delay-corrected background traces around the origin.
 */
export function refineDelay(
  freqHz: ArrayLike<number>, re: ArrayLike<number>, im: ArrayLike<number>, fRef: number, candidates: readonly number[],
  halfRange: number, step: number | null,
): { tau: number; evaluations: number } {
  const n = freqHz.length;
  const wr = new Float64Array(n);
  const wi = new Float64Array(n);
  let evaluations = 0;
  const cost = (tau: number): number => {
    evaluations++;
    removeDelay(freqHz, re, im, fRef, tau, wr, wi, step);
    const c = fitCirclePratt(wr, wi, n);
    return c ? c.rmsDistance : Infinity;
  };
  // Start from the candidate whose delay-corrected data are most circular.
  let tau0 = candidates[0] ?? 0;
  if (candidates.length > 1) {
    let c0 = Infinity;
    for (const t of candidates) {
      const c = cost(t);
      if (c < c0) {
        c0 = c;
        tau0 = t;
      }
    }
  }
  const nodes = 8;
  let best = 0;
  let bestCost = Infinity;
  const taus: number[] = [];
  const costs: number[] = [];
  for (let k = 0; k <= nodes; k++) {
    const t = tau0 - halfRange + (2 * halfRange * k) / nodes;
    const c = cost(t);
    taus.push(t);
    costs.push(c);
    if (c < bestCost) {
      bestCost = c;
      best = k;
    }
  }
  let lo = taus[Math.max(0, best - 1)];
  let hi = taus[Math.min(nodes, best + 1)];
  const g = (Math.sqrt(5) - 1) / 2;
  let x1 = hi - g * (hi - lo);
  let x2 = lo + g * (hi - lo);
  let f1 = cost(x1);
  let f2 = cost(x2);
  const tol = 1e-3 * (2 * halfRange / nodes);
  while (hi - lo > tol) {
    if (f1 < f2) {
      hi = x2;
      x2 = x1;
      f2 = f1;
      x1 = hi - g * (hi - lo);
      f1 = cost(x1);
    } else {
      lo = x1;
      x1 = x2;
      f1 = f2;
      x2 = lo + g * (hi - lo);
      f2 = cost(x2);
    }
  }
  const tau = 0.5 * (lo + hi);
  return { tau: Number.isFinite(tau) ? tau : tau0, evaluations };
}

export interface PhaseGuess {
  theta0: number;
  frHz: number;
  ql: number;
}

/**
 * Angle of the delay-corrected data seen from the circle centre, θ_i = arg(w_i − c), and initial
 * guesses for θ(f) = θ0 + 2·arctan(2Q_l(1 − f/f_r)) (Probst et al. 2015): θ decreases through
 * the resonance, θ0 is midway between the wing angles, f_r is where θ crosses θ0 and Q_l follows
 * from the frequencies where θ crosses θ0 ± q: f_hi − f_lo = tan(q/2)·f_r/Q_l. `sweep` is the
 * net angle turned from the first to the last point (positive = clockwise, the e^{+jωt} convention).
 */
export function centredPhase(
  freqHz: ArrayLike<number>, wr: Float64Array, wi: Float64Array, circle: CircleFit,
): { theta: Float64Array; guess: PhaseGuess; sweep: number } {
  const n = freqHz.length;
  const theta = new Float64Array(n);
  for (let i = 0; i < n; i++) theta[i] = Math.atan2(wi[i] - circle.yc, wr[i] - circle.xc);
  // Light boxcar smoothing of the complex points before unwrapping, so noise cannot fake a wrap.
  const h = 2;
  const sr = new Float64Array(n);
  const si = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    let ar = 0;
    let ai = 0;
    let c = 0;
    for (let j = Math.max(0, i - h); j <= Math.min(n - 1, i + h); j++) {
      ar += wr[j] - circle.xc;
      ai += wi[j] - circle.yc;
      c++;
    }
    sr[i] = ar / c;
    si[i] = ai / c;
  }
  const tu = unwrappedPhase(sr, si, n);
  const m = Math.max(3, Math.floor(n / 50));
  let ts = 0;
  let te = 0;
  for (let i = 0; i < m; i++) {
    ts += tu[i];
    te += tu[n - 1 - i];
  }
  ts /= m;
  te /= m;
  const theta0 = 0.5 * (ts + te);
  const sweep = ts - te;
  const crossing = (level: number): number | null => {
    for (let i = 1; i < n; i++) {
      if ((tu[i - 1] - level) * (tu[i] - level) <= 0 && tu[i - 1] !== tu[i]) {
        const t = (level - tu[i - 1]) / (tu[i] - tu[i - 1]);
        return freqHz[i - 1] + t * (freqHz[i] - freqHz[i - 1]);
      }
    }
    return null;
  };
  const span = freqHz[n - 1] - freqHz[0];
  let fr = crossing(theta0);
  if (fr === null) {
    // No crossing (phase not monotonic or too flat): take the fastest-turning point.
    let best = 1;
    let bestSpeed = -Infinity;
    for (let i = 1; i < n; i++) {
      const s = Math.abs(tu[i] - tu[i - 1]) / (freqHz[i] - freqHz[i - 1]);
      if (s > bestSpeed) {
        bestSpeed = s;
        best = i;
      }
    }
    fr = 0.5 * (freqHz[best] + freqHz[best - 1]);
  }
  let ql = NaN;
  if (sweep > 0.2) {
    const q = Math.min(Math.PI / 2, 0.4 * sweep);
    const fLo = crossing(theta0 + q);
    const fHi = crossing(theta0 - q);
    if (fLo !== null && fHi !== null && fHi > fLo) ql = (Math.tan(q / 2) * fr) / (fHi - fLo);
  }
  if (!Number.isFinite(ql) || ql <= 0) ql = fr / (span / 4);
  return { theta, guess: { theta0: wrapAngle(theta0), frHz: fr, ql }, sweep };
}

/** Wraps an angle into (−π, π]. */
export function wrapAngle(x: number): number {
  if (x > -Math.PI && x <= Math.PI) return x;
  const t = x - 2 * Math.PI * Math.floor((x + Math.PI) / (2 * Math.PI));
  return t <= -Math.PI ? t + 2 * Math.PI : t;
}

/**
 * Rough location of a resonance that is narrow compared with the window (a flux sweep often keeps
 * one wide window while the resonance tunes across it). With the delay removed, most points sit at
 * the off-resonant point P, so the component-wise median estimates P; the distance |w − P| =
 * a·(Q_l/|Q_c|)·|1/(1 + 2iQ_l x)| then peaks at f_r with a full width at half maximum of √3·f_r/Q_l.
 * Returns the index range [lo, hi) covering ±`halfWidths` linewidths around the peak when the
 * window spans more than `minLinewidths` of them and the peak stands out of the noise; else null
 * (the whole window is used).
 */
export function locateNarrowResonance(
  freqHz: ArrayLike<number>, wr: Float64Array, wi: Float64Array, noiseRms: number,
  minLinewidths = 15, halfWidths = 6,
): { lo: number; hi: number } | null {
  const n = freqHz.length;
  const pr = median(Float64Array.from(wr));
  const pi = median(Float64Array.from(wi));
  const d = new Float64Array(n);
  for (let i = 0; i < n; i++) d[i] = Math.sqrt((wr[i] - pr) ** 2 + (wi[i] - pi) ** 2);
  let peak = 1;
  let best = -Infinity;
  for (let i = 1; i < n - 1; i++) {
    const s = d[i - 1] + d[i] + d[i + 1];
    if (s > best) {
      best = s;
      peak = i;
    }
  }
  const top = best / 3;
  if (!(top > 3 * noiseRms) || peak < 2 || peak > n - 3) return null;
  const half = 0.5 * top;
  // Walk outward until two consecutive points fall below half maximum.
  let a = peak;
  while (a > 1 && !(d[a - 1] < half && d[a - 2] < half)) a--;
  let b = peak;
  while (b < n - 2 && !(d[b + 1] < half && d[b + 2] < half)) b++;
  if (a <= 1 || b >= n - 2) return null;
  const fwhm = freqHz[b] - freqHz[a];
  const linewidth = Math.max(fwhm, freqHz[peak + 1] - freqHz[peak - 1]) / Math.sqrt(3);
  const span = freqHz[n - 1] - freqHz[0];
  if (!(span > minLinewidths * linewidth)) return null;
  const fLo = freqHz[peak] - halfWidths * linewidth;
  const fHi = freqHz[peak] + halfWidths * linewidth;
  let lo = 0;
  while (lo < n - 1 && freqHz[lo] < fLo) lo++;
  let hi = n;
  while (hi > 1 && freqHz[hi - 1] > fHi) hi--;
  // Keep enough points for the circle and phase fits.
  const minPts = 40;
  while (hi - lo < minPts && (lo > 0 || hi < n)) {
    if (lo > 0) lo--;
    if (hi < n) hi++;
  }
  return hi - lo >= minPts && hi - lo < n ? { lo, hi } : null;
}
