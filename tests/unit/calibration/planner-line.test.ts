/**
 * Line-mode physics: SQUID terminating a long line (dynamical Casimir emission).
 * Sources: Johansson, Johansson, Wilson, Nori, PRL 103, 147003 (2009) and PRA 82, 052509 (2010)
 * (spectrum form and parameter set [from memory: values as commonly quoted, PHYSICS.md]);
 * Lambrecht, Jaekel, Reynaud, PRL 77, 615 (1996) (two-faced mirror rate [from memory]);
 * photon-number conservation of pure frequency conversion (bosonic commutator) for the thermal terms.
 */
import FFT from 'fft.js';
import { FLUX_QUANTUM, REDUCED_FLUX_QUANTUM } from '@/calibration/constants';
import {
  delayHarmonics, effectiveLengthFromJosephsonEnergy, harmonicBandRateVacuum, harmonicVacuumSpectrum,
  lineBandRateThermal, lineBandRateVacuum, lineExcessSpectrum, lineTotalRate, lineVacuumSpectrum,
  mirrorAmplitudeForRate, twoFacedMirrorRate, veffOverV,
} from '@/calibration/planner/line';
import { planLine } from '@/calibration/planner';
import { effectiveDelayDerivatives } from '@/calibration/squid/model';
import { phaseCalibration } from '@/tests/fixtures/planner/hand-calibration';

const rel = (a: number, b: number) => Math.abs(a - b) / Math.abs(b);

/** Composite Simpson in frequency f (Hz) — independent of the closed forms under test. */
function simpson(f: (x: number) => number, a: number, b: number, n = 2000): number {
  const h = (b - a) / n;
  let s = f(a) + f(b);
  for (let i = 1; i < n; i++) s += (i % 2 ? 4 : 2) * f(a + i * h);
  return (s * h) / 3;
}

describe('single-tone spectrum (per-Hz convention)', () => {
  const fp = 18.6e9;
  const wp = 2 * Math.PI * fp;
  const dtau = 1e-12;
  test('total rate δτ²ω_p³/(12π) equals ∫ n df (n in photons/s per Hz)', () => {
    const numeric = simpson((f) => lineVacuumSpectrum(2 * Math.PI * f, wp, dtau), 0, fp);
    expect(rel(numeric, lineTotalRate(wp, dtau))).toBeLessThan(1e-10);
  });
  test.each([[0, fp], [fp / 2 - 5e8, fp / 2 + 5e8], [1e9, 3e9], [fp / 2, 2 * fp]])('band [%s, %s] closed form = ∫ spectrum', (lo, hi) => {
    const numeric = simpson((f) => lineVacuumSpectrum(2 * Math.PI * f, wp, dtau), lo, Math.min(hi, fp));
    expect(rel(lineBandRateVacuum(fp, dtau, lo, hi), numeric)).toBeLessThan(1e-10);
  });
  test('peak density at ω_p/2 is (v_eff/2v)²', () => {
    expect(rel(lineVacuumSpectrum(wp / 2, wp, dtau), (veffOverV(wp, dtau) / 2) ** 2)).toBeLessThan(1e-14);
  });
});

describe('moving-mirror context (Lambrecht, Jaekel, Reynaud 1996 [from memory])', () => {
  test('one-sided line rate is half the two-faced mirror rate at the same amplitude', () => {
    const c = 299792458;
    for (const [a, f] of [[1e-9, 5e9], [3e-4, 18.6e9]]) {
      const w = 2 * Math.PI * f;
      expect(rel(lineTotalRate(w, a / c), twoFacedMirrorRate(a, w, c) / 2)).toBeLessThan(1e-13);
      const rate = twoFacedMirrorRate(a, w, c);
      expect(rel(mirrorAmplitudeForRate(rate, w, c), a)).toBeLessThan(1e-13);
    }
  });
});

describe('Johansson et al. PRA 82, 052509 (2010) parameter set [from memory, PHYSICS.md worked numbers]', () => {
  // I_c = 1.25 µA per junction, E_J⁰ = 1.3·I_cΦ0/2π, δE_J = E_J⁰/4, Z0 = 55 Ω, v = 1.2e8 m/s, ω_d/2π = 18.6 GHz
  const ic = 1.25e-6;
  const z0 = 55;
  const v = 1.2e8;
  const lPrime = z0 / v;
  const ej = 1.3 * ic * REDUCED_FLUX_QUANTUM;
  const fd = 18.6e9;
  test('L′ = 4.583e-7 H/m and L_eff ≈ 0.44 mm', () => {
    expect(lPrime).toBeCloseTo(4.583e-7, 9);
    const leff = effectiveLengthFromJosephsonEnergy(ej, lPrime, REDUCED_FLUX_QUANTUM);
    expect(leff * 1e3).toBeCloseTo(0.442, 3);
  });
  test('through the planner: symmetric SQUID with I_cΣ = 2.5 µA at E_J = 1.3 I_cΦ0/2π, δE_J = E_J/4', () => {
    // L_s(0) = Φ0/(2π I_cΣ); τ_eff0 = L_s(0)/Z0 (= γ0/4f0 for a λ/4 line). E_J(Φ) = 2E_J1|cos πφ| = 1.3·E_J1 ⇒ cos πφ = 0.65.
    const tau0 = REDUCED_FLUX_QUANTUM / (2 * ic) / z0;
    const phi = Math.acos(0.65) / Math.PI;
    // δE_J/E_J = π·tan(πφ)·δΦ = 1/4 to first order
    const dPhi = 0.25 / (Math.PI * Math.tan(Math.PI * phi));
    const cal = phaseCalibration(tau0, 0);
    const probe = planLine(cal, { mode: 'line', fluxPhi0: phi, targetPairRate: 1, pumpFrequencyHz: fd, uncertaintyDraws: 0, phaseVelocityMPerS: v });
    // Rate the δΦ above gives, then ask the planner for that rate and compare.
    const dtau = Math.abs(probe.dtau_dphi_s_per_phi0 as number) * dPhi;
    const gamma = lineTotalRate(2 * Math.PI * fd, dtau);
    const plan = planLine(cal, { mode: 'line', fluxPhi0: phi, targetPairRate: gamma / 2, pumpFrequencyHz: fd, uncertaintyDraws: 0, phaseVelocityMPerS: v });
    expect(rel(plan.pump_amplitude_phi0, dPhi)).toBeLessThan(1e-9);
    const ctx = plan.context as Record<string, number>;
    expect(ctx.effective_length_m * 1e3).toBeCloseTo(0.442, 3);
    expect(ctx.effective_length_modulation_m * 1e3).toBeCloseTo(0.110, 3);
    expect(plan.veff_over_v as number).toBeCloseTo(0.108, 2);
    expect(rel(plan.total_photon_rate as number, 3.6e7)).toBeLessThan(0.02);
    expect(FLUX_QUANTUM).toBeGreaterThan(0);
  });
});

describe('thermal input', () => {
  const fp = 12e9;
  const wp = 2 * Math.PI * fp;
  const dtau = 2e-12;
  test('flat occupation n: excess = (2n + 1)·vacuum (same structure as the cavity result)', () => {
    const n = 0.3;
    for (const f of [1e9, 6e9, 11e9, 15e9]) {
      const w = 2 * Math.PI * f;
      const vac = lineVacuumSpectrum(w, wp, dtau);
      expect(lineExcessSpectrum(w, wp, dtau, () => n)).toBeCloseTo((2 * n + 1) * vac, 12);
    }
  });
  test('T → 0 reduces to the vacuum band rate', () => {
    const zero = () => 0;
    expect(rel(lineBandRateThermal(fp, dtau, 5e9, 7e9, zero), lineBandRateVacuum(fp, dtau, 5e9, 7e9))).toBeLessThan(1e-12);
  });
  test('frequency-conversion terms conserve photon number over all frequencies', () => {
    const T = 0.3;
    const nth = (w: number) => 1 / Math.expm1((6.62607015e-34 * w) / (2 * Math.PI * 1.380649e-23 * T));
    // Excess minus pair creation = scattering only; integrates to ~0 over (0, ∞).
    const pairPart = (f: number) => {
      const w = 2 * Math.PI * f;
      return w < wp ? dtau * dtau * w * (wp - w) * (1 + nth(w) + nth(wp - w)) : 0;
    };
    const scattering = (f: number) => lineExcessSpectrum(2 * Math.PI * f, wp, dtau, nth) - pairPart(f);
    // split at f_p, where the integrand jumps (the up-conversion term starts); open the endpoint there
    const total = simpson(scattering, 1, fp * (1 - 1e-12), 4000) + simpson(scattering, fp * (1 + 1e-12), 12 * fp, 8000);
    const scale = simpson((f) => Math.abs(scattering(f)), 1, 12 * fp, 8000);
    expect(scale).toBeGreaterThan(0);
    expect(Math.abs(total) / scale).toBeLessThan(1e-5);
  });
});

describe('periodic pump waveforms (fft.js)', () => {
  const p = { f0Hz: 0.25, gamma0: 3e-12, asymmetry: 0.05 };
  const tau = (x: number) => effectiveDelayDerivatives(x, p).tau;
  test('single small tone: δτ_1 = |τ′|δΦ and δτ_2 = |τ″|δΦ²/4 (Taylor)', () => {
    const phi = 0.3;
    const a = 1e-3;
    const d = effectiveDelayDerivatives(phi, p);
    const h = delayHarmonics(tau, phi, [{ harmonic: 1, amplitudePhi0: a }]);
    expect(rel(h[1], Math.abs(d.dtaudphi) * a)).toBeLessThan(1e-4);
    expect(rel(h[2], (Math.abs(d.d2taudphi2) * a * a) / 4)).toBeLessThan(1e-2);
    expect(rel(h[0], d.tau + (d.d2taudphi2 * a * a) / 4)).toBeLessThan(1e-8);
  });
  test('harmonics agree with a direct (naive) DFT of the sampled delay', () => {
    const phi = 0.22;
    const tones = [{ harmonic: 1, amplitudePhi0: 0.04 }, { harmonic: 2, amplitudePhi0: 0.015, phaseRad: 0.7 }];
    const n = 256;
    const h = delayHarmonics(tau, phi, tones, n);
    for (const k of [1, 2, 3, 4]) {
      let re = 0;
      let im = 0;
      for (let i = 0; i < n; i++) {
        const t = (2 * Math.PI * i) / n;
        const x = phi + tones.reduce((s, q) => s + q.amplitudePhi0 * Math.cos(q.harmonic * t + (q.phaseRad ?? 0)), 0);
        re += tau(x) * Math.cos(k * t);
        im -= tau(x) * Math.sin(k * t);
      }
      expect(rel(h[k], (2 * Math.hypot(re, im)) / n)).toBeLessThan(1e-9);
    }
    expect(new FFT(8).size).toBe(8);
  });
  test('summed spectrum: each harmonic adds its own parabola; band rate = ∫ summed spectrum', () => {
    const fp = 10e9;
    const h = [0, 1e-12, 3e-13, 1e-13];
    const wp = 2 * Math.PI * fp;
    const numeric = simpson((f) => harmonicVacuumSpectrum(2 * Math.PI * f, wp, h), 2e9, 9e9, 6000);
    expect(rel(harmonicBandRateVacuum(fp, h, 2e9, 9e9), numeric)).toBeLessThan(1e-6);
    expect(harmonicVacuumSpectrum(2 * Math.PI * 15e9, wp, h)).toBeCloseTo(lineVacuumSpectrum(2 * Math.PI * 15e9, 2 * wp, 3e-13) + lineVacuumSpectrum(2 * Math.PI * 15e9, 3 * wp, 1e-13), 20);
  });
  test('planner: a one-tone waveform reduces to the single-tone formula for small δΦ', () => {
    const cal = phaseCalibration(3e-12, 0.05);
    const base = { mode: 'line' as const, fluxPhi0: 0.3, targetPairRate: 1e2, pumpFrequencyHz: 12e9, bandHz: 2e9, uncertaintyDraws: 0 };
    const single = planLine(cal, base);
    const wave = planLine(cal, { ...base, waveform: [{ harmonic: 1, amplitudePhi0: 1 }] });
    expect(single.pump_amplitude_phi0).toBeLessThan(1e-3);
    expect(rel(wave.pump_amplitude_phi0, single.pump_amplitude_phi0)).toBeLessThan(1e-4);
    expect(rel(wave.predicted_pair_rate, 1e2)).toBeLessThan(1e-9);
  });
});
