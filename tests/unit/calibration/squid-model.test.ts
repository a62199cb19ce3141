/**
 * SQUID-terminated λ/4 line (calibration/squid/model.ts).
 * Model form: x·tan x = 1/γ(Φ) − x²C_s/C_r, x = (π/2)f/f0 (Pogorzalek et al., Phys. Rev. Applied 8,
 * 024012 (2017); Wallquist, Shumeiko, Wendin, PRB 74, 224506 (2006)); γ(Φ) = γ0/sqrt(cos²πφ + d²sin²πφ)
 * (Koch et al., PRA 76, 042319 (2007)). References outside the project:
 *  - tests/fixtures/tuning/model_reference.json: scipy.optimize.brentq roots and 40-digit mpmath
 *    derivatives (make_tuning_fixtures.py);
 *  - a plain bisection written here, independent of the Newton solver;
 *  - central finite differences;
 *  - the leading-order error of f0/(1+γ), derived in model.ts from the series of x·tan x = 1/γ.
 */
import {
  squidInductanceFactor, participation, resonanceFrequency, resonanceDerivatives, effectiveDelay,
  effectiveDelayDerivatives, fluxFromBias, biasFromFlux, lineInductance, criticalCurrentSum,
  screeningParameter, solveExactRoot, SquidLineParams,
} from '@/calibration/squid/model';
import { FLUX_QUANTUM } from '@/calibration/constants';
import reference from '@/tests/fixtures/tuning/model_reference.json';

const rel = (a: number, b: number) => Math.abs(a - b) / Math.max(Math.abs(b), 1e-300);

/** Plain bisection on x·sin x − (g − c x²)·cos x over (0, π/2), 200 halvings. */
function bisectRoot(g: number, c: number): number {
  let lo = 0;
  let hi = Math.PI / 2;
  const G = (x: number) => x * Math.sin(x) - (g - c * x * x) * Math.cos(x);
  for (let i = 0; i < 200; i++) {
    const mid = 0.5 * (lo + hi);
    if (G(mid) < 0) lo = mid;
    else hi = mid;
  }
  return 0.5 * (lo + hi);
}

describe('SQUID inductance factor', () => {
  it.each([
    [0, 0.1, 1],
    [0.25, 0, Math.SQRT2], // cos² = 1/2
    [0.5, 0.2, 5], // 1/d at the lobe edge
    [1, 0.3, 1], // periodic
    [-0.25, 0.5, 1 / Math.sqrt(0.5 + 0.125)],
  ])('φ=%p d=%p → %p (closed form)', (phi, d, expected) => {
    expect(rel(squidInductanceFactor(phi, d), expected)).toBeLessThan(1e-12);
  });
  it('is +∞ at the lobe edge of a symmetric SQUID and the exact f is 0 there', () => {
    const p = { f0Hz: 6e9, gamma0: 0.05, asymmetry: 0 };
    // cos(π/2) is 6e-17 in doubles, so evaluate the exact zero through the root directly
    expect(solveExactRoot(0)).toBe(0);
    expect(resonanceFrequency(0.5, p, 'exact')).toBeLessThan(1e3); // γ ≈ 1e15: f ≈ 100 Hz
    expect(resonanceFrequency(0.5, p, 'approx')).toBeLessThan(1e3);
    const r = resonanceDerivatives(0.5, p, 'exact');
    expect(Number.isFinite(r.f) && Number.isFinite(r.dfdphi) && Number.isFinite(r.d2fdphi2)).toBe(true);
  });
});

describe('exact root', () => {
  it.each([
    // [γ, C_s/C_r]: from γ → 0 (f → f0) to γ → ∞ (f → 0)
    [1e-9, 0], [1e-4, 0], [0.02, 0], [0.05, 0], [0.3, 0], [1, 0], [10, 0], [1e6, 0], [1e12, 0],
    [0.05, 0.2], [0.5, 1], [5, 3],
  ])('γ=%p c=%p agrees with an independent bisection to 1e-14', (gamma, c) => {
    const x = solveExactRoot(1 / gamma, c);
    const xb = bisectRoot(1 / gamma, c);
    expect(x).toBeGreaterThan(0);
    expect(x).toBeLessThan(Math.PI / 2);
    expect(rel(x, xb)).toBeLessThan(1e-14);
    // the defining function changes sign within a few ulps of x (near π/2 the residual itself is
    // ill-conditioned, so a sign bracket is the honest check)
    const G = (q: number) => q * Math.sin(q) - (1 / gamma - c * q * q) * Math.cos(q);
    expect(G(x * (1 - 1e-15))).toBeLessThanOrEqual(0);
    expect(G(Math.min(x * (1 + 1e-15), Math.PI / 2))).toBeGreaterThanOrEqual(0);
  });

  it('limits: f → f0(1 − γ) for γ → 0 and f → f0·(2/π)·sqrt(1/γ) for γ → ∞ (series of x tan x)', () => {
    const f0 = 5e9;
    const small = resonanceFrequency(0, { f0Hz: f0, gamma0: 1e-8, asymmetry: 0 }, 'exact');
    expect(rel(small, f0 * (1 - 1e-8))).toBeLessThan(1e-14);
    const big = resonanceFrequency(0, { f0Hz: f0, gamma0: 1e8, asymmetry: 0 }, 'exact');
    expect(rel(big, f0 * (2 / Math.PI) * Math.sqrt(1e-8))).toBeLessThan(1e-8);
  });

  it('matches scipy.optimize.brentq and the mpmath root for every fixture case', () => {
    for (const c of reference.cases) {
      const p: SquidLineParams = { f0Hz: 1, gamma0: c.gamma0, asymmetry: c.asymmetry, csOverCr: c.cs_over_cr };
      const x = solveExactRoot(1 / participation(c.phi, p), c.cs_over_cr);
      expect(rel(x, c.x_brentq)).toBeLessThan(1e-13);
      expect(rel(resonanceFrequency(c.phi, p, 'exact'), c.f_over_f0)).toBeLessThan(1e-13);
    }
  });

  it('is fast: 1e5 solves in under two seconds (about 1 µs each outside Jest)', () => {
    const t0 = performance.now();
    let s = 0;
    for (let i = 0; i < 1e5; i++) s += solveExactRoot(1 / (0.01 + (i % 1000) * 1e-3));
    expect(s).toBeGreaterThan(0);
    expect(performance.now() - t0).toBeLessThan(2000);
  });
});

describe('flux derivatives of f', () => {
  it('exact model matches 40-digit mpmath derivatives (fixture)', () => {
    for (const c of reference.cases) {
      const p: SquidLineParams = { f0Hz: 1, gamma0: c.gamma0, asymmetry: c.asymmetry, csOverCr: c.cs_over_cr };
      const r = resonanceDerivatives(c.phi, p, 'exact');
      const scale1 = Math.max(Math.abs(c.dfdphi_over_f0), 1e-3 * Math.abs(c.d2fdphi2_over_f0), 1e-12);
      expect(Math.abs(r.dfdphi - c.dfdphi_over_f0) / scale1).toBeLessThan(1e-9);
      expect(rel(r.d2fdphi2, c.d2fdphi2_over_f0)).toBeLessThan(1e-8);
      expect(rel(r.f, c.f_over_f0)).toBeLessThan(1e-13);
    }
  });

  const cases: [string, SquidLineParams, number][] = [
    ['typical', { f0Hz: 6.1e9, gamma0: 0.05, asymmetry: 0.08 }, 0.21],
    ['near edge', { f0Hz: 5e9, gamma0: 0.03, asymmetry: 0.02 }, 0.47],
    ['large γ0', { f0Hz: 7e9, gamma0: 1.5, asymmetry: 0.3 }, 0.35],
    ['with C_s', { f0Hz: 4.5e9, gamma0: 0.08, asymmetry: 0.2, csOverCr: 0.4 }, -0.3],
    ['past one period', { f0Hz: 6e9, gamma0: 0.04, asymmetry: 0.1 }, 1.62],
  ];
  it.each(cases)('%s: exact and approx agree with central differences', (_n, p, phi) => {
    for (const model of ['exact', 'approx'] as const) {
      // central differences with one Richardson step (truncation O(h⁴))
      const h = 2e-4;
      const f = (q: number) => resonanceFrequency(q, p, model);
      const r = resonanceDerivatives(phi, p, model);
      const c1 = (s: number) => (f(phi + s) - f(phi - s)) / (2 * s);
      const c2 = (s: number) => (f(phi + s) - 2 * f(phi) + f(phi - s)) / (s * s);
      const d1 = (4 * c1(h / 2) - c1(h)) / 3;
      const d2 = (4 * c2(h / 2) - c2(h)) / 3;
      expect(rel(r.f, f(phi))).toBeLessThan(1e-14);
      expect(rel(r.dfdphi, d1)).toBeLessThan(1e-6);
      expect(rel(r.d2fdphi2, d2)).toBeLessThan(1e-4);
    }
  });
});

describe('approximate model f0/(1+γ)', () => {
  // Derived (model.ts header): f_approx/f_exact − 1 = −π²γ³/12 + O(γ⁴) for C_s = 0; the numerically
  // observed next term is about −3γ relative to the leading one, so allow 5γ.
  const gammas = [1e-3, 3e-3, 0.01, 0.02, 0.05, 0.1, 0.2, 0.5, 1, 3];
  const errors = gammas.map((g) => {
    const p = { f0Hz: 6e9, gamma0: g, asymmetry: 0 };
    return resonanceFrequency(0, p, 'approx') / resonanceFrequency(0, p, 'exact') - 1;
  });
  it('underestimates f and the error grows monotonically with γ', () => {
    for (let i = 0; i < errors.length; i++) {
      expect(errors[i]).toBeLessThan(0);
      if (i > 0) expect(Math.abs(errors[i])).toBeGreaterThan(Math.abs(errors[i - 1]));
    }
  });
  it.each(gammas.filter((g) => g <= 0.05).map((g) => [g]))('γ=%p matches −π²γ³/12 to within 5γ relative', (g) => {
    const err = errors[gammas.indexOf(g)];
    const leading = (-Math.PI * Math.PI * g ** 3) / 12;
    expect(Math.abs(err / leading - 1)).toBeLessThan(5 * g);
  });
  it('error at γ = 0.05 is ~1e-4, i.e. ~0.5 MHz at 6 GHz (why the exact model is the default)', () => {
    const err = errors[gammas.indexOf(0.05)];
    expect(Math.abs(err)).toBeGreaterThan(5e-5);
    expect(Math.abs(err)).toBeLessThan(2e-4);
  });
});

describe('effective delay τ_eff = γ/(4 f0)', () => {
  it('matches the mpmath L_s factor and its derivatives (fixture)', () => {
    for (const c of reference.cases) {
      const p = { f0Hz: 5e9, gamma0: c.gamma0, asymmetry: c.asymmetry };
      const k = c.gamma0 / (4 * p.f0Hz);
      const r = effectiveDelayDerivatives(c.phi, p);
      expect(rel(r.tau, k * c.ls_factor)).toBeLessThan(1e-13);
      expect(rel(effectiveDelay(c.phi, p), k * c.ls_factor)).toBeLessThan(1e-13);
      const s1 = Math.max(Math.abs(c.dls_factor_dphi), 1e-3 * Math.abs(c.d2ls_factor_dphi2), 1e-12);
      expect(Math.abs(r.dtaudphi / k - c.dls_factor_dphi) / s1).toBeLessThan(1e-10);
      expect(rel(r.d2taudphi2 / k, c.d2ls_factor_dphi2)).toBeLessThan(1e-10);
    }
  });
  it('Johansson PRA 2010 worked numbers: L_eff0 = L_s/L′ ≈ 0.442 mm for I_c = 1.25 µA per junction [from memory, PHYSICS.md]', () => {
    // L′ = Z0/v = 55/1.2e8; E_J0 = 1.3·I_c·Φ0/2π per PHYSICS.md → L_s0 = (Φ0/2π)²/E_J0
    const Lp = 55 / 1.2e8;
    const ls0 = FLUX_QUANTUM / (2 * Math.PI) / (1.3 * 1.25e-6);
    const leff = ls0 / Lp;
    expect(rel(leff, 0.442e-3)).toBeLessThan(5e-3);
    // τ_eff = L_eff/v; as γ/(4 f0) with L_r = Z0/(4 f0) for any f0
    const f0 = 5e9;
    const gamma0 = ls0 / lineInductance(f0, 55);
    expect(rel(effectiveDelay(0, { f0Hz: f0, gamma0, asymmetry: 0 }), leff / 1.2e8)).toBeLessThan(1e-12);
  });
});

describe('bias, line and junction helpers', () => {
  it('flux/bias round trip, negative period', () => {
    for (const [b, P, o] of [[0.37, 1.2, 0.15], [-2.1, -0.9, 0.05], [3, 0.75, -0.1]]) {
      expect(rel(biasFromFlux(fluxFromBias(b, P, o), P, o), b)).toBeLessThan(1e-14);
    }
    expect(fluxFromBias(1.35, 1.2, 0.15)).toBeCloseTo(1, 14);
  });
  it('L_r = Z0/(4 f0) and I_cΣ = Φ0/(2π γ0 L_r), β_L = 2 L I_c0/Φ0 (PHYSICS.md, handbook forms)', () => {
    // 50 Ω, 6 GHz: L_r = 50/(24e9) = 2.0833 nH
    expect(rel(lineInductance(6e9, 50), 50 / 24e9)).toBeLessThan(1e-15);
    // γ0 = 0.05 → L_s0 = 104.17 pH → I_cΣ = 3.291e-16/1.0417e-10 = 3.159 µA
    const ic = criticalCurrentSum(0.05, 6e9, 50);
    expect(rel(ic, 3.291059784754533e-16 / (0.05 * 50 / 24e9))).toBeLessThan(1e-12);
    // β_L for 30 pH and 1.58 µA per junction = 2·30e-12·1.58e-6/Φ0 ≈ 0.0458
    expect(rel(screeningParameter(30e-12, 1.58e-6), (2 * 30e-12 * 1.58e-6) / 2.067833848461929e-15)).toBeLessThan(1e-12);
  });
});
