/**
 * Complex transmission/reflection of a single resonance seen through a cable and amplifier chain.
 *
 * Notch (hanger) and reflection forms as in Probst et al., Rev. Sci. Instrum. 86, 024706 (2015),
 * with the complex coupling quality factor Q_c = |Q_c|·e^{−iφ} of Khalil et al.,
 * J. Appl. Phys. 111, 054510 (2012). The environment factor a·e^{iα}·e^{−2πifτ} uses the absolute
 * probe frequency f, so α is the phase at f = 0 extrapolated along the cable delay.
 */

export type ResonatorGeometry = 'notch' | 'reflection';

/** Background (environment) of the measurement line. */
export interface Environment {
  /** Off-resonant amplitude (gain/attenuation of the chain), linear. */
  a: number;
  /** Off-resonant phase at f = 0, rad. */
  alphaRad: number;
  /** Electrical (cable) delay τ, s. */
  delayS: number;
}

export interface NotchParams extends Environment {
  frHz: number;
  /** Loaded quality factor Q_l. */
  ql: number;
  /** Magnitude of the complex coupling quality factor, |Q_c|. */
  qcAbs: number;
  /** Impedance-mismatch angle φ of Q_c = |Q_c| e^{−iφ}, rad. */
  phiRad: number;
}

export interface ReflectionParams extends Environment {
  frHz: number;
  ql: number;
  /** Coupling quality factor (real in reflection). */
  qc: number;
}

export interface ComplexTrace {
  re: Float64Array;
  im: Float64Array;
}

/** S21 = a e^{iα} e^{−2πifτ} [1 − (Q_l/|Q_c|) e^{iφ} / (1 + 2iQ_l(f/f_r − 1))]. */
/** out[i] = a e^{iα} e^{−2πifτ} · (sr + i si): the measurement chain around the bare resonator response. */
function withEnvironment(f: number, p: Environment, sr: number, si: number, re: Float64Array, im: Float64Array, i: number): void {
  const ph = p.alphaRad - 2 * Math.PI * f * p.delayS;
  const br = p.a * Math.cos(ph);
  const bi = p.a * Math.sin(ph);
  re[i] = br * sr - bi * si;
  im[i] = br * si + bi * sr;
}

export function notchResponse(freqHz: ArrayLike<number>, p: NotchParams): ComplexTrace {
  const n = freqHz.length;
  const re = new Float64Array(n);
  const im = new Float64Array(n);
  const k = p.ql / p.qcAbs;
  const kr = k * Math.cos(p.phiRad);
  const ki = k * Math.sin(p.phiRad);
  for (let i = 0; i < n; i++) {
    const f = freqHz[i];
    const u = 2 * p.ql * (f / p.frHz - 1);
    // 1/(1+iu) = (1 − iu)/(1 + u²)
    const d = 1 / (1 + u * u);
    const lr = d;
    const li = -u * d;
    // s = 1 − k e^{iφ} L
    const sr = 1 - (kr * lr - ki * li);
    const si = -(kr * li + ki * lr);
    withEnvironment(f, p, sr, si, re, im, i);
  }
  return { re, im };
}

/** S11 = a e^{iα} e^{−2πifτ} [1 − 2(Q_l/Q_c) / (1 + 2iQ_l(f/f_r − 1))]. */
export function reflectionResponse(freqHz: ArrayLike<number>, p: ReflectionParams): ComplexTrace {
  const n = freqHz.length;
  const re = new Float64Array(n);
  const im = new Float64Array(n);
  const k = (2 * p.ql) / p.qc;
  for (let i = 0; i < n; i++) {
    const f = freqHz[i];
    const u = 2 * p.ql * (f / p.frHz - 1);
    const d = 1 / (1 + u * u);
    const sr = 1 - k * d;
    const si = k * u * d;
    withEnvironment(f, p, sr, si, re, im, i);
  }
  return { re, im };
}

/** Internal quality factor from Khalil et al. (2012): 1/Q_i = 1/Q_l − cos φ/|Q_c|. */
export function internalQNotch(ql: number, qcAbs: number, phiRad: number): number | null {
  const g = 1 / ql - Math.cos(phiRad) / qcAbs;
  return g > 0 && Number.isFinite(g) ? 1 / g : null;
}

/** Reflection: 1/Q_i = 1/Q_l − 1/Q_c (Probst et al. 2015). */
export function internalQReflection(ql: number, qc: number): number | null {
  const g = 1 / ql - 1 / qc;
  return g > 0 && Number.isFinite(g) ? 1 / g : null;
}
