/**
 * Hand-built calibration JSON for planner tests: input data with chosen parameters (not a fit result).
 */
import { CALIBRATION_SCHEMA, type CalibrationJson, type TraceJson } from '@/calibration/contract';

export interface HandParams {
  f0Hz?: number;
  gamma0?: number;
  asymmetry?: number;
  period?: number;
  offset?: number;
  /** Relative standard errors used to build a diagonal-plus-correlation covariance. */
  relErr?: number;
  traces?: TraceJson[];
  fixed?: Record<string, number | null>;
  derived?: Record<string, unknown>;
  covariance?: boolean;
}

export function tuningCalibration(h: HandParams = {}): CalibrationJson {
  const f0 = h.f0Hz ?? 6.5e9;
  const g0 = h.gamma0 ?? 0.03;
  const d = h.asymmetry ?? 0.1;
  const period = h.period ?? 1.0;
  const offset = h.offset ?? 0.05;
  const rel = h.relErr ?? 1e-3;
  const names = ['f0_hz', 'gamma0', 'asymmetry', 'flux_period', 'flux_offset'];
  const sd = [f0 * rel * 1e-3, g0 * rel, Math.max(d, 0.01) * rel, period * rel, period * rel * 0.5];
  // a mild f0–γ0 correlation as a real fit shows
  const corr = names.map((_, i) => names.map((__, j) => (i === j ? 1 : (i === 0 && j === 1) || (i === 1 && j === 0) ? 0.6 : 0)));
  const matrix = corr.map((row, i) => row.map((c, j) => c * sd[i] * sd[j]));
  const points = Array.from({ length: 41 }, (_, i) => {
    const bias = offset - 0.4 * period + (0.8 * period * i) / 40;
    return { index: i, row: i + 2, bias, flux_phi0: (bias - offset) / period, measured: 0, sigma: null, model: 0, residual: 0, outlier: false };
  });
  return {
    schema: CALIBRATION_SCHEMA,
    core_version: 'test',
    kind: h.traces ? 'raw_complex' : 'tuning_points',
    model: 'exact',
    bias_unit: 'mA',
    params: {
      f0_hz: { value: f0, stderr: sd[0] },
      gamma0: { value: g0, stderr: sd[1] },
      asymmetry: { value: d, stderr: sd[2] },
      flux_period: { value: period, stderr: sd[3] },
      flux_offset: { value: offset, stderr: sd[4] },
    },
    fixed: h.fixed ?? { z0_ohm: 50 },
    covariance: h.covariance === false ? null : { names, matrix },
    correlation: null,
    chisqr: 1, redchi: 1, aic: 0, bic: 0, ndata: points.length, nvarys: 5,
    success: true, message: 'hand-built', loss: 'linear', outliers: [], points,
    traces: h.traces,
    derived: h.derived ?? {},
    warnings: [],
  };
}

export function phaseCalibration(tau0: number, asymmetry: number, relErr = 1e-3): CalibrationJson {
  const names = ['tau_eff0_s', 'asymmetry', 'flux_period', 'flux_offset'];
  const sd = [tau0 * relErr, Math.max(asymmetry, 0.01) * relErr, relErr, relErr * 0.5];
  return {
    ...tuningCalibration(),
    model: 'phase',
    kind: 'phase_flux',
    params: {
      tau_eff0_s: { value: tau0, stderr: sd[0] },
      asymmetry: { value: asymmetry, stderr: sd[1] },
      flux_period: { value: 1, stderr: sd[2] },
      flux_offset: { value: 0, stderr: sd[3] },
      theta0_rad: { value: 0, stderr: null },
    },
    covariance: { names, matrix: names.map((_, i) => names.map((__, j) => (i === j ? sd[i] * sd[i] : 0))) },
  };
}
