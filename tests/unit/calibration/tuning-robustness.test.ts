/**
 * Robustness of the tuning-curve fit on short partial-lobe sweeps (calibration/tuning/fitTuning.ts).
 * Fixture: tests/fixtures/tuning/tuning_robustness.json, written OFFLINE by
 * tests/fixtures/tuning/make_tuning_fixtures.py: exact-model roots by scipy.optimize.brentq (model form
 * Pogorzalek et al., Phys. Rev. Applied 8, 024012 (2017)), windows of 0.6-1.0 flux period anywhere on
 * the lobe, 12-40 points, d 0.02-0.3, γ0 0.01-0.08, both sweep directions and period signs, seeded
 * numpy noise with per-point σ 0.7-1.4 kHz (given to the fit). Each case carries a
 * scipy.optimize.least_squares fit started at the truth: the basin the fit must find on its own.
 * The table also holds the reported case (15 points over −0.45 … 0.45 mA, which used to stop at
 * d = 0 with χ²_red ≈ 2e5) and its −0.5 … 0.5 mA neighbour, and `phase_cases`: the same kind of
 * short sweeps for the phase-vs-flux fit (calibration/tuning/phaseFit.ts; model of Johansson et al.,
 * PRA 82, 052509 (2010)), wrapped into (−π, π], σ = 5 mrad given, neighbours < π/2 apart (not aliased).
 */
import fixture from '@/tests/fixtures/tuning/tuning_robustness.json';
import sweeps from '@/tests/fixtures/tuning/tuning_sweeps.json';
import { fitPhaseVsFlux, fitTuningCurve, TuningFitResult } from '@/calibration/tuning';

type Case = (typeof fixture.cases)[number];
const KEYS = ['f0_hz', 'gamma0', 'asymmetry', 'flux_period', 'flux_offset'] as const;
const fits = new Map<string, TuningFitResult>();
const fitOf = (c: Case) => {
  if (!fits.has(c.name)) {
    const pts = c.bias.map((b, i) => ({ bias: b, frHz: c.fr_hz[i], sigmaHz: c.sigma_hz[i] }));
    fits.set(c.name, fitTuningCurve(pts, { biasUnit: c.bias_unit }));
  }
  return fits.get(c.name) as TuningFitResult;
};

describe('short partial-lobe sweeps (0.6-1.0 period, 12-40 points): fixture table', () => {
  it('covers the ranges it claims', () => {
    const cov = fixture.cases.map((c) => c.coverage_phi0);
    const ns = fixture.cases.map((c) => c.bias.length);
    expect(Math.min(...cov)).toBeGreaterThanOrEqual(0.6);
    expect(Math.max(...cov)).toBeLessThanOrEqual(1.0);
    expect(Math.min(...ns)).toBeGreaterThanOrEqual(12);
    expect(Math.max(...ns)).toBeLessThanOrEqual(40);
    expect(new Set(fixture.cases.map((c) => c.truth.asymmetry)).size).toBeGreaterThanOrEqual(6);
    expect(fixture.cases.some((c) => c.decreasing_bias)).toBe(true);
    expect(fixture.cases.some((c) => c.truth.flux_period < 0)).toBe(true);
  });

  it.each(fixture.cases.map((c) => [c.name, c]))('%s', (_name, c) => {
    const r = fitOf(c);
    const ref = c.reference_fit;
    expect(r.success).toBe(true);
    const fit = r.fit;
    if (!fit) throw new Error('no fit');
    // χ²_red < 3 with the given σ (the generator keeps χ²_red at the truth ≤ 2)
    expect(fit.redchi).toBeLessThan(3);
    expect(r.warnings.join('\n')).not.toMatch(/χ²_red/);
    // the same basin as scipy from the truth: χ² within 3 % (soft_l1 optimum vs least squares)
    expect(fit.chisqr).toBeLessThan(1.03 * ref.chisqr);
    expect(r.outliers).toEqual([]);
    for (const k of KEYS) {
      const p = r.params[k];
      // same optimum as scipy to a fraction of its standard error
      expect(Math.abs(p.value - ref.values[k]) / ref.stderr[k]).toBeLessThan(1);
      // truth within 4 reported standard errors (the data constrain every parameter here)
      const truth = k === 'flux_period' ? Math.abs(c.truth[k]) : c.truth[k];
      expect(p.stderr).not.toBeNull();
      expect(Math.abs(p.value - truth) / (p.stderr as number)).toBeLessThan(4);
    }
  });
});

describe('short partial-lobe phase-vs-flux sweeps: fixture table', () => {
  it.each(fixture.phase_cases.map((c) => [c.name, c]))('%s', (_name, c) => {
    const pts = c.bias.map((b, i) => ({ bias: b, phaseRad: c.phase_rad[i], sigmaRad: c.sigma_rad }));
    const r = fitPhaseVsFlux(pts, { probeFrequencyHz: c.probe_frequency_hz, biasUnit: c.bias_unit });
    expect(r.success).toBe(true);
    const fit = r.fit;
    if (!fit) throw new Error('no fit');
    expect(fit.redchi).toBeLessThan(3);
    expect(fit.chisqr).toBeLessThan(1.03 * c.reference_fit.chisqr);
    expect(r.outliers).toEqual([]);
    for (const k of ['tau_eff0_s', 'asymmetry', 'flux_period', 'flux_offset'] as const) {
      const p = r.params[k];
      const truth = k === 'flux_period' ? Math.abs(c.truth[k]) : c.truth[k];
      // d may end on its bound 0 when the window hardly reaches the lobe edge (no stderr then)
      if (p.stderr === null) {
        expect(k).toBe('asymmetry');
        expect(p.value).toBe(0);
        expect(truth).toBeLessThanOrEqual(0.05);
      } else {
        expect(Math.abs(p.value - truth) / p.stderr).toBeLessThan(4);
      }
    }
  });
});

describe('χ²_red with given σ is reported, never silent', () => {
  // three_periods_noisy: 100 kHz Gaussian noise (fixture generator), so σ = 100 kHz is right,
  // 30 kHz is 3.3× too small (χ²_red ≈ 11) and 1 kHz is 100× too small (χ²_red ≈ 1e4).
  const s = sweeps.sweeps.find((x) => x.name === 'three_periods_noisy');
  if (!s) throw new Error('fixture three_periods_noisy missing');
  const withSigma = (sigma: number) => fitTuningCurve(s.bias.map((b, i) => ({ bias: b, frHz: s.fr_hz[i], sigmaHz: sigma })));
  it('no warning with the right σ', () => {
    const r = withSigma(1e5);
    expect(r.fit?.redchi as number).toBeLessThan(1.5);
    expect(r.warnings.join('\n')).not.toMatch(/χ²_red/);
  });
  it('σ 3.3× too small: scatter warning with the factor', () => {
    const r = withSigma(3e4);
    expect(r.fit?.redchi as number).toBeGreaterThan(5);
    const w = r.warnings.find((x) => x.startsWith('χ²_red'));
    expect(w).toMatch(/scatter is about 3\.\d× the stated uncertainty/);
  });
  it('σ 100× too small: χ²_red ≫ 100 gives the do-not-use warning', () => {
    const r = withSigma(1e3);
    expect(r.fit?.redchi as number).toBeGreaterThan(100);
    expect(r.warnings.join('\n')).toMatch(/χ²_red = .* do not use this calibration without checking the residuals/);
  });
  it('estimated σ: no χ²_red warning (χ²_red ≈ 1 by construction)', () => {
    const r = fitTuningCurve(s.bias.map((b, i) => ({ bias: b, frHz: s.fr_hz[i] })));
    expect(r.derived.sigma_source).toBe('estimated');
    expect(Math.abs((r.fit?.redchi as number) - 1)).toBeLessThan(0.3);
    expect(r.warnings.join('\n')).not.toMatch(/χ²_red/);
  });
});
