/**
 * Resonance models and the algebraic circle fit.
 * References: Probst et al., Rev. Sci. Instrum. 86, 024706 (2015) (notch/reflection forms, Pratt
 * circle fit); Khalil et al., J. Appl. Phys. 111, 054510 (2012) (complex Q_c, 1/Q_i formula);
 * numpy/scipy values written by tests/fixtures/resonator/make_resonator_fixtures.py.
 */
import fixture from '../../fixtures/resonator/resonator_traces.json';
import { fitCirclePratt } from '@/calibration/resonator/circle';
import {
  internalQNotch,
  internalQReflection,
  notchResponse,
  reflectionResponse,
} from '@/calibration/resonator/models';

interface FixtureTrace {
  name: string;
  geometry: 'notch' | 'reflection';
  kind: string;
  truth: { fr: number; ql: number; qc: number | null; phi: number; a: number; alpha: number; tau: number; qi: number | null };
  sigma: number;
  f_start: number;
  f_stop: number;
  n: number;
  re: number[];
  im: number[];
}
const traces = (fixture as unknown as { traces: FixtureTrace[] }).traces;
const grid = (t: FixtureTrace) => Array.from({ length: t.n }, (_, i) => t.f_start + (i * (t.f_stop - t.f_start)) / (t.n - 1));

describe('notchResponse / reflectionResponse against numpy (clean fixtures, 7-digit rounding)', () => {
  const clean = traces.filter((t) => t.kind === 'clean');
  it.each(clean.map((t) => [t.name, t] as const))('%s', (_name, t) => {
    const f = grid(t);
    const p = t.truth;
    const z = t.geometry === 'notch'
      ? notchResponse(f, { a: p.a, alphaRad: p.alpha, delayS: p.tau, frHz: p.fr, ql: p.ql, qcAbs: p.qc as number, phiRad: p.phi })
      : reflectionResponse(f, { a: p.a, alphaRad: p.alpha, delayS: p.tau, frHz: p.fr, ql: p.ql, qc: p.qc as number });
    let worst = 0;
    for (let i = 0; i < t.n; i++) worst = Math.max(worst, Math.hypot(z.re[i] - t.re[i], z.im[i] - t.im[i]));
    // numpy values rounded to 7 significant digits: |Δ| ≤ ~1e-6·|S| ≤ 2e-6·a.
    expect(worst).toBeLessThan(2e-6 * p.a);
  });
});

describe('model values at resonance (Probst et al. 2015, closed form)', () => {
  const env = { a: 0.7, alphaRad: 0.4, delayS: 55e-9 };
  const fr = 5.4321e9;
  const rot = (x: number, y: number, ph: number) => [x * Math.cos(ph) - y * Math.sin(ph), x * Math.sin(ph) + y * Math.cos(ph)];
  const ph = env.alphaRad - 2 * Math.PI * fr * env.delayS;
  it('notch: S21(f_r) = a e^{iα} e^{−2πif_rτ} (1 − (Q_l/|Q_c|) e^{iφ})', () => {
    const ql = 1e4, qc = 1.6e4, phi = 0.25;
    const z = notchResponse([fr], { ...env, frHz: fr, ql, qcAbs: qc, phiRad: phi });
    const [xr, xi] = rot(1 - (ql / qc) * Math.cos(phi), -(ql / qc) * Math.sin(phi), ph);
    expect(z.re[0]).toBeCloseTo(env.a * xr, 12);
    expect(z.im[0]).toBeCloseTo(env.a * xi, 12);
  });
  it('reflection: S11(f_r) = a e^{iα} e^{−2πif_rτ} (1 − 2Q_l/Q_c); over-coupled → phase flips', () => {
    const ql = 1e4, qc = 1.2e4;
    const z = reflectionResponse([fr], { ...env, frHz: fr, ql, qc });
    const [xr, xi] = rot(1 - (2 * ql) / qc, 0, ph);
    expect(z.re[0]).toBeCloseTo(env.a * xr, 12);
    expect(z.im[0]).toBeCloseTo(env.a * xi, 12);
  });
  it('half a linewidth off resonance the notch term has |1/(1+2iQ_l x)| = 1/√2', () => {
    const ql = 2e4, qc = 2e4;
    // With Q_l/|Q_c| = 1 and φ = 0, |S21/a| = |1 − 1/(1+i)| = |i/(1+i)| = 1/√2 at f = f_r(1 + 1/(2Q_l)).
    const z = notchResponse([fr * (1 + 1 / (2 * ql))], { ...env, frHz: fr, ql, qcAbs: qc, phiRad: 0 });
    expect(Math.hypot(z.re[0], z.im[0]) / env.a).toBeCloseTo(Math.SQRT1_2, 10);
  });
  it('Q_i formulas: notch 1/Q_i = 1/Q_l − cos φ/|Q_c| (Khalil 2012), reflection 1/Q_i = 1/Q_l − 1/Q_c', () => {
    expect(internalQNotch(1e4, 3e4, 0)).toBeCloseTo(1.5e4, 6);
    expect(internalQNotch(5e4, 6e4, 0.3)).toBeCloseTo(1 / (1 / 5e4 - Math.cos(0.3) / 6e4), 6);
    expect(internalQReflection(1e4, 1.2e4)).toBeCloseTo(6e4, 6);
    // Unphysical combination (Q_l > Q_c in reflection) → null, never a negative or NaN Q_i.
    expect(internalQReflection(2e4, 1e4)).toBeNull();
  });
});

describe('Pratt circle fit against scipy generalised eigenproblem (Probst et al. 2015)', () => {
  const circles = (fixture as unknown as { circles: { x: number[]; y: number[]; truth: { xc: number; yc: number; r: number }; pratt: { xc: number; yc: number; r: number } }[] }).circles;
  it.each(circles.map((c, i) => [i, c] as const))('circle %i', (_i, c) => {
    const fit = fitCirclePratt(c.x, c.y);
    expect(fit).not.toBeNull();
    const s = c.pratt.r;
    // Same estimator, two solvers (Newton on the characteristic polynomial vs scipy.linalg.eig).
    expect(Math.abs(fit!.xc - c.pratt.xc) / s).toBeLessThan(1e-8);
    expect(Math.abs(fit!.yc - c.pratt.yc) / s).toBeLessThan(1e-8);
    expect(Math.abs(fit!.r - c.pratt.r) / s).toBeLessThan(1e-8);
  });
  it('recovers an exact circle and rejects degenerate input', () => {
    const t = Array.from({ length: 50 }, (_, i) => (i / 50) * 2);
    const x = t.map((v) => 3 + 0.5 * Math.cos(v));
    const y = t.map((v) => -2 + 0.5 * Math.sin(v));
    const fit = fitCirclePratt(x, y)!;
    expect(fit.xc).toBeCloseTo(3, 12);
    expect(fit.yc).toBeCloseTo(-2, 12);
    expect(fit.r).toBeCloseTo(0.5, 12);
    expect(fitCirclePratt([1, 1, 1, 1], [2, 2, 2, 2])).toBeNull();
    expect(fitCirclePratt([0, 1, 2, 3], [0, 1, 2, 3])).toBeNull();
  });
});
