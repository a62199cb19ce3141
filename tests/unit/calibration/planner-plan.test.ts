/**
 * Planner API: inverse problems, pump-frequency compensation, warnings, refusals, power chain,
 * uncertainty and ranking. Calibrations are hand-built input data (tests/fixtures/planner/hand-calibration.ts).
 * Sources beside each check: exact SQUID-line model (calibration/squid/model.ts) for the numerically
 * averaged resonance, transmission-line load current I_L = 2V⁺/(Z0 + Z_L) (Pozar, Microwave Engineering,
 * ch. 2 [from memory]), mathjs for matrix checks.
 */
import { det, multiply, transpose } from 'mathjs';
import {
  PlanError, planCavity, planFromCalibration, planLine, rankOperatingPoints, qualityFactorsAtBias, type PlanRequest,
} from '@/calibration/planner';
import { cholesky, factorCovariance, percentile } from '@/calibration/planner/stats';
import { incidentPowerForShortCurrent } from '@/calibration/planner/power';
import { resonanceFrequency, screeningParameter, criticalCurrentSum } from '@/calibration/squid/model';
import { FLUX_QUANTUM } from '@/calibration/constants';
import { phaseCalibration, tuningCalibration } from '@/tests/fixtures/planner/hand-calibration';

const rel = (a: number, b: number) => Math.abs(a - b) / Math.abs(b);
const cal = tuningCalibration();
const cav: PlanRequest = { mode: 'cavity', fluxPhi0: 0.3, targetPairRate: 1e5, ql: 5000, qc: 6000, uncertaintyDraws: 0 };
const lineReq: PlanRequest = { mode: 'line', fluxPhi0: 0.28, targetPairRate: 1e4, pumpFrequencyHz: 12e9, bandHz: 1e9, uncertaintyDraws: 0 };
const lineCal = phaseCalibration(2.4e-12, 0.02);
const codes = (r: { warnings: { code: string }[] }) => r.warnings.map((w) => w.code);

describe('round trip plan → rate → re-solve gives the same δΦ to 1e-9', () => {
  const cases: Array<[string, ReturnType<typeof tuningCalibration>, PlanRequest]> = [
    ['cavity closed form', cal, cav],
    ['cavity, detuned', cal, { ...cav, detuningHz: 2e5 }],
    ['cavity, thermal', cal, { ...cav, temperatureK: 0.08 }],
    ['cavity, detection band', cal, { ...cav, bandHz: 5e5 }],
    ['line, single tone', lineCal, lineReq],
    ['line, thermal 0.1 K', lineCal, { ...lineReq, temperatureK: 0.1 }],
    ['line, two-tone waveform', lineCal, { ...lineReq, waveform: [{ harmonic: 1, amplitudePhi0: 1 }, { harmonic: 2, amplitudePhi0: 0.3, phaseRad: 0.4 }] }],
  ];
  test.each(cases)('%s', (_n, c, req) => {
    const a = planFromCalibration(c, req);
    expect(rel(a.predicted_pair_rate, req.targetPairRate as number)).toBeLessThan(1e-9);
    const b = planFromCalibration(c, { ...req, targetPairRate: a.predicted_pair_rate });
    expect(rel(b.pump_amplitude_phi0, a.pump_amplitude_phi0)).toBeLessThan(1e-9);
  });

  test('cavity, pump frequency fixed by the user: Δ follows from the pump shift', () => {
    const chosen = planCavity(cal, cav);
    const fixed = chosen.pump_frequency_hz + 3e5; // detuned by −150 kHz from the compensated pump
    const a = planCavity(cal, { ...cav, pumpFrequencyHz: fixed });
    expect(rel(a.predicted_pair_rate, 1e5)).toBeLessThan(1e-9);
    expect(a.pump_frequency_hz).toBe(fixed);
    const expectedDetuning = (a.resonance_hz as number) + (a.pump_frequency_shift_hz as number) - fixed / 2;
    expect(Math.abs((a.detuning_hz as number) - expectedDetuning)).toBeLessThan(1e-6);
    const b = planCavity(cal, { ...cav, pumpFrequencyHz: fixed, targetPairRate: a.predicted_pair_rate });
    expect(rel(b.pump_amplitude_phi0, a.pump_amplitude_phi0)).toBeLessThan(1e-9);
  });

  test('fixed-pump threshold closed form equals a brute-force scan of slope·δΦ − δω_th(Δ(δΦ))', () => {
    const p = planCavity(cal, { ...cav, pumpFrequencyHz: planCavity(cal, cav).pump_frequency_hz + 2e6 });
    const s = 2 * Math.PI * Math.abs(p.slope_hz_per_phi0 as number);
    const kappa = 2 * Math.PI * (p.kappa_over_2pi_hz as number);
    const c = (2 * Math.PI * (p.curvature_hz_per_phi0_sq as number)) / 4;
    const d0 = 2 * Math.PI * ((p.resonance_hz as number) - p.pump_frequency_hz / 2);
    const h = (x: number) => (s * x) / 2 - Math.sqrt((d0 + c * x * x) ** 2 + (kappa * kappa) / 4);
    let x = 0;
    const step = 1e-8;
    while (h(x) < 0) x += step;
    expect(Math.abs((p.threshold_amplitude_phi0 as number) - x)).toBeLessThan(2 * step);
  });
  test('cavity, gain target: gain_db reproduces the target and re-solving gives the same δΦ', () => {
    const a = planCavity(cal, { ...cav, targetPairRate: undefined, targetGainDb: 15 });
    expect(a.gain_db as number).toBeCloseTo(15, 9);
    const b = planCavity(cal, { ...cav, targetPairRate: a.predicted_pair_rate });
    expect(rel(b.pump_amplitude_phi0, a.pump_amplitude_phi0)).toBeLessThan(1e-9);
  });

  test('cavity on resonance with κ_i = 0: target gain 13.17 dB needs δω/κ = 0.8 (PHYSICS.md worked number)', () => {
    const r = planCavity(cal, { ...cav, qc: 5000, targetPairRate: undefined, targetGainDb: 10 * Math.log10(20.753086419753) });
    expect(r.drive_ratio as number).toBeCloseTo(0.8, 6);
    expect(r.intracavity_photons as number).toBeCloseTo(0.8889, 4);
  });
});

describe('pump-frequency compensation', () => {
  test('¼·f″·δΦ² equals the numerically averaged exact resonance over one pump period', () => {
    const r = planCavity(cal, { ...cav, targetPairRate: 2e6, ql: 2000, qc: 2500 });
    const p = { f0Hz: 6.5e9, gamma0: 0.03, asymmetry: 0.1 };
    const n = 2048;
    let mean = 0;
    for (let i = 0; i < n; i++) mean += resonanceFrequency(0.3 + r.pump_amplitude_phi0 * Math.cos((2 * Math.PI * i) / n), p, 'exact');
    mean /= n;
    const shiftNumeric = mean - resonanceFrequency(0.3, p, 'exact');
    expect(rel(r.pump_frequency_shift_hz as number, shiftNumeric)).toBeLessThan(1e-3);
    expect(Math.abs(r.pump_frequency_hz - 2 * ((r.resonance_hz as number) + (r.pump_frequency_shift_hz as number)))).toBeLessThan(1e-3);
    expect(r.detuning_hz).toBe(0);
  });
});

describe('warnings: each has a case that triggers it', () => {
  test('near_threshold (δΦ/δΦ_th > 0.9)', () => {
    const r = planCavity(cal, { ...cav, qc: 5000, targetPairRate: undefined, targetGainDb: 30 });
    expect(r.threshold_ratio as number).toBeGreaterThan(0.9);
    expect(codes(r)).toContain('near_threshold');
    expect(codes(planCavity(cal, cav))).not.toContain('near_threshold');
  });
  test('beyond_linear_response (δΦ > 0.05 Φ0)', () => {
    const r = planLine(phaseCalibration(2.393e-12, 0), { ...lineReq, pumpFrequencyHz: 18.6e9, fluxPhi0: 0.2748, targetPairRate: 1e6 });
    expect(r.pump_amplitude_phi0).toBeGreaterThan(0.05);
    expect(codes(r)).toContain('beyond_linear_response');
  });
  test('near_lobe_edge (Φ_dc ± δΦ within 0.05 Φ0 of 0.5 Φ0)', () => {
    expect(codes(planCavity(cal, { ...cav, fluxPhi0: 0.47 }))).toContain('near_lobe_edge');
    expect(codes(planCavity(cal, { ...cav, fluxPhi0: -0.46 }))).toContain('near_lobe_edge');
    expect(codes(planCavity(cal, cav))).not.toContain('near_lobe_edge');
  });
  test('hysteretic_squid from derived β_L and from the loop inductance', () => {
    const a = planCavity(tuningCalibration({ derived: { beta_l: 0.8 } }), cav);
    expect(codes(a)).toContain('hysteretic_squid');
    const lLoop = 4e-10;
    const b = planCavity(tuningCalibration({ fixed: { z0_ohm: 50, loop_inductance_h: lLoop } }), cav);
    // β_L = 2 L I_c0/Φ0 with I_c0 = I_cΣ/2, I_cΣ = Φ0/(2π γ0 Z0/(4 f0)) (PHYSICS.md)
    const ic0 = FLUX_QUANTUM / (2 * Math.PI * 0.03 * (50 / (4 * 6.5e9))) / 2;
    expect(rel(b.beta_l as number, (2 * lLoop * ic0) / FLUX_QUANTUM)).toBeLessThan(1e-12);
    expect(rel(b.beta_l as number, screeningParameter(lLoop, criticalCurrentSum(0.03, 6.5e9, 50) / 2))).toBeLessThan(1e-12);
    expect(codes(b)).toContain('hysteretic_squid');
    expect(codes(planCavity(tuningCalibration({ fixed: { z0_ohm: 50, loop_inductance_h: 1e-11 } }), cav))).not.toContain('hysteretic_squid');
  });
  test('cold_stage_power, with the caution text', () => {
    const r = planCavity(cal, { ...cav, pumpPeriod: 1e-3, attenuationDb: [20, 10, 20], coldStageLimitW: 1e-16 });
    expect(codes(r)).toContain('cold_stage_power');
    expect(r.caution?.text).toContain("defer to the lab's own rules for cryostat and RF safety");
    expect(codes(planCavity(cal, { ...cav, pumpPeriod: 1e-3, attenuationDb: [20, 10, 20] }))).not.toContain('cold_stage_power');
  });
  test('thermal_occupation (n_th > 0.01)', () => {
    const r = planCavity(cal, { ...cav, temperatureK: 0.15 });
    // n_th = 1/(e^{hf/kT} − 1) at f ≈ 6.19 GHz, 150 mK
    const f = r.resonance_hz as number;
    expect(rel(r.n_thermal, 1 / Math.expm1((6.62607015e-34 * f) / (1.380649e-23 * 0.15)))).toBeLessThan(1e-12);
    expect(codes(r)).toContain('thermal_occupation');
    expect(codes(planCavity(cal, { ...cav, temperatureK: 0.02 }))).not.toContain('thermal_occupation');
  });
  test('thermal input raises the rate per δΦ by (2 n_th + 1)', () => {
    const cold = planCavity(cal, cav);
    const hot = planCavity(cal, { ...cav, temperatureK: 0.15 });
    const n = hot.n_thermal;
    // same target ⇒ N_vac smaller by 1/(2n+1)
    const nVac = (x: number) => x * x / (2 * (1 - x * x));
    expect(rel(nVac(hot.drive_ratio as number) * (2 * n + 1), nVac(cold.drive_ratio as number))).toBeLessThan(1e-9);
  });
  test('default_quality_factors and quality_factors_extrapolated', () => {
    const r = planCavity(cal, { ...cav, ql: undefined, qc: undefined });
    expect(r.q_source).toBe('default');
    expect(codes(r)).toContain('default_quality_factors');
    const traces = [
      { bias: 0.1, fr_hz: 6.2e9, ql: 4000, qc: 5000, qi: null, flag: null },
      { bias: 0.3, fr_hz: 6.1e9, ql: 6000, qc: 9000, qi: null, flag: null },
    ];
    const withTraces = tuningCalibration({ traces: traces as never });
    const e = planCavity(withTraces, { ...cav, ql: undefined, qc: undefined, fluxPhi0: undefined, bias: 0.4 });
    expect(e.q_source).toBe('traces');
    expect(codes(e)).toContain('quality_factors_extrapolated');
  });
  test('band_asymmetric (line band not centred on f_p/2)', () => {
    const r = planLine(lineCal, { ...lineReq, bandCentreHz: 5e9 });
    expect(codes(r)).toContain('band_asymmetric');
    expect(r.both_in_band_pair_rate as number).toBe(0); // [4.5, 5.5] GHz and its mirror [6.5, 7.5] GHz do not overlap
    expect(codes(planLine(lineCal, lineReq))).not.toContain('band_asymmetric');
    expect(rel(planLine(lineCal, lineReq).both_in_band_pair_rate as number, 1e4)).toBeLessThan(1e-9);
  });
  test('no_covariance', () => {
    const r = planCavity(tuningCalibration({ covariance: false }), { ...cav, uncertaintyDraws: 100 });
    expect(r.uncertainty).toBeNull();
    expect(codes(r)).toContain('no_covariance');
  });
});

describe('refusals and bad requests', () => {
  const refuse = (f: () => unknown, code: string, option?: string) => {
    try {
      f();
    } catch (e) {
      expect(e).toBeInstanceOf(PlanError);
      expect((e as PlanError).code).toBe(code);
      if (option) expect((e as PlanError).option).toBe(option);
      return (e as PlanError).message;
    }
    throw new Error('expected a PlanError');
  };
  test('target needing δω ≥ δω_th is refused with a clear message', () => {
    const msg = refuse(() => planCavity(cal, { ...cav, targetPairRate: 1e20 }), 'above_threshold', 'target-pair-rate');
    expect(msg).toMatch(/threshold/);
  });
  test('zero slope at the sweet spot', () => {
    refuse(() => planCavity(cal, { ...cav, fluxPhi0: 0 }), 'zero_slope', 'flux');
    refuse(() => planLine(lineCal, { ...lineReq, fluxPhi0: 0 }), 'zero_slope', 'flux');
  });
  test('cavity mode with a phase-versus-flux calibration', () => {
    refuse(() => planCavity(lineCal, cav), 'model_mismatch', 'mode');
  });
  test.each([
    [{ ...cav, bias: 0.2 }, 'flux'],
    [{ ...cav, targetGainDb: 10 }, 'target-pair-rate'],
    [{ ...cav, targetPairRate: -1 }, 'target-pair-rate'],
    [{ ...cav, targetPairRate: NaN }, 'target-pair-rate'],
    [{ ...cav, qc: 4000 }, 'qc'],
    [{ ...cav, targetPairRate: undefined, targetGainDb: -3 }, 'target-gain-db'],
    [{ ...lineReq, pumpFrequencyHz: undefined }, 'pump-frequency'],
    [{ ...lineReq, thresholdPowerDbm: -40 }, 'threshold-power-dbm'],
    [{ ...cav, temperatureK: -1 }, 'temperature'],
    [{ ...cav, attenuationDb: [10, -3] }, 'attenuation-db'],
  ] as Array<[PlanRequest, string]>)('bad request %# names option %s', (req, option) => {
    refuse(() => planFromCalibration(req.mode === 'line' ? lineCal : cal, req), 'bad_request', option);
  });
});

describe('quality factors from calibration traces', () => {
  test('linear interpolation in bias, flagged traces ignored', () => {
    const traces = [
      { bias: 0.0, fr_hz: 6.4e9, ql: 4000, qc: 5000, qi: null, flag: null },
      { bias: 0.2, fr_hz: 6.3e9, ql: 6000, qc: 9000, qi: null, flag: null },
      { bias: 0.25, fr_hz: null, ql: 100, qc: 100, qi: null, flag: 'fit_failed' },
      { bias: 0.4, fr_hz: 6.1e9, ql: 8000, qc: 12000, qi: null, flag: null },
    ] as never;
    const q = qualityFactorsAtBias(traces, 0.3);
    expect(q).toEqual({ ql: 7000, qc: 10500, extrapolated: false });
    const r = planCavity(tuningCalibration({ traces }), { ...cav, ql: undefined, qc: undefined, fluxPhi0: undefined, bias: 0.3 });
    expect(r.ql).toBeCloseTo(7000, 9);
    expect(r.qc).toBeCloseTo(10500, 9);
    expect(r.q_source).toBe('traces');
  });
});

describe('generator power', () => {
  test('standing-wave factor: P_inc = Z0·I²/8 matches I_L = 2V⁺/(Z0 + Z_L) for Z_L → 0 (Pozar [from memory])', () => {
    const z0 = 50;
    const vPlus = 1e-3; // peak
    const iLoad = (2 * vPlus) / (z0 + 1e-12);
    const pInc = (vPlus * vPlus) / (2 * z0);
    expect(rel(incidentPowerForShortCurrent(iLoad, z0), pInc)).toBeLessThan(1e-12);
  });
  test('pump-line period and attenuation chain', () => {
    const r = planCavity(cal, { ...cav, pumpPeriod: 2e-3, attenuationDb: [20, 20, 20] });
    const current = r.pump_amplitude_phi0 * 2e-3; // I_p = δΦ·Φ0/M_p, M_p = Φ0/period
    expect(rel(r.pump_current_a as number, current)).toBeLessThan(1e-12);
    expect(rel(r.power_at_chip_dbm as number, 10 * Math.log10((50 * current * current) / 8 / 1e-3))).toBeLessThan(1e-12);
    expect((r.generator_power_dbm as number) - (r.power_at_chip_dbm as number)).toBeCloseTo(60, 9);
    const diss = r.stage_dissipation as { dissipated_w: number }[];
    const pGen = 1e-3 * 10 ** ((r.generator_power_dbm as number) / 10);
    expect(rel(diss[0].dissipated_w, pGen * 0.99)).toBeLessThan(1e-12);
  });
  test('waveform: tone powers add (power-equivalent amplitude sqrt(Σ A_k²))', () => {
    const chain = { pumpPeriod: 1e-3, attenuationDb: [30, 30] };
    const r = planLine(lineCal, { ...lineReq, ...chain, waveform: [{ harmonic: 1, amplitudePhi0: 1 }, { harmonic: 3, amplitudePhi0: 0.5 }] });
    const i1 = r.pump_amplitude_phi0 * 1e-3;
    const i3 = 0.5 * i1;
    const pChip = incidentPowerForShortCurrent(i1, 50) + incidentPowerForShortCurrent(i3, 50);
    expect(rel(r.power_at_chip_dbm as number, 10 * Math.log10(pChip / 1e-3))).toBeLessThan(1e-12);
  });
  test('threshold anchor: P = P_th·(δΦ/δΦ_th)²', () => {
    const r = planCavity(cal, { ...cav, thresholdPowerDbm: -30 });
    expect(r.generator_power_dbm as number).toBeCloseTo(-30 + 20 * Math.log10(r.threshold_ratio as number), 9);
  });
});

describe('uncertainty (seeded sampling of the calibration covariance)', () => {
  test('hand-written Cholesky reconstructs the matrix (mathjs multiply, det)', () => {
    const a = [[4, 2, 0.4], [2, 3, 0.5], [0.4, 0.5, 2]];
    const l = cholesky(a) as number[][];
    const back = multiply(l, transpose(l)) as number[][];
    for (let i = 0; i < 3; i++) for (let j = 0; j < 3; j++) expect(back[i][j]).toBeCloseTo(a[i][j], 12);
    expect(rel((l[0][0] * l[1][1] * l[2][2]) ** 2, det(a) as number)).toBeLessThan(1e-12);
    expect(cholesky([[1, 2], [2, 1]])).toBeNull();
  });
  test('singular covariance falls back to jitter', () => {
    const f = factorCovariance([[1, 1], [1, 1]]);
    expect(f?.method).toBe('cholesky+jitter');
    expect(f?.jitter).toBeGreaterThan(0);
  });
  test('percentile matches numpy linear interpolation on a small sample', () => {
    // numpy 2.4.6 (run offline here): numpy.percentile([1, 2, 3, 4, 10], [16, 50, 84]) = [1.64, 3, 6.16]
    expect(percentile([1, 2, 3, 4, 10], 16)).toBeCloseTo(1.64, 12);
    expect(percentile([1, 2, 3, 4, 10], 50)).toBe(3);
    expect(percentile([1, 2, 3, 4, 10], 84)).toBeCloseTo(6.16, 12);
  });
  test.each([
    ['cavity', cal, cav],
    ['cavity by bias', cal, { ...cav, fluxPhi0: undefined, bias: 0.35 }],
    ['line', lineCal, lineReq],
  ] as Array<[string, ReturnType<typeof tuningCalibration>, PlanRequest]>)('%s: 16/84 % bracket the nominal and shrink with a smaller covariance', (_n, c, req) => {
    const wide = planFromCalibration(c, { ...req, uncertaintyDraws: 1000 });
    const u = wide.uncertainty!;
    expect(u.draws).toBe(1000);
    expect(u.pair_rate_p16).toBeLessThan(wide.predicted_pair_rate);
    expect(u.pair_rate_p84).toBeGreaterThan(wide.predicted_pair_rate);
    if (req.mode === 'cavity') {
      expect(u.threshold_amplitude_p16_phi0 as number).toBeLessThan(wide.threshold_amplitude_phi0 as number);
      expect(u.threshold_amplitude_p84_phi0 as number).toBeGreaterThan(wide.threshold_amplitude_phi0 as number);
    }
    const narrowCal = req.mode === 'line' ? phaseCalibration(2.4e-12, 0.02, 1e-4) : tuningCalibration({ relErr: 1e-4 });
    const narrow = planFromCalibration(narrowCal, { ...req, uncertaintyDraws: 1000 }).uncertainty!;
    expect(narrow.pair_rate_p84 - narrow.pair_rate_p16).toBeLessThan(0.3 * (u.pair_rate_p84 - u.pair_rate_p16));
  });
  test('reproducible for a seed, different for another', () => {
    const a = planCavity(cal, { ...cav, uncertaintyDraws: 1000, seed: 7 }).uncertainty!;
    const b = planCavity(cal, { ...cav, uncertaintyDraws: 1000, seed: 7 }).uncertainty!;
    const c = planCavity(cal, { ...cav, uncertaintyDraws: 1000, seed: 8 }).uncertainty!;
    expect(b).toEqual(a);
    expect(c.pair_rate_p50).not.toBe(a.pair_rate_p50);
  });
});

describe('operating-point ranking', () => {
  test('scans ≥ 200 biases, scores are ordered, the best few carry reasons and uncertainty', () => {
    const r = rankOperatingPoints(cal, { ...cav, fluxPhi0: undefined, uncertaintyDraws: 1000 }, { top: 5 });
    expect(r.scanned).toBeGreaterThanOrEqual(200);
    expect(r.points).toHaveLength(5);
    for (let i = 1; i < r.points.length; i++) expect(r.points[i].score).toBeLessThanOrEqual(r.points[i - 1].score);
    for (const p of r.points) {
      expect(p.reasons.length).toBeGreaterThanOrEqual(3);
      expect(rel(p.plan.predicted_pair_rate, 1e5)).toBeLessThan(1e-9);
    }
    expect(r.points[0].plan.uncertainty).not.toBeNull();
    expect(r.points[4].plan.uncertainty).toBeNull();
    expect(r.scoring).toMatch(/0\.3·S_power/);
  });
  test('serious warnings cost score: with a cold-stage limit that flags the high-power biases the best point has none', () => {
    const chain = { pumpPeriod: 1e-3, attenuationDb: [20, 20, 20], coldStageLimitW: 1e-10 };
    // the limit flags the low-slope biases near the sweet spot but not the steep ones
    expect(codes(planCavity(cal, { ...cav, ...chain, fluxPhi0: 0.05 }))).toContain('cold_stage_power');
    expect(codes(planCavity(cal, { ...cav, ...chain, fluxPhi0: 0.3 }))).not.toContain('cold_stage_power');
    const r = rankOperatingPoints(cal, { ...cav, fluxPhi0: undefined, ...chain }, { top: 3 });
    expect(r.points[0].plan.warnings.filter((w) => w.code === 'cold_stage_power')).toHaveLength(0);
    expect(r.points[0].plan.generator_power_dbm).not.toBeNull();
  });
  test('flux-noise criterion: more flux noise moves the best point towards the sweet spot (smaller slope)', () => {
    const req = { ...cav, fluxPhi0: undefined, ql: 2e5, qc: 2.4e5, uncertaintyDraws: 0 };
    const quiet = rankOperatingPoints(cal, req, { top: 1, fluxNoisePhi0: 1e-8 }).points[0];
    const noisy = rankOperatingPoints(cal, req, { top: 1, fluxNoisePhi0: 3e-6 }).points[0];
    expect(Math.abs(noisy.plan.slope_hz_per_phi0 as number)).toBeLessThan(0.5 * Math.abs(quiet.plan.slope_hz_per_phi0 as number));
    expect(Math.abs(noisy.operating_flux_phi0)).toBeLessThan(Math.abs(quiet.operating_flux_phi0));
  });
  test('line mode ranking runs over the phase calibration', () => {
    const r = rankOperatingPoints(lineCal, { ...lineReq, fluxPhi0: undefined }, { top: 3 });
    expect(r.feasible).toBeGreaterThan(150);
    expect(r.points[0].plan.mode).toBe('line');
  });
});
