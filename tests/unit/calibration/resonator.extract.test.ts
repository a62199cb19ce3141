/**
 * Per-trace resonance extraction (calibration/resonator/extract.ts).
 *
 * Fixtures: tests/fixtures/resonator/make_resonator_fixtures.py (numpy, fixed seeds) synthesises
 * notch S21 and reflection S11 from the forms of Probst et al., Rev. Sci. Instrum. 86, 024706
 * (2015), with Q_c = |Q_c|e^{−iφ} and 1/Q_i = 1/Q_l − cos φ/|Q_c| of Khalil et al., J. Appl. Phys.
 * 111, 054510 (2012); it also stores an independent maximum-likelihood fit of each trace by
 * scipy.optimize.least_squares with covariance inv(JᵀJ)·s².
 * Tolerances against the truth are those of the issue: noisy data f_r within a tenth of a linewidth
 * (f_r/Q_l/10) and Q_l within 5 %; clean data f_r to 1e-6 relative and Q to 1e-4.
 */
import fixture from '../../fixtures/resonator/resonator_traces.json';
import { extractResonance, extractSweep, traceToJson, type TraceExtraction } from '@/calibration/resonator/extract';
import { notchResponse } from '@/calibration/resonator/models';

interface RefFit {
  fr: number; ql: number; qc: number; phi?: number; qi: number | null; a: number; alpha: number; tau: number;
  stderr: Record<string, number>;
}
interface FixtureTrace {
  name: string;
  geometry: 'notch' | 'reflection';
  kind: 'clean' | 'noisy' | 'failure';
  expected_flag: null | 'no_resonance' | 'low_snr' | 'fit_failed';
  truth: { fr: number; ql: number; qc: number | null; phi: number; a: number; alpha: number; tau: number; qi: number | null };
  snr: number | null;
  sigma: number;
  f_start: number;
  f_stop: number;
  n: number;
  re: number[];
  im: number[];
  reference_fit?: RefFit;
}
const traces = (fixture as unknown as { traces: FixtureTrace[] }).traces;
const byName = (name: string) => traces.find((t) => t.name === name) as FixtureTrace;
// numpy.linspace(f_start, f_stop, n), as recorded in the fixture.
const grid = (t: FixtureTrace) => Array.from({ length: t.n }, (_, i) => t.f_start + (i * (t.f_stop - t.f_start)) / (t.n - 1));
const extract = (t: FixtureTrace, extra: Partial<Parameters<typeof extractResonance>[3]> = {}) =>
  extractResonance(grid(t), t.re, t.im, { geometry: t.geometry, ...extra });
const rel = (x: number | null, y: number) => Math.abs((x as number) - y) / Math.abs(y);
const angleDiff = (x: number, y: number) => Math.abs(Math.atan2(Math.sin(x - y), Math.cos(x - y)));

const results = new Map<string, TraceExtraction>();
const get = (t: FixtureTrace) => {
  if (!results.has(t.name)) results.set(t.name, extract(t));
  return results.get(t.name) as TraceExtraction;
};

describe('clean traces: truth recovered (Probst et al. 2015 procedure; issue tolerances 1e-6 f_r, 1e-4 Q)', () => {
  const clean = traces.filter((t) => t.kind === 'clean');
  it.each(clean.map((t) => [t.name, t] as const))('%s', (_n, t) => {
    const e = get(t);
    const tr = t.truth;
    expect(e.flag).toBeNull();
    expect(rel(e.frHz, tr.fr)).toBeLessThan(1e-6);
    expect(rel(e.ql, tr.ql)).toBeLessThan(1e-4);
    expect(rel(e.qcAbs, tr.qc as number)).toBeLessThan(1e-4);
    // 1/Q_i = 1/Q_l − cos φ/|Q_c| (Khalil et al. 2012) or 1/Q_l − 1/Q_c (reflection).
    expect(rel(e.qi, tr.qi as number)).toBeLessThan(1e-4);
    if (t.geometry === 'notch') expect(angleDiff(e.phiRad as number, tr.phi)).toBeLessThan(1e-5);
    // Environment: a, α (absolute-frequency convention of the model), τ.
    expect(rel(e.a, tr.a)).toBeLessThan(1e-5);
    expect(rel(e.delayS, tr.tau)).toBeLessThan(1e-5);
    expect(angleDiff(e.alphaRad as number, tr.alpha)).toBeLessThan(1e-3);
    // Circle of the result: radius a·Q_l/(2|Q_c|) (notch) or a·Q_l/Q_c (reflection).
    const r = t.geometry === 'notch' ? (tr.a * tr.ql) / (2 * (tr.qc as number)) : (tr.a * tr.ql) / (tr.qc as number);
    expect(rel(e.circle!.r, r)).toBeLessThan(1e-5);
  });
});

describe('noisy traces: truth within the issue tolerances, and agreement with scipy least_squares', () => {
  const noisy = traces.filter((t) => t.kind === 'noisy');
  it.each(noisy.map((t) => [`${t.name} (SNR ${t.snr})`, t] as const))('%s', (_n, t) => {
    const e = get(t);
    const tr = t.truth;
    const ref = t.reference_fit as RefFit;
    expect(e.flag).toBeNull();
    // Issue tolerances against the truth.
    expect(Math.abs((e.frHz as number) - tr.fr)).toBeLessThan(tr.fr / tr.ql / 10);
    expect(rel(e.ql, tr.ql)).toBeLessThan(0.05);
    expect(rel(e.qcAbs, tr.qc as number)).toBeLessThan(0.05);
    // Q_i only where it is well conditioned (scipy's relative stderr below 3 %).
    if (ref.qi !== null && ref.stderr.qi / ref.qi < 0.03) expect(rel(e.qi, tr.qi as number)).toBeLessThan(0.05);
    // Same maximum-likelihood point as scipy (within 1 % of a standard error) ...
    for (const [mine, theirs, se] of [
      [e.frHz, ref.fr, ref.stderr.fr],
      [e.ql, ref.ql, ref.stderr.ql],
      [e.qcAbs, ref.qc, ref.stderr.qc],
    ] as const) {
      expect(Math.abs((mine as number) - theirs)).toBeLessThan(0.01 * se);
    }
    if (t.geometry === 'notch') expect(Math.abs((e.phiRad as number) - (ref.phi as number))).toBeLessThan(0.01 * ref.stderr.phi);
    // ... and the same standard errors (covariance inv(JᵀJ)·χ²/(2N − p)) within 2 %.
    expect(rel(e.frStderrHz, ref.stderr.fr)).toBeLessThan(0.02);
    expect(rel(e.qlStderr, ref.stderr.ql)).toBeLessThan(0.02);
    expect(rel(e.qcStderr, ref.stderr.qc)).toBeLessThan(0.02);
    if (ref.qi !== null) {
      expect(rel(e.qi, ref.qi)).toBeLessThan(0.01 * ref.stderr.qi / ref.qi);
      // Q_i stderr by first-order propagation through the covariance, as the script does.
      expect(rel(e.qiStderr, ref.stderr.qi)).toBeLessThan(0.02);
    }
    // SNR = diameter / complex noise rms; the fixture sets the noise from the target SNR.
    expect(rel(e.snr, t.snr as number)).toBeLessThan(0.1);
    // Noise rms from the residuals vs the generator's σ (complex rms = √2 σ).
    expect(rel(e.noiseRms, Math.SQRT2 * t.sigma)).toBeLessThan(0.06);
    expect(rel(e.noiseRmsOffResonance, Math.SQRT2 * t.sigma)).toBeLessThan(0.15);
  });
});

describe('special windows', () => {
  it('narrow resonance in a wide window: algebraic steps run on a crop around it', () => {
    const t = byName('notch_noisy_wide_window');
    const e = get(t);
    const [lo, hi] = e.initial!.window;
    expect(hi - lo).toBeLessThan(t.n / 4);
    const f = grid(t);
    expect(f[lo]).toBeLessThan(t.truth.fr);
    expect(f[hi - 1]).toBeGreaterThan(t.truth.fr);
  });
  it('resonance near the window edge: delay from the clean wing, full window used', () => {
    const e = get(byName('refl_noisy_near_edge'));
    expect(e.initial!.window).toEqual([0, 1001]);
    expect(e.flag).toBeNull();
  });
});

describe('flags: each failure fixture triggers its flag with a reason', () => {
  it('pure background + noise → no_resonance (χ² improvement below threshold), values null', () => {
    const e = get(byName('fail_no_resonance'));
    expect(e.flag).toBe('no_resonance');
    expect(e.reason).toMatch(/no resonance in the window/);
    expect(e.frHz).toBeNull();
    expect(e.ql).toBeNull();
    expect(e.qi).toBeNull();
  });
  it('very low SNR (diameter 1.5 × noise rms) → low_snr; values kept (resonance detected)', () => {
    const t = byName('fail_low_snr');
    const e = get(t);
    expect(e.flag).toBe('low_snr');
    expect(e.reason).toMatch(/SNR too low: circle diameter \/ noise rms = 1\.\d+ \(need ≥ 4\)/);
    // Threshold 4 is common practice (3–5); the detected resonance is still near the truth.
    expect(Math.abs((e.frHz as number) - t.truth.fr)).toBeLessThan(t.truth.fr / t.truth.ql / 5);
    // A looser threshold accepts the same trace.
    expect(extract(t, { minSnr: 1 }).flag).toBeNull();
  });
  it('resonance outside the window → no_resonance naming the fitted f_r and the window', () => {
    const e = get(byName('fail_outside_window'));
    expect(e.flag).toBe('no_resonance');
    expect(e.reason).toMatch(/outside|linewidth not resolved/);
    expect(e.frHz).toBeNull();
  });
  it('refinement capped at 1 iteration → fit_failed with the engine message', () => {
    const e = extract(byName('notch_noisy_snr8_under'), { maxIterations: 1 });
    expect(e.flag).toBe('fit_failed');
    expect(e.reason).toMatch(/fit failed: complex refinement did not converge \(not converged: maximum number of iterations/);
    expect(e.frHz).toBeNull();
  });
  it('window narrower than two linewidths → no_resonance (linewidth not resolved)', () => {
    // Clean notch sampled over 1.2 linewidths (Q_l·span/f_r = 1.2 < 2, common practice).
    const fr = 5e9, ql = 1e4;
    const f = Array.from({ length: 401 }, (_, i) => fr - 0.6 * fr / ql + (i * 1.2 * fr) / ql / 400);
    const z = notchResponse(f, { a: 1, alphaRad: 0, delayS: 0, frHz: fr, ql, qcAbs: 2e4, phiRad: 0 });
    const e = extractResonance(f, z.re, z.im, { geometry: 'notch', delayS: 0 });
    expect(e.flag).toBe('no_resonance');
    expect(e.reason).toMatch(/linewidth not resolved: .* only 1\.2\d linewidths/);
  });
});

describe('options and input checks', () => {
  it('known cable delay is used as given and held fixed', () => {
    const t = byName('notch_noisy_snr20_phi_neg');
    const e = extract(t, { delayS: t.truth.tau });
    expect(e.delayS).toBe(t.truth.tau);
    expect(e.fit!.params.tau.vary).toBe(false);
    expect(Math.abs((e.frHz as number) - t.truth.fr)).toBeLessThan(t.truth.fr / t.truth.ql / 10);
    expect(rel(e.ql, t.truth.ql)).toBeLessThan(0.05);
  });
  it('data in the e^{−iωt} convention (conjugated) are detected and fitted as their conjugate', () => {
    // Conjugating S flips the circle's sense of rotation; conjugating back restores the VNA form
    // of Probst et al. (2015), so the result must equal that of the original trace.
    for (const name of ['notch_noisy_snr20_phi_neg', 'refl_noisy_snr15_over']) {
      const t = byName(name);
      const e0 = get(t);
      const e = extractResonance(grid(t), t.re, t.im.map((v) => -v), { geometry: t.geometry });
      expect(e0.conjugated).toBe(false);
      expect(e.conjugated).toBe(true);
      expect(e.flag).toBeNull();
      expect(e.reason).toMatch(/conjugated/);
      expect(rel(e.frHz, e0.frHz as number)).toBeLessThan(1e-12);
      expect(rel(e.ql, e0.ql as number)).toBeLessThan(1e-9);
      expect(rel(e.qcAbs, e0.qcAbs as number)).toBeLessThan(1e-9);
    }
  });
  it('non-uniform frequency grid (no recurrence shortcut) recovers a clean notch', () => {
    // notchResponse is checked against numpy in resonator.models.test.ts; truth is its input.
    const truth = { a: 0.8, alphaRad: -0.6, delayS: 64e-9, frHz: 6.02e9, ql: 1.5e4, qcAbs: 2.2e4, phiRad: 0.15 };
    const lw = truth.frHz / truth.ql;
    const f = Array.from({ length: 800 }, (_, i) => truth.frHz - 4 * lw + 9 * lw * (i / 799) ** 1.3);
    const z = notchResponse(f, truth);
    const e = extractResonance(f, z.re, z.im, { geometry: 'notch' });
    expect(e.flag).toBeNull();
    expect(rel(e.frHz, truth.frHz)).toBeLessThan(1e-9);
    expect(rel(e.ql, truth.ql)).toBeLessThan(1e-6);
    expect(rel(e.qcAbs, truth.qcAbs)).toBeLessThan(1e-6);
    expect(angleDiff(e.phiRad as number, truth.phiRad)).toBeLessThan(1e-6);
    expect(rel(e.delayS, truth.delayS)).toBeLessThan(1e-6);
  });
  it('bad input throws naming what and where', () => {
    const t = byName('notch_clean_under');
    const f = grid(t);
    const re = t.re.slice();
    re[17] = NaN;
    expect(() => extractResonance(f, re, t.im, { geometry: 'notch' })).toThrow('re[17] = NaN is not a finite number');
    const f2 = f.slice();
    f2[40] = f2[39];
    expect(() => extractResonance(f2, t.re, t.im, { geometry: 'notch' })).toThrow(/frequencies must increase strictly; freqHz\[40\]/);
    expect(() => extractResonance(f.slice(0, 10), t.re.slice(0, 10), t.im.slice(0, 10), { geometry: 'notch' })).toThrow(/at least 20 points/);
    expect(() => extractResonance(f, t.re, t.im.slice(1), { geometry: 'notch' })).toThrow(/equal lengths/);
  });
});

describe('traceToJson and extractSweep', () => {
  it('every numeric field is finite or null, flags and reasons carried (contract.ts TraceJson)', () => {
    for (const t of traces) {
      const j = traceToJson(1.5, get(t), [2, 1002], 'sweep.csv');
      for (const [k, v] of Object.entries(j)) {
        if (typeof v === 'number') expect(Number.isFinite(v)).toBe(true);
        else if (k !== 'rows') expect(v === null || typeof v === 'string').toBe(true);
      }
      expect(j.flag).toBe(t.expected_flag);
      expect(j.rows).toEqual([2, 1002]);
      if (t.geometry === 'reflection') expect(j.phi_rad).toBeNull();
      if (j.flag !== null) expect(typeof j.reason).toBe('string');
    }
  });
  it('sweep of the notch fixtures: one TraceJson per trace and a flag summary', () => {
    const notch = traces.filter((t) => t.geometry === 'notch');
    const out = extractSweep(
      notch.map((t, k) => ({ bias: k * 0.1, freqHz: grid(t), re: t.re, im: t.im, rows: [2 + k * 1001, 1001 + k * 1001] as [number, number], file: 'sweep.csv' })),
      { geometry: 'notch' },
    );
    expect(out.traces).toHaveLength(notch.length);
    expect(out.traces.map((j) => j.flag)).toEqual(notch.map((t) => t.expected_flag));
    const expected = (flag: string) => notch.filter((t) => t.expected_flag === flag).length;
    expect(out.summary.noResonance).toBe(expected('no_resonance'));
    expect(out.summary.lowSnr).toBe(expected('low_snr'));
    expect(out.summary.good).toBe(notch.filter((t) => t.expected_flag === null).length);
    expect(out.summary.flagged).toHaveLength(notch.length - out.summary.good);
    expect(out.summary.flagged[0]).toMatch(/^bias [\d.]+ \(file sweep\.csv, rows \d+–\d+\): /);
  });
  it('bad input inside a sweep names the trace, file and rows', () => {
    const t = byName('notch_clean_under');
    const im = t.im.slice();
    im[3] = Infinity;
    expect(() => extractSweep([{ bias: 0.25, freqHz: grid(t), re: t.re, im, rows: [5, 1005], file: 'a.csv' }], { geometry: 'notch' }))
      .toThrow('trace 1 of 1 (bias 0.25, file a.csv, rows 5–1005): resonator: im[3] = Infinity is not a finite number');
  });
});
