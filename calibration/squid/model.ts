/**
 * dc SQUID terminating a quarter-wave line: flux-tunable inductance, resonance frequency and
 * effective delay, with analytic flux derivatives.
 *
 * Conventions: `phi` is the flux in units of Φ0 (Φ/Φ0). The SQUID inductance follows the
 * negligible-loop-inductance law L_s(Φ) = L_s(0)/sqrt(cos²πφ + d² sin²πφ) with
 * d = (I_c1 − I_c2)/(I_c1 + I_c2) (Koch et al., PRA 76, 042319 (2007), same E_J(Φ) law).
 *
 * Exact model (form used by Wallquist, Shumeiko, Wendin, PRB 74, 224506 (2006) and
 * Pogorzalek et al., Phys. Rev. Applied 8, 024012 (2017)):
 *   x·tan x = 1/γ(Φ) − x²·C_s/C_r,  x = (π/2)·f/f0,  root in (0, π/2),  γ(Φ) = L_s(Φ)/L_r.
 * Approximate model: f = f0/(1 + γ(Φ)) (small participation, C_s neglected).
 *
 * Derived here (not taken from the papers) and checked in tests/unit/calibration/squid-model.test.ts:
 *  - implicit first and second flux derivatives of the exact root;
 *  - the error of the approximate model: with C_s = 0, f_approx/f_exact − 1 = −π²γ³/12 + O(γ⁴)
 *    (the O(γ) and O(γ²) terms of the series of x·tan x = 1/γ around x = π/2 cancel exactly).
 */
import { FLUX_QUANTUM } from '../constants';

export type TuningModel = 'exact' | 'approx';

export interface SquidLineParams {
  /** Bare quarter-wave frequency f0 (L_s → 0), Hz. */
  f0Hz: number;
  /** Participation at zero flux γ0 = L_s(0)/L_r. */
  gamma0: number;
  /** Junction asymmetry d = (I_c1 − I_c2)/(I_c1 + I_c2), 0 ≤ d ≤ 1 (sign irrelevant). */
  asymmetry: number;
  /** SQUID-to-line capacitance ratio C_s/C_r (exact model only). Default 0. */
  csOverCr?: number;
}

export interface ResonanceDerivatives {
  /** Hz */
  f: number;
  /** Hz per Φ0 */
  dfdphi: number;
  /** Hz per Φ0² */
  d2fdphi2: number;
}

export interface DelayDerivatives {
  /** s */
  tau: number;
  /** s per Φ0 */
  dtaudphi: number;
  /** s per Φ0² */
  d2taudphi2: number;
}

const HALF_PI = Math.PI / 2;

/** D(φ) = cos²πφ + d² sin²πφ and its first two φ-derivatives. */
function lobeDenominator(phi: number, d: number): { D: number; D1: number; D2: number } {
  const c = Math.cos(Math.PI * phi);
  const s = Math.sin(Math.PI * phi);
  const d2 = d * d;
  const D = c * c + d2 * s * s;
  // dD/dφ = −π(1 − d²) sin 2πφ; d²D/dφ² = −2π²(1 − d²) cos 2πφ
  const D1 = -Math.PI * (1 - d2) * Math.sin(2 * Math.PI * phi);
  const D2 = -2 * Math.PI * Math.PI * (1 - d2) * Math.cos(2 * Math.PI * phi);
  return { D, D1, D2 };
}

/** L_s(Φ)/L_s(0) = 1/sqrt(cos²πφ + d² sin²πφ). +Infinity at the lobe edge of a symmetric SQUID. */
export function squidInductanceFactor(phi: number, asymmetry: number): number {
  const { D } = lobeDenominator(phi, asymmetry);
  return D > 0 ? 1 / Math.sqrt(D) : Infinity;
}

/** γ(Φ) = γ0 · L_s(Φ)/L_s(0). */
export function participation(phi: number, p: SquidLineParams): number {
  return p.gamma0 * squidInductanceFactor(phi, p.asymmetry);
}

/**
 * Root x in (0, π/2) of G(x) = x·sin x − (g − c·x²)·cos x = 0, i.e. x·tan x = g − c·x²
 * (multiplied by cos x so there is no pole at π/2). g = 1/γ ≥ 0, c = C_s/C_r ≥ 0.
 * Newton from the approximate solution, safeguarded by a bisection bracket.
 */
export function solveExactRoot(g: number, c = 0): number {
  if (!(g > 0)) return 0; // γ = ∞ (or invalid): the SQUID shorts nothing, f → 0
  if (g === Infinity) return HALF_PI; // γ = 0: ideal short, f = f0
  // G and G′ are written out inline: this runs for every point of every fit evaluation, and a
  // closure per call costs more than the arithmetic (notably under tsx, which names each closure).
  let lo = 0;
  let hi = HALF_PI;
  // Starting guesses: small γ → x ≈ (π/2)/(1 + γ); large γ → x·tan x ≈ x²(1 + c) = g.
  const gamma = 1 / g;
  let x = gamma < 1 ? HALF_PI / (1 + gamma) : Math.min(Math.sqrt(g / (1 + c)), 0.99 * HALF_PI);
  for (let it = 0; it < 100; it++) {
    const sx = Math.sin(x);
    const cx = Math.cos(x);
    const r = g - c * x * x;
    const gx = x * sx - r * cx; // G(x)
    if (gx === 0) return x;
    if (gx < 0) lo = x;
    else hi = x;
    const step = gx / (sx + x * cx + 2 * c * x * cx + r * sx); // G/G′
    const next = x - step;
    if (Number.isFinite(next) && next >= lo && next <= hi) {
      // Newton converges quadratically: a step below 1e-10·x leaves an error of order 1e-20·x.
      if (Math.abs(step) <= 1e-10 * x) return next;
      x = next;
    } else {
      x = 0.5 * (lo + hi);
    }
    if (hi - lo <= 1e-15 * hi) return x;
  }
  return x;
}

/**
 * Exact root and its sensitivities: x, ∂x/∂g and ∂x/∂c for x·tan x + c·x² = g (implicit
 * differentiation: ∂x/∂g = 1/F_x, ∂x/∂c = −x²/F_x, F_x written times cos²x so it stays finite).
 * Used by the fits for analytic Jacobians.
 */
export function exactRootSensitivity(g: number, c = 0): { x: number; dxdg: number; dxdc: number } {
  const x = solveExactRoot(g, c);
  if (x === 0) return { x, dxdg: 0, dxdc: 0 };
  const cs = Math.cos(x);
  const cos2 = cs * cs;
  const N = Math.sin(x) * cs + x + 2 * c * x * cos2;
  return { x, dxdg: cos2 / N, dxdc: (-x * x * cos2) / N };
}

/** Resonance frequency at flux φ (Φ0 units), Hz. */
export function resonanceFrequency(phi: number, p: SquidLineParams, model: TuningModel): number {
  const gamma = participation(phi, p);
  if (model === 'approx') return gamma === Infinity ? 0 : p.f0Hz / (1 + gamma);
  return (p.f0Hz / HALF_PI) * solveExactRoot(1 / gamma, p.csOverCr ?? 0);
}

/**
 * Resonance frequency and its first two flux derivatives, in closed form.
 * Exact model, F(x, φ) = x tan x + c x² − g(φ) with g = sqrt(D)/γ0:
 *   x' = g'/F_x,  x'' = (g'' − F_xx·x'²)/F_x,
 *   F_x = tan x + x sec²x + 2cx,  F_xx = 2 sec²x (1 + x tan x) + 2c,
 * evaluated multiplied through by cos²x so nothing diverges near x = π/2.
 * At the exact lobe edge of a symmetric SQUID (D = 0) f has a square-root cusp; the
 * derivatives are not defined there and 0 is returned for both (documented, not NaN).
 */
export function resonanceDerivatives(phi: number, p: SquidLineParams, model: TuningModel): ResonanceDerivatives {
  const { D, D1, D2 } = lobeDenominator(phi, p.asymmetry);
  const f0 = p.f0Hz;
  const g0 = p.gamma0;
  if (!(D > 0)) return { f: 0, dfdphi: 0, d2fdphi2: 0 };
  if (g0 === 0) return { f: f0, dfdphi: 0, d2fdphi2: 0 };
  const sD = Math.sqrt(D);
  if (model === 'approx') {
    // γ = γ0 D^{-1/2}; f = f0/(1+γ)
    const gam = g0 / sD;
    const gam1 = (-g0 * D1) / (2 * D * sD);
    const gam2 = g0 * (-D2 / (2 * D * sD) + (3 * D1 * D1) / (4 * D * D * sD));
    const one = 1 + gam;
    return {
      f: f0 / one,
      dfdphi: (-f0 * gam1) / (one * one),
      d2fdphi2: -f0 * (gam2 / (one * one) - (2 * gam1 * gam1) / (one * one * one)),
    };
  }
  const c = p.csOverCr ?? 0;
  const g = sD / g0;
  const g1 = D1 / (2 * g0 * sD);
  const g2 = (D2 / (2 * sD) - (D1 * D1) / (4 * D * sD)) / g0;
  const x = solveExactRoot(g, c);
  const cs = Math.cos(x);
  const sn = Math.sin(x);
  const cos2 = cs * cs;
  // N = F_x·cos²x = sin x cos x + x + 2c x cos²x  (> 0 on (0, π/2))
  const N = sn * cs + x + 2 * c * x * cos2;
  const x1 = (g1 * cos2) / N;
  // F_xx·cos²x = 2(1 + x tan x) + 2c cos²x, with x tan x = g − c x² at the root
  const Fxx_c2 = 2 * (1 + g - c * x * x) + 2 * c * cos2;
  const x2 = (g2 * cos2 - Fxx_c2 * x1 * x1) / N;
  const k = f0 / HALF_PI;
  return { f: k * x, dfdphi: k * x1, d2fdphi2: k * x2 };
}

/** τ_eff(Φ) = γ(Φ)/(4 f0): delay added by the SQUID, L_s/(L′v) (Johansson et al., PRA 82, 052509 (2010)). */
export function effectiveDelay(phi: number, p: SquidLineParams): number {
  return participation(phi, p) / (4 * p.f0Hz);
}

/** τ_eff and its flux derivatives, closed form from γ = γ0·D^{-1/2}. */
export function effectiveDelayDerivatives(phi: number, p: SquidLineParams): DelayDerivatives {
  const { D, D1, D2 } = lobeDenominator(phi, p.asymmetry);
  if (!(D > 0)) return { tau: Infinity, dtaudphi: 0, d2taudphi2: 0 };
  const sD = Math.sqrt(D);
  const k = p.gamma0 / (4 * p.f0Hz);
  return {
    tau: k / sD,
    dtaudphi: (-k * D1) / (2 * D * sD),
    d2taudphi2: k * (-D2 / (2 * D * sD) + (3 * D1 * D1) / (4 * D * D * sD)),
  };
}

/** Φ/Φ0 = (bias − offset)/period. */
export function fluxFromBias(bias: number, period: number, offset: number): number {
  return (bias - offset) / period;
}

/** bias = offset + period·Φ/Φ0. */
export function biasFromFlux(phi: number, period: number, offset: number): number {
  return offset + period * phi;
}

/** Quarter-wave line inductance L_r = L′ℓ = Z0/(4 f0), H (from v = 1/sqrt(L′C′), f0 = v/4ℓ). */
export function lineInductance(f0Hz: number, z0Ohm: number): number {
  return z0Ohm / (4 * f0Hz);
}

/** I_cΣ = Φ0/(2π L_s(0)) with L_s(0) = γ0·L_r, A. */
export function criticalCurrentSum(gamma0: number, f0Hz: number, z0Ohm: number): number {
  return FLUX_QUANTUM / (2 * Math.PI * gamma0 * lineInductance(f0Hz, z0Ohm));
}

/** β_L = 2 L_loop I_c0/Φ0 with I_c0 the critical current of one junction. */
export function screeningParameter(loopInductanceH: number, icPerJunctionA: number): number {
  return (2 * loopInductanceH * icPerJunctionA) / FLUX_QUANTUM;
}

/** β_L above which the symmetric SQUID's flux response is hysteretic: 2/π (see PHYSICS.md, derived). */
export const HYSTERESIS_BETA_L = 2 / Math.PI;
