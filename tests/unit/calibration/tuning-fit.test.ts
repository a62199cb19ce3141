/**
 * Tuning-curve fit (calibration/tuning/fitTuning.ts) against synthetic sweeps generated OFFLINE by
 * tests/fixtures/tuning/make_tuning_fixtures.py from the exact model (roots by
 * scipy.optimize.brentq; model form Pogorzalek et al., Phys. Rev. Applied 8, 024012 (2017)) with
 * known truth, and against scipy.optimize.least_squares reference fits of the same data.
 * Recovery targets (from the issue): f0 1e-4 relative, γ0 1 %, d ±0.01, |period| 1e-3 relative,
 * offset 2e-3 of a period. The partial-lobe sweep cannot meet them for d, period and γ0: there we
 * test that the truth lies within 3 reported standard errors and that the correlation is reported.
 */
import fixture from '@/tests/fixtures/tuning/tuning_sweeps.json';
import {
  fitTuningCurve, tuningModelWithGradient, tuningResultToCalibrationJson, compareTuningModels, tuningAtBias,
  TuningInputError, TuningFitResult,
} from '@/calibration/tuning';
import { FLUX_QUANTUM } from '@/calibration/constants';
import { criticalCurrentSum, lineInductance, resonanceDerivatives } from '@/calibration/squid/model';

type Sweep = (typeof fixture.sweeps)[number];
const sweep = (name: string): Sweep => {
  const s = fixture.sweeps.find((x) => x.name === name);
  if (!s) throw new Error(`fixture ${name} missing`);
  return s;
};
const pointsOf = (s: Sweep) => s.bias.map((b, i) => ({ bias: b, frHz: s.fr_hz[i] }));
const cache = new Map<string, TuningFitResult>();
const fitOf = (name: string) => {
  if (!cache.has(name)) cache.set(name, fitTuningCurve(pointsOf(sweep(name)), { biasUnit: sweep(name).bias_unit }));
  return cache.get(name) as TuningFitResult;
};

/** Every number in a JSON-able value is finite (no NaN/Infinity that JSON would turn into null). */
function allFinite(v: unknown, path = '$'): string | null {
  if (typeof v === 'number') return Number.isFinite(v) ? null : path;
  if (Array.isArray(v)) {
    for (let i = 0; i < v.length; i++) {
      const bad = allFinite(v[i], `${path}[${i}]`);
      if (bad) return bad;
    }
  } else if (v && typeof v === 'object') {
    for (const [k, x] of Object.entries(v)) {
      const bad = allFinite(x, `${path}.${k}`);
      if (bad) return bad;
    }
  }
  return null;
}

describe('recovery of the truth (issue targets)', () => {
  const names = ['three_periods_clean', 'three_periods_noisy', 'one_lobe', 'decreasing_bias', 'negative_period',
    'voltage_bias', 'spurious_points', 'symmetric', 'large_noise'];
  it.each(names.map((n) => [n]))('%s', (name) => {
    const s = sweep(name);
    const r = fitOf(name);
    const t = s.truth;
    expect(r.success).toBe(true);
    expect(Math.abs(r.params.f0_hz.value / t.f0_hz - 1)).toBeLessThan(1e-4);
    expect(Math.abs(r.params.gamma0.value / t.gamma0 - 1)).toBeLessThan(0.01);
    expect(Math.abs(r.params.asymmetry.value - t.asymmetry)).toBeLessThan(0.01);
    // a tuning curve is even in flux: only |period| is observable (reported positive by default)
    expect(r.params.flux_period.value).toBeGreaterThan(0);
    expect(Math.abs(r.params.flux_period.value / Math.abs(t.flux_period) - 1)).toBeLessThan(1e-3);
    expect(Math.abs(r.params.flux_offset.value - t.flux_offset) / Math.abs(t.flux_period)).toBeLessThan(2e-3);
    // noise estimate close to the generator's σ (within 20 %, 200 points: common practice)
    if (s.noise_hz > 0) expect(Math.abs(r.derived.noise_hz / s.noise_hz - 1)).toBeLessThan(0.2);
    // the truth lies within 5 reported standard errors for the well-determined parameters
    for (const k of ['f0_hz', 'gamma0', 'flux_offset'] as const) {
      const p = r.params[k];
      if (s.noise_hz > 0 && p.stderr !== null) expect(Math.abs(p.value - t[k]) / p.stderr).toBeLessThan(5);
    }
  });

  it('clean sweep is recovered to ~1e-9 (model and fit consistent)', () => {
    const r = fitOf('three_periods_clean');
    const t = sweep('three_periods_clean').truth;
    expect(Math.abs(r.params.f0_hz.value / t.f0_hz - 1)).toBeLessThan(1e-9);
    expect(Math.abs(r.params.gamma0.value / t.gamma0 - 1)).toBeLessThan(1e-7);
    expect(Math.abs(r.params.asymmetry.value - t.asymmetry)).toBeLessThan(1e-7);
    expect(r.outliers).toEqual([]);
  });

  it('partial lobe (0.35 Φ0): offset and f0 still good, d/period/γ0 only within their (large) errors, correlation reported', () => {
    const s = sweep('partial_lobe');
    const r = fitOf('partial_lobe');
    const t = s.truth;
    expect(r.success).toBe(true);
    expect(Math.abs(r.params.flux_offset.value - t.flux_offset) / t.flux_period).toBeLessThan(2e-3);
    expect(Math.abs(r.params.f0_hz.value / t.f0_hz - 1)).toBeLessThan(5e-3);
    for (const k of ['f0_hz', 'gamma0', 'asymmetry', 'flux_period'] as const) {
      const p = r.params[k];
      expect(p.stderr).not.toBeNull();
      expect(Math.abs(p.value - Math.abs(t[k])) / (p.stderr as number)).toBeLessThan(3);
    }
    const names = r.fit?.varyingNames ?? [];
    const c = r.fit?.correlation as number[][];
    expect(Math.abs(c[names.indexOf('asymmetry')][names.indexOf('flux_period')])).toBeGreaterThan(0.9);
    expect(r.warnings.join('\n')).toMatch(/cover only 0\.3\d Φ0/);
  });
});

describe('agreement with scipy.optimize.least_squares (linear loss, fixture reference_fits)', () => {
  it.each(fixture.reference_fits.map((f) => [f.sweep, f]))('%s', (_name, ref) => {
    const s = sweep(ref.sweep);
    const r = fitTuningCurve(pointsOf(s), { loss: 'linear' });
    for (const [k, v] of Object.entries(ref.values)) {
      const key = k as keyof typeof r.params;
      const se = ref.stderr[k as keyof typeof ref.stderr];
      // same optimum to a small fraction of the statistical error
      expect(Math.abs(r.params[key].value - v) / se).toBeLessThan(0.01);
      // same standard errors ((JᵀJ)⁻¹·redchi in both)
      expect(Math.abs((r.params[key].stderr as number) / se - 1)).toBeLessThan(0.01);
    }
  });
});

describe('robust loss and outliers', () => {
  it('flags exactly the three box-mode picks (soft_l1)', () => {
    const s = sweep('spurious_points');
    const r = fitOf('spurious_points');
    expect(r.outliers).toEqual(s.spurious_indices);
    for (const i of s.spurious_indices) {
      expect(r.points[i].outlier).toBe(true);
      expect(r.points[i].robust_weight as number).toBeLessThan(0.5);
    }
  });
  it('the linear loss is pulled by them (why soft_l1 is the default)', () => {
    const s = sweep('spurious_points');
    const lin = fitTuningCurve(pointsOf(s), { loss: 'linear' });
    const rob = fitOf('spurious_points');
    const errLin = Math.abs(lin.params.f0_hz.value / s.truth.f0_hz - 1);
    const errRob = Math.abs(rob.params.f0_hz.value / s.truth.f0_hz - 1);
    expect(errLin).toBeGreaterThan(3 * errRob);
  });
});

describe('conventions', () => {
  it('points come back in file order for a decreasing sweep', () => {
    const s = sweep('decreasing_bias');
    const r = fitOf('decreasing_bias');
    expect(s.bias[0]).toBeGreaterThan(s.bias[s.bias.length - 1]);
    r.points.forEach((p, i) => {
      expect(p.index).toBe(i);
      expect(p.bias).toBe(s.bias[i]);
      expect(p.measured).toBe(s.fr_hz[i]);
    });
  });
  it('offset is the maximum nearest the sweep centre', () => {
    for (const name of ['three_periods_noisy', 'decreasing_bias', 'voltage_bias']) {
      const s = sweep(name);
      const r = fitOf(name);
      const centre = 0.5 * (Math.min(...s.bias) + Math.max(...s.bias));
      expect(Math.abs(r.params.flux_offset.value - centre)).toBeLessThanOrEqual(0.5 * r.params.flux_period.value + 1e-12);
      // it is a maximum: df/dΦ = 0 and d²f/dΦ² < 0 there
      const d = tuningAtBias(r, r.params.flux_offset.value);
      expect(Math.abs(d.dfdphi)).toBeLessThan(1e-6 * r.params.f0_hz.value);
      expect(d.d2fdphi2).toBeLessThan(0);
    }
  });
  it('periodSign −1 reports the reversed-coil period and flips its covariance row', () => {
    const s = sweep('negative_period');
    const neg = fitTuningCurve(pointsOf(s), { periodSign: -1, biasUnit: 'mA' });
    const pos = fitOf('negative_period');
    expect(Math.abs(neg.params.flux_period.value / s.truth.flux_period - 1)).toBeLessThan(1e-3);
    expect(neg.params.flux_period.value).toBeCloseTo(-pos.params.flux_period.value, 10);
    // the model is unchanged: same residuals
    neg.points.forEach((p, i) => expect(p.model).toBeCloseTo(pos.points[i].model, 0));
    const jn = tuningResultToCalibrationJson(neg);
    const jp = tuningResultToCalibrationJson(pos);
    const names = jn.correlation?.names as string[];
    const a = names.indexOf('flux_period');
    const b = names.indexOf('f0_hz');
    expect(jn.correlation?.matrix[a][b]).toBeCloseTo(-(jp.correlation?.matrix[a][b] as number), 6);
  });
  it('bias quantity from the unit; M = Φ0/period for a current bias', () => {
    const v = tuningResultToCalibrationJson(fitOf('voltage_bias'));
    expect(v.bias_unit).toBe('V');
    expect(v.bias_quantity).toBe('voltage');
    expect(v.derived.mutual_inductance_h).toBeUndefined();
    const c = fitOf('three_periods_noisy');
    expect(c.derived.mutual_inductance_h as number).toBeCloseTo(FLUX_QUANTUM / (c.params.flux_period.value * 1e-3), 25);
  });
});

describe('derived quantities', () => {
  const r = fitTuningCurve(pointsOf(sweep('three_periods_noisy')), { z0Ohm: 50, loopInductanceH: 1e-9, biasUnit: 'mA' });
  const f0 = r.params.f0_hz.value;
  const g0 = r.params.gamma0.value;
  it('L_r = Z0/(4 f0), L_s0 = γ0 L_r, I_cΣ = Φ0/(2π L_s0), τ_eff0 = γ0/(4 f0) (PHYSICS.md)', () => {
    expect(r.derived.l_r_h).toBeCloseTo(50 / (4 * f0), 20);
    expect(r.derived.ls0_h).toBeCloseTo(g0 * lineInductance(f0, 50), 22);
    expect(Math.abs((r.derived.ic_sum_a as number) / (FLUX_QUANTUM / (2 * Math.PI * g0 * 50 / (4 * f0))) - 1)).toBeLessThan(1e-12);
    expect(r.derived.ic_sum_a).toBe(criticalCurrentSum(g0, f0, 50));
    expect(Math.abs(r.derived.tau_eff0_s / (g0 / (4 * f0)) - 1)).toBeLessThan(1e-14);
  });
  it('β_L = 2 L (I_cΣ/2)/Φ0 and the hysteresis warning above 2/π', () => {
    const beta = (2 * 1e-9 * ((r.derived.ic_sum_a as number) / 2)) / FLUX_QUANTUM;
    expect(Math.abs((r.derived.beta_l as number) / beta - 1)).toBeLessThan(1e-12);
    expect(beta).toBeGreaterThan(2 / Math.PI);
    expect(r.warnings.join('\n')).toMatch(/hysteretic/);
    const small = fitTuningCurve(pointsOf(sweep('three_periods_noisy')), { z0Ohm: 50, loopInductanceH: 20e-12 });
    expect(small.derived.beta_l as number).toBeLessThan(2 / Math.PI);
    expect(small.warnings.join('\n')).not.toMatch(/hysteretic/);
  });
  it('reference points carry f and its flux derivatives of the fitted model', () => {
    for (const rp of r.derived.reference_points) {
      const d = resonanceDerivatives(rp.flux_phi0, r.line, 'exact');
      expect(rp.f_hz).toBe(d.f);
      expect(rp.df_dphi_hz_per_phi0).toBe(d.dfdphi);
      expect(rp.bias).toBeCloseTo(r.params.flux_offset.value + r.params.flux_period.value * rp.flux_phi0, 12);
    }
    const range = r.derived.tuning_range_hz;
    expect(range[0]).toBeLessThan(range[1]);
    expect(range[1]).toBeLessThanOrEqual(r.derived.f_at_offset_hz * (1 + 1e-12));
  });
});

describe('analytic Jacobian', () => {
  it.each([['exact'], ['approx']] as const)('%s model matches central differences', (model) => {
    const bias = [-0.7, -0.2, 0.05, 0.33, 0.61, 1.4];
    const p = { f0_hz: 6.1e9, gamma0: 0.05, asymmetry: 0.08, flux_period: 1.2, flux_offset: 0.15, cs_over_cr: 0.1 };
    const { grad } = tuningModelWithGradient(bias, p, model, true);
    for (const k of Object.keys(p) as (keyof typeof p)[]) {
      if (model === 'approx' && k === 'cs_over_cr') continue;
      const h = 1e-6 * Math.max(Math.abs(p[k]), 1e-2);
      const up = tuningModelWithGradient(bias, { ...p, [k]: p[k] + h }, model, false).f;
      const dn = tuningModelWithGradient(bias, { ...p, [k]: p[k] - h }, model, false).f;
      bias.forEach((_, i) => {
        const fd = (up[i] - dn[i]) / (2 * h);
        const an = (grad as Record<string, Float64Array>)[k][i];
        expect(Math.abs(an - fd)).toBeLessThan(1e-5 * Math.max(Math.abs(fd), 1e-6 * 6.1e9 / Math.max(Math.abs(p[k]), 1e-2)));
      });
    }
  });
});

describe('failures are results with a message and no NaN', () => {
  it('three points', () => {
    const s = sweep('one_lobe');
    const r = fitTuningCurve(pointsOf(s).slice(0, 3));
    expect(r.success).toBe(false);
    expect(r.message).toMatch(/too few points: 3 given/);
    expect(allFinite(tuningResultToCalibrationJson(r))).toBeNull();
  });
  it('pure noise (no flux dependence)', () => {
    // deterministic pseudo-noise (LCG), 100 kHz scale around 6 GHz
    let seed = 12345;
    const rnd = () => ((seed = (seed * 1103515245 + 12345) % 2147483648) / 2147483648) - 0.5;
    const pts = Array.from({ length: 150 }, (_, i) => ({ bias: -1 + (2 * i) / 149, frHz: 6e9 + 3.46e5 * rnd() }));
    const r = fitTuningCurve(pts);
    expect(r.success).toBe(false);
    expect(r.message.length).toBeGreaterThan(10);
    expect(allFinite(tuningResultToCalibrationJson(r))).toBeNull();
  });
  it('constant frequency', () => {
    const r = fitTuningCurve(Array.from({ length: 20 }, (_, i) => ({ bias: i, frHz: 5e9 })));
    expect(r.success).toBe(false);
    expect(r.message).toMatch(/all resonance frequencies are equal/);
  });
  it.each([
    [{ bias: NaN, frHz: 5e9 }, /point 1: bias must be a finite number/],
    [{ bias: 0.3, frHz: -5e9 }, /point 1: frHz must be positive/],
    [{ bias: 0.3, frHz: 5e9, sigmaHz: 0 }, /point 1: sigmaHz must be positive/],
  ])('bad point %p throws a TuningInputError naming it', (bad, msg) => {
    const pts = [{ bias: 0, frHz: 5e9 }, bad as { bias: number; frHz: number }, { bias: 0.5, frHz: 4.9e9 }];
    expect(() => fitTuningCurve(pts)).toThrow(TuningInputError);
    expect(() => fitTuningCurve(pts)).toThrow(msg);
  });
});

describe('CalibrationJson builder', () => {
  it('has the contract keys, consistent statistics and outliers', () => {
    const r = fitOf('spurious_points');
    const rows = r.points.map((_, i) => i + 2); // header = row 1
    const j = tuningResultToCalibrationJson(r, { rows, source: 'sweep.csv' });
    expect(j.schema).toBe('fluxwright.calibration/1');
    expect(j.kind).toBe('tuning_points');
    expect(j.model).toBe('exact');
    expect(Object.keys(j.params).sort()).toEqual(['asymmetry', 'f0_hz', 'flux_offset', 'flux_period', 'gamma0']);
    expect(j.params.f0_hz?.vary).toBe(true);
    expect(j.covariance?.names).toEqual(['f0_hz', 'gamma0', 'asymmetry', 'flux_period', 'flux_offset']);
    expect(j.correlation?.matrix[0][0]).toBeCloseTo(1, 12);
    // stderr² is the covariance diagonal
    const cov = j.covariance?.matrix as number[][];
    expect(Math.sqrt(cov[0][0])).toBeCloseTo(j.params.f0_hz?.stderr as number, 6);
    expect(j.ndata).toBe(200);
    expect(j.nvarys).toBe(5);
    expect(j.redchi).toBeCloseTo(j.chisqr / (200 - 5), 10);
    // lmfit's AIC definition
    expect(j.aic).toBeCloseTo(200 * Math.log(j.chisqr / 200) + 2 * 5, 8);
    expect(j.outliers).toEqual(sweep('spurious_points').spurious_indices);
    expect(j.points[j.outliers[0]].outlier).toBe(true);
    expect(j.points[5].row).toBe(7);
    expect(j.fixed).toEqual({ z0_ohm: null, loop_inductance_h: null, cs_over_cr: 0 });
    expect(j.source).toBe('sweep.csv');
    expect(allFinite(j)).toBeNull();
    expect(JSON.parse(JSON.stringify(j))).toEqual(j);
  });
});

describe('model comparison (AIC/BIC)', () => {
  it('asymmetric truth, 100 kHz noise: exact asymmetric wins; approx and symmetric are rejected (ΔAIC > 10, common practice)', () => {
    const rows = compareTuningModels(pointsOf(sweep('three_periods_noisy')));
    const best = rows.find((r) => r.delta_aic === 0);
    expect(best).toMatchObject({ model: 'exact', symmetric: false });
    for (const r of rows) if (r !== best) expect(r.delta_aic).toBeGreaterThan(10);
  });
  it('symmetric truth: BIC prefers the symmetric exact model', () => {
    const rows = compareTuningModels(pointsOf(sweep('symmetric')));
    const sym = rows.find((r) => r.model === 'exact' && r.symmetric);
    const asym = rows.find((r) => r.model === 'exact' && !r.symmetric);
    expect(sym?.bic as number).toBeLessThan(asym?.bic as number);
    expect(sym?.delta_bic).toBe(0);
  });
});
