/**
 * Phase-versus-flux fit of a non-resonant SQUID termination (calibration/tuning/phaseFit.ts):
 * θ(Φ) = θ0 − 2ω·τ_eff(Φ), τ_eff = τ_eff0/sqrt(cos²πφ + d²sin²πφ) (Johansson et al., PRL 103,
 * 147003 (2009); PRA 82, 052509 (2010)). Sweeps generated OFFLINE by
 * tests/fixtures/tuning/make_tuning_fixtures.py (numpy), phase wrapped into (−π, π] as a network
 * analyser reports it; reference fit by scipy.optimize.least_squares on numpy.unwrap-ped phase.
 */
import fixture from '@/tests/fixtures/tuning/phase_sweeps.json';
import {
  fitPhaseVsFlux, phaseModelWithGradient, phaseResultToCalibrationJson, unwrapPhase, wrapToPi, TuningInputError,
} from '@/calibration/tuning';
import { FLUX_QUANTUM } from '@/calibration/constants';

type Sweep = (typeof fixture.sweeps)[number];
const sweep = (name: string): Sweep => fixture.sweeps.find((s) => s.name === name) as Sweep;
const pointsOf = (s: Sweep) => s.bias.map((b, i) => ({ bias: b, phaseRad: s.phase_rad[i] }));
const fit = (s: Sweep, extra: Record<string, unknown> = {}) =>
  fitPhaseVsFlux(pointsOf(s), { probeFrequencyHz: s.probe_frequency_hz, biasUnit: s.bias_unit, ...extra });

describe('phase helpers', () => {
  it('wrapToPi maps into (−π, π]', () => {
    for (const [a, w] of [[0, 0], [Math.PI, Math.PI], [-Math.PI, Math.PI], [3 * Math.PI, Math.PI], [7, 7 - 2 * Math.PI], [-7, -7 + 2 * Math.PI]]) {
      expect(wrapToPi(a)).toBeCloseTo(w, 12);
    }
  });
  it('unwrapPhase undoes the wrapping of the clean fixture (numpy.angle wrapped)', () => {
    const s = sweep('phase_wrapping');
    const clean = s.phase_unwrapped_clean_rad;
    const wrapped = clean.map(wrapToPi);
    const un = unwrapPhase(wrapped);
    const k = Math.round((clean[0] - un[0]) / (2 * Math.PI));
    un.forEach((u, i) => expect(u + 2 * Math.PI * k).toBeCloseTo(clean[i], 9));
  });
});

describe('recovery of the truth', () => {
  // [name, τ rel tol, d abs tol, |period| rel tol, offset tol in periods, θ0 abs tol (rad)]
  const table: [string, number, number, number, number, number][] = [
    ['phase_clean', 1e-9, 1e-8, 1e-9, 1e-9, 1e-9],
    ['phase_wrapping', 0.01, 0.01, 1e-3, 2e-3, 0.02],
    ['phase_noisy', 0.01, 0.01, 2e-3, 2e-3, 0.03],
  ];
  it.each(table)('%s', (name, tTau, tD, tP, tO, tTh) => {
    const s = sweep(name);
    const r = fit(s);
    const t = s.truth;
    expect(r.success).toBe(true);
    expect(Math.abs(r.params.tau_eff0_s.value / t.tau_eff0_s - 1)).toBeLessThan(tTau);
    expect(Math.abs(r.params.asymmetry.value - t.asymmetry)).toBeLessThan(tD);
    expect(Math.abs(r.params.flux_period.value / Math.abs(t.flux_period) - 1)).toBeLessThan(tP);
    expect(Math.abs(r.params.flux_offset.value - t.flux_offset) / Math.abs(t.flux_period)).toBeLessThan(tO);
    expect(Math.abs(wrapToPi(r.params.theta0_rad.value - t.theta0_rad))).toBeLessThan(tTh);
    expect(r.params.theta0_rad.value).toBeGreaterThan(-Math.PI);
    expect(r.params.theta0_rad.value).toBeLessThanOrEqual(Math.PI);
    if (s.noise_rad > 0) expect(Math.abs((r.derived.noise_rad as number) / s.noise_rad - 1)).toBeLessThan(0.2);
    expect(r.outliers).toEqual([]);
  });

  it('phase swing of the wrapping case exceeds 2π and the residuals stay small (wrapped residuals)', () => {
    const r = fit(sweep('phase_wrapping'));
    expect(r.derived.phase_swing_rad as number).toBeGreaterThan(2 * Math.PI);
    for (const p of r.points) expect(Math.abs(p.residual)).toBeLessThan(0.06);
  });
});

describe('agreement with scipy.optimize.least_squares (linear loss)', () => {
  it.each(fixture.reference_fits.map((f) => [f.sweep, f]))('%s', (_n, ref) => {
    const r = fit(sweep(ref.sweep), { loss: 'linear' });
    for (const [k, v] of Object.entries(ref.values)) {
      const key = k as keyof typeof r.params;
      const se = ref.stderr[k as keyof typeof ref.stderr];
      const diff = key === 'theta0_rad' ? wrapToPi(r.params[key].value - v) : r.params[key].value - v;
      expect(Math.abs(diff) / se).toBeLessThan(0.01);
      expect(Math.abs((r.params[key].stderr as number) / se - 1)).toBeLessThan(0.01);
    }
  });
});

describe('analytic Jacobian of the phase model', () => {
  it('matches central differences', () => {
    const bias = [-0.6, -0.1, 0.2, 0.45, 0.9];
    const p = { tau_eff0_s: 5e-12, asymmetry: 0.2, flux_period: 1.3, flux_offset: 0.3, theta0_rad: 1 };
    const w = 2 * Math.PI * 8e9;
    const g = phaseModelWithGradient(bias, p, w, true).grad as Record<string, Float64Array>;
    for (const k of Object.keys(p) as (keyof typeof p)[]) {
      const h = 1e-6 * Math.abs(p[k]);
      const up = phaseModelWithGradient(bias, { ...p, [k]: p[k] + h }, w, false).th;
      const dn = phaseModelWithGradient(bias, { ...p, [k]: p[k] - h }, w, false).th;
      bias.forEach((_, i) => {
        const fd = (up[i] - dn[i]) / (2 * h);
        expect(Math.abs(g[k][i] - fd)).toBeLessThan(1e-6 * Math.max(Math.abs(fd), 1 / Math.abs(p[k])));
      });
    }
  });
});

describe('derived, JSON and failures', () => {
  it('L_s0 = Z0·τ_eff0 (τ = L_s/(L′v), L′v = Z0), I_cΣ = Φ0/(2π L_s0), L_eff0 = v·τ_eff0', () => {
    const r = fit(sweep('phase_noisy'), { z0Ohm: 55, phaseVelocityMps: 1.2e8 });
    const tau = r.params.tau_eff0_s.value;
    expect(r.derived.ls0_h as number).toBeCloseTo(55 * tau, 22);
    expect(Math.abs((r.derived.ic_sum_a as number) / (FLUX_QUANTUM / (2 * Math.PI * 55 * tau)) - 1)).toBeLessThan(1e-12);
    expect(r.derived.l_eff0_m as number).toBeCloseTo(1.2e8 * tau, 15);
  });
  it('CalibrationJson with model phase', () => {
    const r = fit(sweep('phase_noisy'));
    const j = phaseResultToCalibrationJson(r, { source: 'phase.csv' });
    expect(j.model).toBe('phase');
    expect(j.kind).toBe('phase_flux');
    expect(Object.keys(j.params).sort()).toEqual(['asymmetry', 'flux_offset', 'flux_period', 'tau_eff0_s', 'theta0_rad']);
    expect(j.fixed.probe_frequency_hz).toBe(8e9);
    expect(j.covariance?.names).toContain('tau_eff0_s');
    expect(JSON.parse(JSON.stringify(j))).toEqual(j);
  });
  it('too few points and flat phase give success=false with a message', () => {
    const s = sweep('phase_noisy');
    const few = fitPhaseVsFlux(pointsOf(s).slice(0, 4), { probeFrequencyHz: 8e9 });
    expect(few.success).toBe(false);
    expect(few.message).toMatch(/too few points: 4 given/);
    let seed = 7;
    const rnd = () => ((seed = (seed * 1103515245 + 12345) % 2147483648) / 2147483648) - 0.5;
    const flat = fitPhaseVsFlux(Array.from({ length: 120 }, (_, i) => ({ bias: i / 119, phaseRad: 0.5 + 0.03 * rnd() })), { probeFrequencyHz: 8e9 });
    expect(flat.success).toBe(false);
    expect(flat.message).toMatch(/no flux dependence resolved/);
    // every number finite: the JSON round trip keeps the object (NaN/Infinity would become null)
    const j = phaseResultToCalibrationJson(flat);
    expect(JSON.parse(JSON.stringify(j))).toEqual(j);
    const fewJson = phaseResultToCalibrationJson(few);
    expect(JSON.parse(JSON.stringify(fewJson))).toEqual(fewJson);
  });
  it('bad input throws naming the point', () => {
    expect(() => fitPhaseVsFlux([{ bias: 0, phaseRad: 0 }, { bias: 1, phaseRad: Infinity }], { probeFrequencyHz: 8e9 })).toThrow(
      /point 1: phaseRad must be a finite number/,
    );
    expect(() => fitPhaseVsFlux([], { probeFrequencyHz: 0 })).toThrow(TuningInputError);
  });
});
