/**
 * Builders from the tuning / phase fit results to the CalibrationJson of calibration/contract.ts
 * (what the command line prints and the server stores).
 * JSON safety: every number is finite. When no fit could be run (success = false before fitting),
 * chisqr, redchi, aic and bic are 0 and nvarys 0: read `success` and `message`, not the numbers.
 */
import { CALIBRATION_SCHEMA, CalibrationJson, FittedPoint, InputKind, MatrixJson, ValueWithError } from '../contract';
import type { FitResult } from '../fit/types';
import { biasQuantity } from './common';
import type { TuningFitResult, TuningParamValue } from './fitTuning';
import type { PhaseFitResult } from './phaseFit';
import pkg from '../package.json';

export interface CalibrationJsonExtras {
  kind?: InputKind;
  /** 1-based source rows per point (same order as the points); null entries allowed. */
  rows?: (number | null)[];
  source?: string | string[];
  geometry?: CalibrationJson['geometry'];
  coreVersion?: string;
}

const finite = (v: number, fallback = 0) => (Number.isFinite(v) ? v + 0 : fallback); // + 0 turns −0 into 0

/** Deep copy with −0 → 0 and non-finite numbers → null, so the JSON round trip is exact. */
function jsonSafe(v: unknown): unknown {
  if (typeof v === 'number') return Number.isFinite(v) ? v + 0 : null;
  if (Array.isArray(v)) return v.map(jsonSafe);
  if (v && typeof v === 'object') return Object.fromEntries(Object.entries(v).map(([k, x]) => [k, jsonSafe(x)]));
  return v;
}

function vwe(p: TuningParamValue): ValueWithError {
  const out: ValueWithError = { value: finite(p.value), stderr: p.stderr !== null && Number.isFinite(p.stderr) ? p.stderr : null, vary: p.vary };
  if (Number.isFinite(p.min)) out.min = p.min;
  if (Number.isFinite(p.max)) out.max = p.max;
  return out;
}

/** Covariance/correlation with contract names; the flux_period row and column flip with the reported sign. */
function matrices(fit: FitResult | null, periodSign: number): { covariance: MatrixJson | null; correlation: MatrixJson | null } {
  if (!fit || !fit.covariance || !fit.correlation) return { covariance: null, correlation: null };
  const names = fit.varyingNames.slice();
  const sgn = names.map((nm) => (nm === 'flux_period' ? periodSign : 1));
  const conv = (m: number[][]) => m.map((row, i) => row.map((v, j) => finite(v * sgn[i] * sgn[j])));
  return { covariance: { names, matrix: conv(fit.covariance) }, correlation: { names, matrix: conv(fit.correlation) } };
}

function statistics(fit: FitResult | null, ndataFallback: number, warnings: string[]) {
  if (!fit) return { chisqr: 0, redchi: 0, aic: 0, bic: 0, ndata: ndataFallback, nvarys: 0, nfev: 0, iterations: 0 };
  const s = { chisqr: fit.chisqr, redchi: fit.redchi, aic: fit.aic, bic: fit.bic };
  if (![s.chisqr, s.redchi, s.aic, s.bic].every(Number.isFinite)) warnings.push('fit statistics not finite: reported as 0');
  return {
    chisqr: finite(s.chisqr), redchi: finite(s.redchi), aic: finite(s.aic), bic: finite(s.bic),
    ndata: fit.ndata, nvarys: fit.nvarys, nfev: fit.nfev, iterations: fit.iterations,
  };
}

function pointsJson(
  pts: { index: number; bias: number; flux_phi0: number; measured: number; sigma: number | null; model: number; residual: number; outlier: boolean }[],
  rows: (number | null)[] | undefined,
): FittedPoint[] {
  return pts.map((p) => ({
    index: p.index,
    row: rows ? (rows[p.index] ?? null) : null,
    bias: p.bias,
    flux_phi0: finite(p.flux_phi0),
    measured: p.measured,
    sigma: p.sigma,
    model: finite(p.model),
    residual: finite(p.residual),
    outlier: p.outlier,
  }));
}

/** What the tuning and phase results have in common for the JSON. */
interface FluxFitResultLike {
  success: boolean;
  message: string;
  loss: CalibrationJson['loss'];
  biasUnit: string;
  fit: FitResult | null;
  line: { period: number };
  outliers: number[];
  points: Parameters<typeof pointsJson>[0];
  warnings: string[];
  fixed: CalibrationJson['fixed'];
}

/** The JSON shared by both kinds of fit; model-specific fields come in `own`. */
function fluxFitJson(
  r: FluxFitResultLike,
  extras: CalibrationJsonExtras,
  own: Pick<CalibrationJson, 'kind' | 'model' | 'geometry' | 'params'> & { derived: Record<string, unknown> },
): CalibrationJson {
  const warnings = r.warnings.slice();
  const { covariance, correlation } = matrices(r.fit, r.line.period < 0 ? -1 : 1);
  return {
    schema: CALIBRATION_SCHEMA,
    core_version: extras.coreVersion ?? pkg.version,
    kind: own.kind,
    model: own.model,
    geometry: own.geometry,
    bias_unit: r.biasUnit,
    bias_quantity: biasQuantity(r.biasUnit),
    params: own.params,
    fixed: { ...r.fixed },
    covariance,
    correlation,
    ...statistics(r.fit, r.points.length, warnings),
    success: r.success,
    message: r.message,
    loss: r.loss,
    outliers: r.outliers.slice(),
    points: pointsJson(r.points, extras.rows),
    derived: jsonSafe(own.derived) as Record<string, unknown>,
    warnings,
    ...(extras.source !== undefined ? { source: extras.source } : {}),
  };
}

/** CalibrationJson of a tuning-curve fit (model exact or approx). */
export function tuningResultToCalibrationJson(r: TuningFitResult, extras: CalibrationJsonExtras = {}): CalibrationJson {
  const params: CalibrationJson['params'] = {
    f0_hz: vwe(r.params.f0_hz),
    gamma0: vwe(r.params.gamma0),
    asymmetry: vwe(r.params.asymmetry),
    flux_period: vwe(r.params.flux_period),
    flux_offset: vwe(r.params.flux_offset),
  };
  if (r.params.cs_over_cr.vary || r.params.cs_over_cr.value !== 0) params.cs_over_cr = vwe(r.params.cs_over_cr);
  return fluxFitJson(r, extras, {
    kind: extras.kind ?? 'tuning_points',
    model: r.model,
    geometry: extras.geometry ?? null,
    params,
    derived: {
      ...r.derived,
      symmetric_fit: r.symmetric,
      conventions: {
        flux: 'phi0 = (bias - flux_offset) / flux_period',
        flux_offset: 'bias of the frequency maximum nearest the sweep centre',
        flux_period_sign: 'not observable from a tuning curve (even in flux); sign as requested, default positive',
        outliers: '|residual/sigma| > 5 s and |residual| > 1e-8 f0; s = dof-corrected robust scale of the weighted residuals (MAD, then inlier RMS), at least 1 when sigma is given',
      },
    },
  });
}

/** CalibrationJson of a phase-versus-flux fit (model 'phase'). */
export function phaseResultToCalibrationJson(r: PhaseFitResult, extras: CalibrationJsonExtras = {}): CalibrationJson {
  return fluxFitJson(r, extras, {
    kind: extras.kind ?? 'phase_flux',
    model: 'phase',
    geometry: extras.geometry ?? 'reflection',
    params: {
      tau_eff0_s: vwe(r.params.tau_eff0_s),
      asymmetry: vwe(r.params.asymmetry),
      flux_period: vwe(r.params.flux_period),
      flux_offset: vwe(r.params.flux_offset),
      theta0_rad: vwe(r.params.theta0_rad),
    },
    derived: {
      ...r.derived,
      conventions: {
        flux: 'phi0 = (bias - flux_offset) / flux_period',
        flux_offset: 'bias of the phase maximum (tau_eff minimum) nearest the sweep centre',
        phase: 'theta = theta0 - 2 omega tau_eff(phi); residuals wrapped into (-pi, pi]; theta0 wrapped into (-pi, pi]',
      },
    },
  });
}
