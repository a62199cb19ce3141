/**
 * Completing a plan request from a stored pump line (calibration/planner/pumpLine.ts), the rule the
 * server stores by and the app shows live. Checks are identities of the threshold-anchored power law
 * P = P_th·(δΦ/δΦ_th)² (δΦ ∝ √P for a linear pump line: common practice for anchoring on a measured
 * threshold) and of the fill order; the calibration is hand-built input data.
 */
import { completeFromPumpLine, planFromCalibration, type PumpLineSettings } from '../../../calibration/planner';
import { tuningCalibration } from '../../fixtures/planner/hand-calibration';

const cal = tuningCalibration();
const base: PumpLineSettings = {
  dcPeriod: null,
  thresholdPowerDbm: null,
  thresholdBias: null,
  attenuationDb: [20, 10, 20],
  stageNames: ['4 K', 'still', 'mixing chamber'],
  coldStageLimitW: 2e-7,
  pumpLineZ0Ohm: 50,
};
const period = cal.params.flux_period!.value;
const offset = cal.params.flux_offset!.value;
const biasAt = (phi: number) => offset + phi * period;

test('no pump line: the request is returned unchanged', () => {
  const req = { mode: 'cavity' as const, fluxPhi0: 0.3, targetPairRate: 1e5 };
  expect(completeFromPumpLine(cal, req, null)).toEqual({ request: req, filled: [] });
});

test('a dc period fills the pump period, the attenuation chain with its stage names, the limit and Z0', () => {
  const { request, filled } = completeFromPumpLine(cal, { mode: 'cavity', fluxPhi0: 0.3, targetPairRate: 1e5 }, { ...base, dcPeriod: 2e-3, thresholdPowerDbm: -30, thresholdBias: biasAt(0.3) });
  expect(filled).toEqual(['pumpPeriod', 'attenuationDb', 'stageNames', 'coldStageLimitW', 'pumpLineZ0Ohm']);
  expect(request.pumpPeriod).toBe(2e-3);
  expect(request.attenuationDb).toEqual([20, 10, 20]);
  expect(request.thresholdPowerDbm).toBeUndefined(); // the dc period wins over a measured threshold
});

test('values the request gives are kept', () => {
  const { request, filled } = completeFromPumpLine(cal, { mode: 'cavity', fluxPhi0: 0.3, targetPairRate: 1e5, attenuationDb: [3], coldStageLimitW: 1e-6 }, { ...base, dcPeriod: 2e-3 });
  expect(request.attenuationDb).toEqual([3]);
  expect(request.coldStageLimitW).toBe(1e-6);
  expect(filled).toEqual(['pumpPeriod', 'pumpLineZ0Ohm']);
});

test('a threshold measured at the operating bias is used as measured', () => {
  const b = biasAt(0.3);
  const { request } = completeFromPumpLine(cal, { mode: 'cavity', bias: b, targetPairRate: 1e5 }, { ...base, thresholdPowerDbm: -42, thresholdBias: b });
  expect(request.thresholdPowerDbm).toBeCloseTo(-42, 9);
});

test('a threshold measured elsewhere moves by 20·log10 of the ratio of the thresholds in flux', () => {
  const bMeas = biasAt(0.3);
  const bOp = biasAt(0.2);
  const { request } = completeFromPumpLine(cal, { mode: 'cavity', bias: bOp, targetPairRate: 1e5 }, { ...base, thresholdPowerDbm: -42, thresholdBias: bMeas });
  const th = (bias: number) => planFromCalibration(cal, { mode: 'cavity', bias, targetPairRate: 1e-6, uncertaintyDraws: 0 }).threshold_amplitude_phi0 as number;
  expect(request.thresholdPowerDbm).toBeCloseTo(-42 + 20 * Math.log10(th(bOp) / th(bMeas)), 9);
  // A smaller slope (closer to the sweet spot) needs more flux to reach threshold, hence more power.
  expect(th(bOp)).toBeGreaterThan(th(bMeas));
  expect(request.thresholdPowerDbm!).toBeGreaterThan(-42);
});

test('line mode does not take a cavity threshold', () => {
  const { request, filled } = completeFromPumpLine(cal, { mode: 'line', fluxPhi0: 0.3, targetPairRate: 1e5, pumpFrequencyHz: 11e9 }, { ...base, thresholdPowerDbm: -42, thresholdBias: biasAt(0.3) });
  expect(request.thresholdPowerDbm).toBeUndefined();
  expect(filled).toEqual([]);
});
