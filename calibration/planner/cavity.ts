/**
 * Cavity mode: a λ/4 resonator whose frequency is flux-pumped near twice its resonance
 * (degenerate parametric process), below the parametric-oscillation threshold.
 *
 * Derivation (input–output Langevin equations; our notation, mapped to the papers in the tests):
 *   ω_r(t) = ω̄_r + δω·cos(ω_p t). For an LC mode with 1/L modulated, the pump term is
 *   (ħω̄_r/4)·ε·cos(ω_p t)·(a + a†)² with δω = ω̄_r ε/2; in the frame rotating at ω_p/2 and after the
 *   rotating-wave approximation  H/ħ = Δ a†a + (δω/4)(a² + a†²),  Δ = ω̄_r − ω_p/2.
 *   Write g = δω/2. With κ = κ_c + κ_i (energy decay rates, rad/s) and ξ = √κ_c a_in + √κ_i b_in:
 *     ȧ = −(iΔ + κ/2) a − i g a† + ξ.
 *   Fourier transform at ν (offset from ω_p/2), A(ν) = a[ν], B(ν) = (a[−ν])†:
 *     (κ/2 + iΔ − iν) A + i g B = ξ(ν)
 *     −i g A + (κ/2 − iΔ − iν) B = ξ†(−ν)
 *   D(ν) = (κ/2 − iν)² + Δ² − g²,  |D|² = (κ²/4 + Δ² − g² − ν²)² + κ²ν²,
 *   A = [(κ/2 − iΔ − iν) ξ − i g ξ†(−ν)] / D.  Output a_out = √κ_c·a − a_in.
 *   Vacuum input: n_out(ν) = κ_c κ g² / |D|²  photons/s per Hz (i.e. ⟨a_out† a_out⟩ per dν/2π).
 *   Poles of 1/|D|² give ∫ dν/2π = κ_c·N with N = 2g²/(κ² + 4Δ² − 4g²) = (δω²/2)/(κ² + 4Δ² − δω²).
 *   Threshold: D(0) = 0 ⇔ g² = Δ² + κ²/4 ⇔ δω_th = 2·sqrt(Δ² + κ²/4) (= κ on resonance).
 *   Signal reflection coefficient S(ν) = κ_c(κ/2 − iΔ − iν)/D − 1; at ν = 0, Δ = 0, κ_i = 0:
 *   S = (1 + x²)/(1 − x²), x = δω/κ.
 *   Thermal input (both baths at the same temperature — our stated assumption): commutator
 *   preservation |S|² + κ_cκ_i|P/D|² − κ_cκg²/|D|² = 1 gives
 *     n_out(ν) − n_th(ω_s) = κ_c κ g²/|D|² · (1 + n_th(ω_s) + n_th(ω_i)),  ω_s,i = ω_p/2 ± ν,
 *   i.e. (2 n_th + 1) times the vacuum result when n_th is flat across the line; the intracavity
 *   occupation becomes N_th = n_th + (2 n_th + 1)·N (symmetrised covariance scales with 2n_th + 1).
 *
 * Pair definition: every converted pump photon yields two output photons, so the pair rate is half
 * the excess photon rate out of the coupling port over the thermal background:
 *   pair rate = (2 n_th + 1)·κ_c·N / 2   (= κ_c N / 2 for vacuum input).
 */

export interface CavityDrive {
  /** Total energy decay rate κ = ω_r/Q_l, rad/s. */
  kappa: number;
  /** Coupling (output-port) decay rate κ_c = ω_r/Q_c, rad/s. */
  kappaC: number;
  /** Frequency-modulation amplitude δω = |dω_r/dΦ|·δΦ, rad/s. */
  deltaOmega: number;
  /** Detuning Δ = ω̄_r − ω_p/2, rad/s. */
  detuning: number;
}

/** Two-photon drive threshold δω_th = 2·sqrt(Δ² + κ²/4), rad/s. */
export function thresholdModulation(kappa: number, detuning: number): number {
  return 2 * Math.sqrt(detuning * detuning + (kappa * kappa) / 4);
}

/** Intracavity photon number with vacuum input, N = (δω²/2)/(κ² + 4Δ² − δω²); Infinity at/above threshold. */
export function vacuumOccupation(deltaOmega: number, kappa: number, detuning: number): number {
  const den = kappa * kappa + 4 * detuning * detuning - deltaOmega * deltaOmega;
  if (!(den > 0)) return Infinity;
  return (deltaOmega * deltaOmega) / 2 / den;
}

/** Intracavity occupation with both baths at occupation nth: n_th + (2 n_th + 1)·N_vac. */
export function thermalOccupation(deltaOmega: number, kappa: number, detuning: number, nth: number): number {
  return nth + (2 * nth + 1) * vacuumOccupation(deltaOmega, kappa, detuning);
}

/** |D(ν)|² of the Langevin solution (rad/s units). */
export function denominatorSq(nu: number, d: CavityDrive): number {
  const g = d.deltaOmega / 2;
  const re = (d.kappa * d.kappa) / 4 + d.detuning * d.detuning - g * g - nu * nu;
  return re * re + d.kappa * d.kappa * nu * nu;
}

/** Output photon flux density with vacuum input, photons/s per Hz, at ν = ω − ω_p/2 (rad/s). */
export function vacuumOutputSpectrum(nu: number, d: CavityDrive): number {
  const g = d.deltaOmega / 2;
  return (d.kappaC * d.kappa * g * g) / denominatorSq(nu, d);
}

/**
 * Excess output flux density over the thermal background, photons/s per Hz, with thermal
 * occupations nthSignal = n_th(ω_p/2 + ν) and nthIdler = n_th(ω_p/2 − ν).
 */
export function excessOutputSpectrum(nu: number, d: CavityDrive, nthSignal: number, nthIdler: number): number {
  return vacuumOutputSpectrum(nu, d) * (1 + nthSignal + nthIdler);
}

/** Complex signal reflection S(ν) = κ_c(κ/2 − iΔ − iν)/D(ν) − 1 as [re, im]. */
export function signalReflection(nu: number, d: CavityDrive): [number, number] {
  const g = d.deltaOmega / 2;
  // D = (κ/2 − iν)² + Δ² − g²
  const dRe = (d.kappa * d.kappa) / 4 - nu * nu + d.detuning * d.detuning - g * g;
  const dIm = -d.kappa * nu;
  const pRe = d.kappa / 2;
  const pIm = -(d.detuning + nu);
  const m = dRe * dRe + dIm * dIm;
  // P / D = P·conj(D)/|D|²
  const qRe = (pRe * dRe + pIm * dIm) / m;
  const qIm = (pIm * dRe - pRe * dIm) / m;
  return [d.kappaC * qRe - 1, d.kappaC * qIm];
}

/** Phase-preserving signal power gain |S(ν)|². */
export function signalGain(nu: number, d: CavityDrive): number {
  const [re, im] = signalReflection(nu, d);
  return re * re + im * im;
}

/** Phase-preserving gain at the centre, κ_i = 0, Δ = 0: G0 = ((1 + x²)/(1 − x²))². */
export function centreGain(x: number): number {
  const s = (1 + x * x) / (1 - x * x);
  return s * s;
}

/** Phase-sensitive (degenerate) gains of the two quadratures: ((1 ± x)/(1 ∓ x))². */
export function phaseSensitiveGains(x: number): { amplified: number; deamplified: number } {
  const a = (1 + x) / (1 - x);
  return { amplified: a * a, deamplified: 1 / (a * a) };
}

/**
 * Inverse of N: the modulation δω that gives intracavity vacuum occupation N at detuning Δ.
 * From N(κ² + 4Δ² − 4g²) = 2g²:  g² = N(κ² + 4Δ²)/(2(1 + 2N)), δω = 2g. Always below threshold.
 */
export function modulationForOccupation(n: number, kappa: number, detuning: number): number {
  if (!(n >= 0) || !Number.isFinite(n)) throw new RangeError(`occupation must be a finite number ≥ 0, got ${n}`);
  const g2 = (n * (kappa * kappa + 4 * detuning * detuning)) / (2 * (1 + 2 * n));
  return 2 * Math.sqrt(g2);
}

/**
 * Inverse of the centre signal gain G = |S(0)|² (any κ_i, Δ): with u = 1/D(0) (real),
 * G(u) = κ_c²(κ²/4 + Δ²)u² − κ_cκ u + 1, increasing on the physical branch; take the larger root.
 * Returns δω, or null when G ≤ 1 has no solution above the passive reflection.
 */
export function modulationForCentreGain(gain: number, kappa: number, kappaC: number, detuning: number): number | null {
  if (!(gain > 1) || !Number.isFinite(gain)) return null;
  const a = kappaC * kappaC * ((kappa * kappa) / 4 + detuning * detuning);
  const b = kappaC * kappa;
  const disc = b * b - 4 * a * (1 - gain);
  const u = (b + Math.sqrt(disc)) / (2 * a);
  const g2 = (kappa * kappa) / 4 + detuning * detuning - 1 / u;
  if (!(g2 > 0)) return null;
  return 2 * Math.sqrt(g2);
}

/**
 * ∫ f(ν) dν/2π over [−half, half] (half may be Infinity) for the Lorentzian-like cavity spectra,
 * by adaptive Simpson after ν = w·tan θ with w the narrowest pole half-width (κ/2 − g on resonance).
 */
export function integrateSpectrum(f: (nu: number) => number, d: CavityDrive, half = Infinity): number {
  const g = d.deltaOmega / 2;
  const s = d.detuning * d.detuning - g * g;
  // Imaginary parts of the poles ν = ±iκ/2 ± sqrt(s): κ/2 − Im sqrt(s) is the narrowest half-width.
  const w = Math.max(s < 0 ? d.kappa / 2 - Math.sqrt(-s) : d.kappa / 2, d.kappa * 1e-9);
  const centre = s > 0 ? Math.sqrt(s) : 0;
  const h = (theta: number, c: number) => {
    const t = Math.tan(theta);
    const sec2 = 1 + t * t;
    return f(c + w * t) * w * sec2;
  };
  const segment = (lo: number, hi: number, c: number) => {
    const a = Math.atan((lo - c) / w);
    const b = Math.atan((hi - c) / w);
    return adaptiveSimpson((th) => h(th, c), a, b, 1e-12, 40);
  };
  let total: number;
  if (centre === 0) {
    total = segment(-half, half, 0);
  } else {
    // Two peaks at ±sqrt(Δ² − g²): integrate each half with its own centring.
    total = segment(-half, 0, -centre) + segment(0, half, centre);
  }
  return total / (2 * Math.PI);
}

function adaptiveSimpson(f: (x: number) => number, a: number, b: number, relTol: number, maxDepth: number): number {
  if (a === b) return 0;
  const fa = f(clampFinite(a));
  const fb = f(clampFinite(b));
  const m = (a + b) / 2;
  const fm = f(m);
  const whole = ((b - a) / 6) * (fa + 4 * fm + fb);
  // Seed with a coarse 64-panel pass so narrow features are not missed, then refine each panel.
  const panels = 64;
  let sum = 0;
  const step = (b - a) / panels;
  for (let i = 0; i < panels; i++) {
    const lo = a + i * step;
    const hi = lo + step;
    const flo = f(clampFinite(lo));
    const fhi = f(clampFinite(hi));
    const fmid = f((lo + hi) / 2);
    const s = ((hi - lo) / 6) * (flo + 4 * fmid + fhi);
    sum += refine(f, lo, hi, flo, fmid, fhi, s, Math.abs(whole) * relTol / panels + 1e-300, maxDepth);
  }
  return sum;
}

function refine(
  f: (x: number) => number, a: number, b: number, fa: number, fm: number, fb: number,
  whole: number, tol: number, depth: number,
): number {
  const m = (a + b) / 2;
  const lm = (a + m) / 2;
  const rm = (m + b) / 2;
  const flm = f(lm);
  const frm = f(rm);
  const left = ((m - a) / 6) * (fa + 4 * flm + fm);
  const right = ((b - m) / 6) * (fm + 4 * frm + fb);
  const delta = left + right - whole;
  if (depth <= 0 || Math.abs(delta) <= 15 * tol) return left + right + delta / 15;
  return refine(f, a, m, fa, flm, fm, left, tol / 2, depth - 1) + refine(f, m, b, fm, frm, fb, right, tol / 2, depth - 1);
}

/** tan(±π/2) overflows to ±1.6e16, whose spectrum value is 0 anyway; keep endpoints finite. */
function clampFinite(theta: number): number {
  const lim = Math.PI / 2 - 1e-12;
  return Math.max(-lim, Math.min(lim, theta));
}
