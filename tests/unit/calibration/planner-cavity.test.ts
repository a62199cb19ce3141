/**
 * Cavity-mode physics of the planner against
 *  (a) an independent numerical solution of the linearised input–output Langevin equations
 *      (tests/fixtures/planner/langevin_reference.py: numpy 2×2 solve per ν, scipy quad, brentq on the
 *      drift-matrix eigenvalues) — committed JSON, no python needed here;
 *  (b) the closed-form worked numbers of PHYSICS.md (x = 0.8 → N = 0.889, G0 = 20.75 = 13.17 dB) [derived];
 *  (c) the notation of Wustmann & Shumeiko, PRB 87, 184501 (2013) and Yamamoto et al., APL 93, 042510
 *      (2008) [from memory, mapped below].
 */
import reference from '@/tests/fixtures/planner/langevin_reference.json';
import {
  centreGain, excessOutputSpectrum, integrateSpectrum, modulationForCentreGain, modulationForOccupation,
  phaseSensitiveGains, signalGain, signalReflection, thermalOccupation, thresholdModulation, vacuumOccupation,
  vacuumOutputSpectrum, type CavityDrive,
} from '@/calibration/planner/cavity';

interface RefCase {
  name: string; kappa: number; kappa_c: number; detuning: number; delta_omega: number; omega_p: number;
  temperature_k: number; n_th_half_pump: number; excess_output_rate: number; intracavity_occupation: number;
  band_half_width: number; excess_output_rate_in_band: number; threshold_delta_omega: number;
  spectrum_samples: { nu: number; excess_output: number; signal_gain: number }[];
}
const cases = (reference as { cases: RefCase[] }).cases;
const driveOf = (c: RefCase): CavityDrive => ({ kappa: c.kappa, kappaC: c.kappa_c, deltaOmega: c.delta_omega, detuning: c.detuning });
const rel = (a: number, b: number) => Math.abs(a - b) / Math.abs(b);

describe('cavity mode vs numerical Langevin solution (scipy, committed fixture)', () => {
  test.each(cases.map((c) => [c.name, c] as const))('%s: intracavity N, output rate, threshold', (_n, c) => {
    const n = c.n_th_half_pump;
    // Thermal cases: n_th varies across ±ω_p/4 in the reference, our closed form uses n_th(ω_p/2): 1e-4.
    const tol = c.temperature_k > 0 ? 1e-4 : 1e-9;
    expect(rel(thermalOccupation(c.delta_omega, c.kappa, c.detuning, n), c.intracavity_occupation)).toBeLessThan(tol);
    expect(rel((2 * n + 1) * c.kappa_c * vacuumOccupation(c.delta_omega, c.kappa, c.detuning), c.excess_output_rate)).toBeLessThan(tol);
    expect(rel(thresholdModulation(c.kappa, c.detuning), c.threshold_delta_omega)).toBeLessThan(1e-10);
  });

  test.each(cases.map((c) => [c.name, c] as const))('%s: spectrum and signal gain samples', (_n, c) => {
    const d = driveOf(c);
    for (const s of c.spectrum_samples) {
      // n_th at the absolute signal/idler frequencies, as the reference uses
      const nth = (w: number) => (c.temperature_k > 0 ? 1 / Math.expm1((6.62607015e-34 * w) / (2 * Math.PI * 1.380649e-23 * c.temperature_k)) : 0);
      const mine = excessOutputSpectrum(s.nu, d, nth(c.omega_p / 2 + s.nu), nth(c.omega_p / 2 - s.nu));
      expect(rel(mine, s.excess_output)).toBeLessThan(1e-9);
      expect(rel(signalGain(s.nu, d), s.signal_gain)).toBeLessThan(1e-9);
    }
  });

  test.each(cases.map((c) => [c.name, c] as const))('%s: photons in a band of width κ', (_n, c) => {
    const d = driveOf(c);
    const mine = (2 * c.n_th_half_pump + 1) * integrateSpectrum((nu) => vacuumOutputSpectrum(nu, d), d, c.band_half_width);
    expect(rel(mine, c.excess_output_rate_in_band)).toBeLessThan(c.temperature_k > 0 ? 1e-4 : 1e-8);
  });
});

describe('closed forms (PHYSICS.md worked numbers [derived])', () => {
  test('x = 0.8 on resonance: N = 0.889, G0 = 20.75 = 13.17 dB', () => {
    const kappa = 2 * Math.PI * 1e6;
    expect(vacuumOccupation(0.8 * kappa, kappa, 0)).toBeCloseTo(0.8889, 4);
    expect(centreGain(0.8)).toBeCloseTo(20.75, 2);
    expect(10 * Math.log10(centreGain(0.8))).toBeCloseTo(13.17, 2);
    // κ_i = 0, Δ = 0: the general reflection coefficient reduces to (1 + x²)/(1 − x²)
    const [re, im] = signalReflection(0, { kappa, kappaC: kappa, deltaOmega: 0.8 * kappa, detuning: 0 });
    expect(re).toBeCloseTo((1 + 0.64) / (1 - 0.64), 12);
    expect(Math.abs(im)).toBeLessThan(1e-12);
  });

  test('phase-sensitive gains ((1±x)/(1∓x))²: product 1, and G+ = (√G0 + √(G0 − 1))² (degenerate-amplifier identity)', () => {
    for (const x of [0.1, 0.5, 0.8, 0.95]) {
      const { amplified, deamplified } = phaseSensitiveGains(x);
      expect(amplified * deamplified).toBeCloseTo(1, 12);
      const g0 = centreGain(x);
      expect(rel(amplified, (Math.sqrt(g0) + Math.sqrt(g0 - 1)) ** 2)).toBeLessThan(1e-12);
    }
  });

  test.each([
    [0.3, 0, 1],
    [0.8, 0, 0.8],
    [0.5, 0.4, 0.7],
    [0.9, -0.3, 0.5],
    [0.99, 0.1, 0.9],
  ])('∫ n(ν) dν/2π = κ_c·N for x = %s, Δ/κ = %s, κ_c/κ = %s', (x, dk, ck) => {
    const kappa = 2 * Math.PI * 2e6;
    const d: CavityDrive = { kappa, kappaC: ck * kappa, deltaOmega: x * thresholdModulation(kappa, dk * kappa), detuning: dk * kappa };
    const integral = integrateSpectrum((nu) => vacuumOutputSpectrum(nu, d), d);
    expect(rel(integral, d.kappaC * vacuumOccupation(d.deltaOmega, kappa, d.detuning))).toBeLessThan(1e-8);
  });

  test('thermal: numerically integrated excess spectrum with n_th(ω_p/2 ± ν) matches (2 n_th + 1) κ_c N', () => {
    // Low resonance frequency so n_th is large (≈ 4) and varies over the line; κ ≪ ω so the flat-n form holds to ~1e-6.
    const f = 200e6;
    const T = 0.05;
    const kappa = (2 * Math.PI * f) / 2000;
    const d: CavityDrive = { kappa, kappaC: 0.7 * kappa, deltaOmega: 0.6 * kappa, detuning: 0 };
    const nth = (w: number) => 1 / Math.expm1((6.62607015e-34 * w) / (2 * Math.PI * 1.380649e-23 * T));
    const w0 = 2 * Math.PI * f;
    const numeric = integrateSpectrum((nu) => excessOutputSpectrum(nu, d, nth(w0 + nu), nth(w0 - nu)), d, w0 / 2);
    const n = nth(w0);
    expect(n).toBeGreaterThan(4);
    expect(rel(numeric, (2 * n + 1) * d.kappaC * vacuumOccupation(d.deltaOmega, kappa, 0))).toBeLessThan(1e-4);
  });

  test('threshold on resonance is δω_th = κ and N diverges there', () => {
    const kappa = 1e7;
    expect(thresholdModulation(kappa, 0)).toBe(kappa);
    expect(vacuumOccupation(kappa, kappa, 0)).toBe(Infinity);
    expect(vacuumOccupation(0.999999 * kappa, kappa, 0)).toBeGreaterThan(1e5);
  });

  test.each([
    [1e-3, 0], [0.5, 0], [10, 0.3], [1e4, -0.2],
  ])('inverse of N: N = %s, Δ/κ = %s round trip', (n, dk) => {
    const kappa = 3e7;
    const dw = modulationForOccupation(n, kappa, dk * kappa);
    expect(rel(vacuumOccupation(dw, kappa, dk * kappa), n)).toBeLessThan(1e-10);
    expect(dw).toBeLessThan(thresholdModulation(kappa, dk * kappa));
  });

  test.each([
    [3, 1, 0], [20.75, 1, 0], [10, 0.8, 0], [10, 0.6, 0.3], [100, 0.9, -0.1], [2, 0.3, 0.5],
  ])('inverse of the centre gain: G = %s, κ_c/κ = %s, Δ/κ = %s', (g, ck, dk) => {
    const kappa = 3e7;
    const dw = modulationForCentreGain(g, kappa, ck * kappa, dk * kappa) as number;
    expect(dw).not.toBeNull();
    expect(rel(signalGain(0, { kappa, kappaC: ck * kappa, deltaOmega: dw, detuning: dk * kappa }), g)).toBeLessThan(1e-9);
    if (ck === 1 && dk === 0 && g === 20.75) expect(dw / kappa).toBeCloseTo(0.8, 4);
  });

  test('gain target ≤ passive reflection has no solution', () => {
    expect(modulationForCentreGain(1, 1e7, 1e7, 0)).toBeNull();
    expect(modulationForCentreGain(0.5, 1e7, 1e7, 0)).toBeNull();
  });
});

describe('notation map to the literature [from memory]', () => {
  /*
   * Ours: ȧ = −(iΔ + κ/2)a − i(δω/2)a† + √κ_c a_in + √κ_i b_in, κ = energy decay, δω = peak frequency modulation.
   * Wustmann & Shumeiko (2013) [from memory]: amplitude damping Γ (= κ/2), detuning δ (= Δ), effective pump
   *   strength ε (= δω/2, half the frequency-modulation amplitude); instability threshold |ε|² = Γ² + δ².
   * Yamamoto et al. (2008) [from memory]: flux-driven amplifier described by the pump-induced modulation of the
   *   resonance δω compared with the linewidth; on resonance the threshold is δω = κ (FWHM in rad/s), and the
   *   degenerate gain on resonance ((Γ² + ε²)/(Γ² − ε²))² in the variables above.
   */
  test('threshold and centre gain agree in both notations', () => {
    for (const [kappa, delta, dw] of [[2e7, 0, 1e7], [2e7, 5e6, 1.5e7], [1e6, -2e5, 3e5]]) {
      const Gamma = kappa / 2;
      const eps = dw / 2;
      const epsTh = Math.sqrt(Gamma * Gamma + delta * delta);
      expect(rel(thresholdModulation(kappa, delta) / 2, epsTh)).toBeLessThan(1e-14);
      if (delta === 0) {
        const theirs = ((Gamma ** 2 + eps ** 2) / (Gamma ** 2 - eps ** 2)) ** 2;
        expect(rel(centreGain(dw / kappa), theirs)).toBeLessThan(1e-12);
        expect(rel(signalGain(0, { kappa, kappaC: kappa, deltaOmega: dw, detuning: 0 }), theirs)).toBeLessThan(1e-12);
      }
    }
  });
});
