/**
 * The calibration JSON: what `cli fit --json` prints, what the server stores and serves at
 * GET /api/devices/:id/calibration, and what the planner reads. Keys are snake_case because lab
 * scripts read them; extend, never rename (outside checks rely on these names).
 */

export const CALIBRATION_SCHEMA = 'fluxwright.calibration/1';

export type InputKind = 'tuning_points' | 'raw_complex' | 'touchstone' | 'phase_flux';
export type TuningModel = 'exact' | 'approx';
/** 'phase' is the reflected-phase-versus-flux model of a non-resonant SQUID termination. */
export type ModelName = TuningModel | 'phase';
export type Geometry = 'notch' | 'reflection';

export interface ValueWithError {
  value: number;
  /** null when not estimable (fixed parameter, singular covariance, value at a bound). */
  stderr: number | null;
  vary?: boolean;
  min?: number;
  max?: number;
}

/** Tuning-curve parameters (models exact/approx). flux_period and flux_offset in the bias unit. */
export interface TuningParams {
  f0_hz: ValueWithError;
  gamma0: ValueWithError;
  asymmetry: ValueWithError;
  flux_period: ValueWithError;
  flux_offset: ValueWithError;
  /** SQUID-to-line capacitance ratio C_s/C_r; usually fixed (default 0). */
  cs_over_cr?: ValueWithError;
}

/** Phase-versus-flux parameters (model phase). */
export interface PhaseParams {
  tau_eff0_s: ValueWithError;
  asymmetry: ValueWithError;
  flux_period: ValueWithError;
  flux_offset: ValueWithError;
  theta0_rad: ValueWithError;
}

/** One fitted point of the tuning or phase curve, in file order. */
export interface FittedPoint {
  /** 0-based index of the point among the data points (the index used by `outliers`). */
  index: number;
  /** 1-based row in the source file as a spreadsheet shows it (header = row 1); for raw/Touchstone input the first row of the trace. */
  row: number | null;
  bias: number;
  flux_phi0: number;
  /** Measured value: resonance in Hz (tuning) or reflected phase in rad (phase). */
  measured: number;
  sigma: number | null;
  model: number;
  residual: number;
  outlier: boolean;
}

/** Per-trace resonance extraction result (raw complex or Touchstone input). */
export interface TraceJson {
  bias: number;
  fr_hz: number | null;
  fr_stderr_hz?: number | null;
  ql: number | null;
  ql_stderr?: number | null;
  /** |Q_c| */
  qc: number | null;
  qc_stderr?: number | null;
  qi: number | null;
  qi_stderr?: number | null;
  /** Impedance-mismatch angle of the complex Q_c (notch), rad. */
  phi_rad?: number | null;
  /** null = good; otherwise 'no_resonance' | 'low_snr' | 'fit_failed'. */
  flag: null | 'no_resonance' | 'low_snr' | 'fit_failed';
  reason?: string | null;
  snr?: number | null;
  /** Rows of the source covering this trace (1-based, inclusive). */
  rows?: [number, number] | null;
  file?: string | null;
}

export interface MatrixJson {
  names: string[];
  matrix: number[][];
}

export interface CalibrationJson {
  schema: typeof CALIBRATION_SCHEMA;
  core_version: string;
  kind: InputKind;
  model: ModelName;
  geometry?: Geometry | null;
  bias_unit: string;
  /** 'current' | 'voltage' | 'unknown', from the bias unit. */
  bias_quantity?: 'current' | 'voltage' | 'unknown';
  params: Partial<TuningParams & PhaseParams> & Record<string, ValueWithError>;
  /** Inputs held fixed or given by the user (z0_ohm, loop_inductance_h, probe_frequency_hz, ...). */
  fixed: Record<string, number | null>;
  covariance: MatrixJson | null;
  correlation: MatrixJson | null;
  chisqr: number;
  redchi: number;
  aic: number;
  bic: number;
  ndata: number;
  nvarys: number;
  nfev?: number;
  iterations?: number;
  success: boolean;
  message: string;
  loss: string;
  /** 0-based indices into `points` of the points the robust loss flagged. */
  outliers: number[];
  points: FittedPoint[];
  /** Only for raw complex / Touchstone input. */
  traces?: TraceJson[];
  derived: Record<string, unknown>;
  warnings: string[];
  /** Source file name(s). */
  source?: string | string[];
}
