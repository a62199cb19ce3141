/**
 * Sweeps, fits and jobs: request schemas and response types of the calibration routes (issue 5).
 * The calibration JSON itself is the core's contract (calibration/contract.ts), served unchanged.
 *
 *   POST /api/devices/:id/sweeps            multipart, field `files` (+ uploadOptionsSchema fields) → 202 UploadAccepted | 201 UploadDone
 *   GET  /api/devices/:id/sweeps            → SweepListResponse
 *   GET  /api/jobs/:id                      → JobResponse
 *   GET  /api/devices/:id/fits              → FitListResponse (newest version first)
 *   GET  /api/fits/:id                      → FitDetailResponse (metadata + calibration JSON)
 *   POST /api/fits/:id/review               reviewRequestSchema → FitResponse
 *   POST /api/fits/:id/refit                refitRequestSchema → 202 | 201 (as the upload)
 *   GET  /api/fits/:a/compare/:b            → FitComparison
 *   GET  /api/devices/:id/calibration       → CalibrationJson (headers X-Fluxwright-Fit-Id / -Version)
 *   GET  /api/fits/:id/export?format=json|csv → attachment
 */
import { z } from 'zod';
import type { CalibrationJson, InputKind, ModelName } from '../../calibration/contract';

export type { CalibrationJson, InputKind, ModelName };

export const SWEEP_KINDS = ['tuning_points', 'raw_complex', 'touchstone', 'phase_flux'] as const satisfies readonly InputKind[];
export const TUNING_MODELS = ['exact', 'approx'] as const;
/** Resonator coupling of the per-trace extraction (the core's geometry, not the device layout). */
export const COUPLINGS = ['notch', 'reflection'] as const;
export const LOSSES = ['linear', 'soft_l1', 'huber', 'cauchy'] as const;
export const FIT_STATUSES = ['proposed', 'accepted', 'rejected', 'superseded'] as const;
export type FitStatus = (typeof FIT_STATUSES)[number];
export const JOB_STATUSES = ['queued', 'running', 'succeeded', 'failed'] as const;
export type JobStatus = (typeof JOB_STATUSES)[number];
export const JOB_TYPES = ['fit_upload', 'refit'] as const;
export type JobType = (typeof JOB_TYPES)[number];

/** Response headers of GET /api/devices/:id/calibration (the body is the calibration JSON alone). */
export const FIT_ID_HEADER = 'X-Fluxwright-Fit-Id';
export const FIT_VERSION_HEADER = 'X-Fluxwright-Fit-Version';

/** Multipart text fields arrive as strings: empty means "not given". */
const blankToUndefined = (v: unknown) => (typeof v === 'string' && v.trim() === '' ? undefined : v);
const optionalNumber = (what: string, unit: string, max: number) =>
  z.preprocess(
    blankToUndefined,
    z.coerce
      .number({ message: `expected ${what} as a number in ${unit}` })
      .refine(Number.isFinite, { message: `${what} must be a finite number (${unit})` })
      .refine((x) => x > 0, { message: `${what} must be positive (${unit})` })
      .refine((x) => x <= max, { message: `${what} must be at most ${max} ${unit}` })
      .optional(),
  );
const optionalBool = (what: string) =>
  z.preprocess(
    (v) => {
      const b = blankToUndefined(v);
      if (typeof b !== 'string') return b;
      if (/^(1|true|yes|on)$/i.test(b.trim())) return true;
      if (/^(0|false|no|off)$/i.test(b.trim())) return false;
      return b;
    },
    z.boolean({ message: `${what} must be true or false` }).optional(),
  );
const optionalEnum = <T extends readonly [string, ...string[]]>(what: string, values: T) =>
  z.preprocess(blankToUndefined, z.enum(values, { message: `${what} must be one of ${values.join(', ')}` }).optional());
const optionalText = (what: string, max: number) =>
  z.preprocess(blankToUndefined, z.string({ message: `expected ${what} as text` }).trim().max(max, { message: `${what} must be at most ${max} characters` }).optional());

/** Fit options shared by upload and refit. Numbers may come as strings (multipart) or numbers (JSON). */
const fitOptionFields = {
  model: optionalEnum('model', TUNING_MODELS),
  symmetric: optionalBool('symmetric'),
  // Sanity bounds, not physics: CPW impedances are tens of ohms, probe frequencies GHz.
  z0Ohm: optionalNumber('z0Ohm', 'ohm', 1000),
  geometry: optionalEnum('geometry', COUPLINGS),
  probeFrequencyHz: optionalNumber('probeFrequencyHz', 'Hz', 1e12),
  loss: optionalEnum('loss', LOSSES),
};

/** Text fields of POST /api/devices/:id/sweeps (besides the `files` parts). */
export const uploadOptionsSchema = z.object({
  kind: optionalEnum('kind', SWEEP_KINDS),
  ...fitOptionFields,
  cooldownId: z.preprocess(blankToUndefined, z.coerce.number({ message: 'expected cooldownId as a number' }).int().positive().optional()),
  /** Touchstone sets: regular expression with one capture group for the bias in each file name. */
  biasPattern: optionalText('biasPattern', 200).refine(
    (p) => {
      if (p === undefined) return true;
      try {
        new RegExp(p);
        return true;
      } catch {
        return false;
      }
    },
    { message: 'biasPattern is not a valid regular expression' },
  ),
  biasUnit: optionalText('biasUnit', 32),
  note: optionalText('note', 4000),
});
export type UploadOptions = z.infer<typeof uploadOptionsSchema>;

/** POST /api/fits/:id/refit: options left out keep the value the source fit used. */
export const refitRequestSchema = z.object(fitOptionFields);
export type RefitRequest = z.infer<typeof refitRequestSchema>;

export const reviewRequestSchema = z.object({
  decision: z.enum(['accept', 'reject'], { message: 'decision must be accept or reject' }),
  comment: z.string({ message: 'expected comment as text' }).trim().max(4000, { message: 'comment must be at most 4000 characters' }).optional(),
});
export type ReviewRequest = z.infer<typeof reviewRequestSchema>;

export const compareParamsSchema = z.object({
  a: z.coerce.number({ message: 'expected a numeric fit id' }).int().positive({ message: 'expected a positive fit id' }),
  b: z.coerce.number({ message: 'expected a numeric fit id' }).int().positive({ message: 'expected a positive fit id' }),
});

export const exportQuerySchema = z.object({
  format: z.enum(['json', 'csv'], { message: 'format must be json or csv' }).default('json'),
});

/** The options a fit ran with (stored with the fit; the core's CalibrateOptions). */
export interface FitOptions {
  kind?: InputKind;
  model?: 'exact' | 'approx';
  symmetric?: boolean;
  z0Ohm?: number | null;
  geometry?: 'notch' | 'reflection';
  probeFrequencyHz?: number | null;
  loss?: (typeof LOSSES)[number];
  loopInductanceH?: number | null;
  biasPattern?: string;
  biasUnit?: string;
}

/** What the parser found, stored with the sweep. */
export interface ParseSummary {
  kind: InputKind;
  biasUnit: string;
  biasQuantity: 'current' | 'voltage' | 'unknown';
  /** Data points (tuning/phase) or traces (raw/Touchstone). */
  points: number;
  /** Frequency points per trace (raw/Touchstone): min and max over the traces. */
  freqPointsPerTrace: [number, number] | null;
  biasRange: [number, number] | null;
  frequencyRangeHz: [number, number] | null;
  geometry: 'notch' | 'reflection' | null;
  sparam: string | null;
  probeFrequencyHz: number | null;
  warnings: string[];
}

export interface SweepFileInfo {
  name: string;
  byteSize: number;
  sha256: string;
}

export interface Sweep {
  id: number;
  deviceId: number;
  cooldownId: number | null;
  uploadedBy: { id: number; name: string } | null;
  kind: InputKind;
  fileNames: string[];
  files: SweepFileInfo[];
  byteSize: number;
  /** sha256 of a single file; of the sorted "name:sha256" lines for a set. */
  sha256: string;
  biasUnit: string | null;
  parseSummary: ParseSummary;
  note: string | null;
  createdAt: string;
}

export interface Job {
  id: number;
  type: JobType;
  status: JobStatus;
  /** 0..1 */
  progress: number;
  message: string | null;
  sweepId: number;
  fitId: number | null;
  attempts: number;
  createdAt: string;
  startedAt: string | null;
  finishedAt: string | null;
  updatedAt: string;
}

export interface ParamSummary {
  value: number;
  stderr: number | null;
}

/** Fit metadata without the full calibration JSON (lists, reviews, the device's active calibration). */
export interface Fit {
  id: number;
  deviceId: number;
  deviceName: string;
  sweepId: number;
  /** 1, 2, 3 … per device. */
  version: number;
  kind: InputKind;
  model: ModelName;
  options: FitOptions;
  status: FitStatus;
  /** Headline parameters (null when the model has none of that name). */
  f0Hz: ParamSummary | null;
  gamma0: ParamSummary | null;
  asymmetry: ParamSummary | null;
  fluxPeriod: ParamSummary | null;
  fluxOffset: ParamSummary | null;
  biasUnit: string;
  redchi: number;
  ndata: number;
  outlierCount: number;
  success: boolean;
  warnings: string[];
  coreVersion: string;
  createdBy: { id: number; name: string } | null;
  createdAt: string;
  reviewedBy: { id: number; name: string } | null;
  reviewedAt: string | null;
  reviewComment: string | null;
  /** When an accepted fit was replaced, the fit that replaced it. */
  supersededByFitId: number | null;
  supersededAt: string | null;
}

export interface FitDetail extends Fit {
  calibration: CalibrationJson;
}

/** GET /api/devices and /api/devices/:id carry this for the device's accepted fit. */
export interface ActiveCalibrationSummary {
  fitId: number;
  version: number;
  model: ModelName;
  kind: InputKind;
  f0Hz: ParamSummary | null;
  gamma0: ParamSummary | null;
  asymmetry: ParamSummary | null;
  acceptedAt: string | null;
  acceptedBy: { id: number; name: string } | null;
}

export interface ParameterComparison {
  name: string;
  a: ParamSummary;
  b: ParamSummary;
  /** b − a */
  difference: number;
  /** sqrt(σa² + σb²); null when either standard error is unknown. */
  combinedStderr: number | null;
  /** difference / combinedStderr; null when that is unknown or zero. */
  differenceInSigma: number | null;
}

export interface FitComparison {
  a: Fit;
  b: Fit;
  sameDevice: boolean;
  sameSweep: boolean;
  /** Parameters present in both fits, in the order of fit a. */
  parameters: ParameterComparison[];
  /** Caveats of the comparison (e.g. fits of one sweep are not independent). */
  notes: string[];
}

export interface UploadAccepted {
  sweep: Sweep;
  job: Job;
}
/** The job finished within the wait: `fit` when it succeeded (a failed job carries its message). */
export interface UploadDone extends UploadAccepted {
  fit?: Fit;
}
export type UploadResponse = UploadAccepted | UploadDone;

export interface SweepListResponse {
  sweeps: Sweep[];
}
export interface JobResponse {
  job: Job;
  fit?: Fit;
}
export interface FitListResponse {
  fits: Fit[];
}
export interface FitResponse {
  fit: Fit;
}
export interface FitDetailResponse {
  fit: FitDetail;
}

/** details of a 422 SWEEP_INVALID answer: the parser's issues with file, row and column. */
export interface SweepIssue {
  severity: 'error' | 'warning';
  file: string;
  row: number | null;
  column: string | null;
  message: string;
}
export interface SweepInvalidDetails {
  issues: SweepIssue[];
}
