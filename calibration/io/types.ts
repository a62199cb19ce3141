import type { Geometry, InputKind } from '../contract';
import type { ParseIssue } from './issues';
import type { BiasQuantity } from './units';

export type { Geometry, InputKind, BiasQuantity };

export interface TuningPoint {
  /** 1-based file row. */
  row: number;
  bias: number;
  frHz: number;
  sigmaHz?: number;
  ql?: number;
  qc?: number;
  qi?: number;
}

export interface TuningPointsData {
  kind: 'tuning_points';
  file: string;
  /** Bias unit as written, normalised ('mA', 'uA', 'V', 'Phi0', 'a.u.'). */
  biasUnit: string;
  biasQuantity: BiasQuantity;
  points: TuningPoint[];
  /** Warnings (errors are thrown). */
  issues: ParseIssue[];
  /** `# key = value` comment lines, keys folded to snake case. */
  metadata: Record<string, string>;
}

export interface RawTrace {
  bias: number;
  /** First and last source row of this trace (1-based, inclusive). */
  rows: [number, number];
  file: string;
  /** Increasing. */
  freqHz: Float64Array;
  re: Float64Array;
  im: Float64Array;
}

export interface RawSweepData {
  kind: 'raw_complex' | 'touchstone';
  file: string | string[];
  biasUnit: string;
  biasQuantity: BiasQuantity;
  geometry: Geometry;
  /** The S-parameter the traces hold, when known. */
  sparam: 'S11' | 'S21' | 'S12' | 'S22' | null;
  traces: RawTrace[];
  issues: ParseIssue[];
  metadata: Record<string, string>;
}

export interface PhasePoint {
  row: number;
  bias: number;
  phaseRad: number;
  sigmaRad?: number;
}

export interface PhaseFluxData {
  kind: 'phase_flux';
  file: string;
  biasUnit: string;
  biasQuantity: BiasQuantity;
  /** null when neither the caller, a comment nor a column gave it (the CLI then asks for it). */
  probeFrequencyHz: number | null;
  probeFrequencySource: 'option' | 'comment' | 'column' | null;
  points: PhasePoint[];
  issues: ParseIssue[];
  metadata: Record<string, string>;
}

export type SweepData = TuningPointsData | RawSweepData | PhaseFluxData;

export interface ParseOptions {
  kind?: InputKind;
  geometry?: Geometry;
  probeFrequencyHz?: number;
}
