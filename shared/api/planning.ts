/**
 * Drive plans, pump lines, operating points, batch comparison and spec windows (issue 6):
 * request schemas and response types shared by the app and the server.
 *
 * The request object of a plan is the core's PlanRequest (camelCase, calibration/planner/types.ts);
 * the result is the core's PlanResult (snake_case keys of the `plan --json` contract), served unchanged.
 *
 *   POST   /api/plans/preview                previewRequestSchema → PreviewResponse (no write; all roles)
 *   POST   /api/plans                        savePlanRequestSchema → 201 PlanResponse (experimentalist, lab_lead)
 *   GET    /api/plans?device=ID              → PlanListResponse (newest first; all roles)
 *   GET    /api/plans/:id                    → PlanResponse
 *   POST   /api/plans/:id/replan             replanRequestSchema → 201 PlanResponse (experimentalist, lab_lead)
 *   POST   /api/plans/:id/notes              noteRequestSchema → 201 PlanNoteResponse (the plan's author or a lab lead)
 *   GET    /api/plans/:id/export             → the Plan JSON as an attachment
 *   GET    /api/devices/:id/operating-points operatingPointsQuerySchema → OperatingPointsResponse
 *   GET    /api/devices/:id/pump-line        → PumpLineResponse
 *   PUT    /api/devices/:id/pump-line        pumpLineSchema → PumpLineResponse (all three roles)
 *   GET    /api/batches/compare              batchCompareQuerySchema → BatchCompareResponse
 *   GET    /api/batches/compare.csv          same query → text/csv attachment (one row per device × parameter)
 *   GET    /api/spec-windows                 → SpecWindowListResponse
 *   PUT    /api/spec-windows/:param          specWindowRequestSchema → SpecWindowResponse (lab_lead)
 *   DELETE /api/spec-windows/:param          → 204 (lab_lead)
 *
 * Errors: a planner refusal (PlanError: above threshold, bad combination of inputs, wrong model for
 * the mode) → 422 { error: { code: 'PLAN_REFUSED', message, details: PlanRefusedDetails } };
 * a device without an accepted calibration → 404 NO_ACTIVE_CALIBRATION.
 */
import { z } from 'zod';
import type { PumpTone } from '../../calibration/planner/line';
import type { PlanMode, PlanRequest, PlanResult, RankResult } from '../../calibration/planner/types';

export type { PlanMode, PlanRequest, PlanResult, PumpTone, RankResult };
export type { PlanWarning, RankedPoint, UncertaintySummary, WarningCode, CautionObject } from '../../calibration/planner/types';

/** Error code of a planner refusal (422). */
export const PLAN_REFUSED = 'PLAN_REFUSED' as const;
export interface PlanRefusedDetails {
  /** The core's PlanError code: above_threshold, bad_request, model_mismatch, zero_slope, unreachable, calibration_incomplete. */
  code: string;
  /** The offending input in the core's option spelling (e.g. 'target-pair-rate'), or null. */
  option: string | null;
}

export const PLAN_MODES = ['cavity', 'line'] as const satisfies readonly PlanMode[];
/** Upper bound on uncertainty draws per request on the server (the command line allows more). */
export const MAX_SERVER_DRAWS = 10000;

const finite = (what: string, unit?: string) =>
  z
    .number({ message: `expected ${what} as a number${unit ? ` in ${unit}` : ''}` })
    .refine(Number.isFinite, { message: `${what} must be a finite number${unit ? ` (${unit})` : ''}` });
const positive = (what: string, unit?: string) => finite(what, unit).refine((x) => x > 0, { message: `${what} must be > 0${unit ? ` ${unit}` : ''}` });
const text = (what: string, max: number) =>
  z.string({ message: `expected ${what} as text` }).trim().max(max, { message: `${what} must be at most ${max} characters` });

export const pumpToneSchema = z.strictObject({
  harmonic: z.number({ message: 'expected harmonic as a whole number 1..8' }).int({ message: 'harmonic must be a whole number' }).min(1).max(8),
  amplitudePhi0: finite('amplitudePhi0', 'Φ0'),
  phaseRad: finite('phaseRad', 'rad').optional(),
});

/**
 * The core's PlanRequest. Types and ranges are checked here; combinations (exactly one of flux/bias,
 * line mode needs a pump frequency, …) are the core's to judge and come back as 422 PLAN_REFUSED.
 */
export const planRequestSchema = z.strictObject({
  mode: z.enum(PLAN_MODES, { message: "mode must be 'cavity' or 'line'" }),
  fluxPhi0: finite('fluxPhi0', 'Φ0').optional(),
  bias: finite('bias', 'calibration bias unit').optional(),
  targetPairRate: positive('targetPairRate', 'pairs/s').optional(),
  targetGainDb: positive('targetGainDb', 'dB').optional(),
  ql: positive('ql').optional(),
  qc: positive('qc').optional(),
  defaultQl: positive('defaultQl').optional(),
  defaultQc: positive('defaultQc').optional(),
  bandHz: positive('bandHz', 'Hz').optional(),
  bandCentreHz: positive('bandCentreHz', 'Hz').optional(),
  pumpFrequencyHz: positive('pumpFrequencyHz', 'Hz').optional(),
  detuningHz: finite('detuningHz', 'Hz').optional(),
  temperatureK: finite('temperatureK', 'K').refine((x) => x >= 0, { message: 'temperatureK must be ≥ 0 K' }).optional(),
  pumpPeriod: positive('pumpPeriod', 'A per Φ0').optional(),
  attenuationDb: z
    .array(finite('attenuationDb entry', 'dB').refine((x) => x >= 0, { message: 'attenuationDb entries must be ≥ 0 dB' }), { message: 'expected attenuationDb as a list of dB values, warm → cold' })
    .max(20, { message: 'at most 20 attenuation stages' })
    .optional(),
  stageNames: z.array(text('stage name', 64), { message: 'expected stageNames as a list of names' }).max(20).optional(),
  thresholdPowerDbm: finite('thresholdPowerDbm', 'dBm').optional(),
  pumpLineZ0Ohm: positive('pumpLineZ0Ohm', 'Ω').optional(),
  coldStageLimitW: positive('coldStageLimitW', 'W').optional(),
  waveform: z.array(pumpToneSchema, { message: 'expected waveform as a list of tones' }).min(1).max(8).optional(),
  phaseVelocityMPerS: positive('phaseVelocityMPerS', 'm/s').optional(),
  uncertaintyDraws: z
    .number({ message: 'expected uncertaintyDraws as a whole number' })
    .int({ message: 'uncertaintyDraws must be a whole number' })
    .min(0)
    .max(MAX_SERVER_DRAWS, { message: `uncertaintyDraws must be at most ${MAX_SERVER_DRAWS} on the server` })
    .optional(),
  seed: z.number({ message: 'expected seed as a whole number' }).int({ message: 'seed must be a whole number' }).optional(),
  lobeMarginPhi0: positive('lobeMarginPhi0', 'Φ0').optional(),
});

const deviceIdField = z.number({ message: 'expected deviceId as a number' }).int().positive({ message: 'expected a positive deviceId' });

export const previewRequestSchema = z.strictObject({
  deviceId: deviceIdField,
  request: planRequestSchema,
  /** Also rank operating points across the calibrated bias range (same targets and pump line). */
  rank: z.boolean({ message: 'rank must be true or false' }).optional(),
});
export type PreviewRequest = z.infer<typeof previewRequestSchema>;

export const savePlanRequestSchema = z.strictObject({
  deviceId: deviceIdField,
  request: planRequestSchema,
  /** First annotation, stored as a note by the author. */
  note: text('note', 4000).optional(),
});
export type SavePlanRequest = z.infer<typeof savePlanRequestSchema>;

export const replanRequestSchema = z.strictObject({
  note: text('note', 4000).optional(),
});
export type ReplanRequest = z.infer<typeof replanRequestSchema>;

export const noteRequestSchema = z.strictObject({
  text: text('text', 4000).min(1, { message: 'text must not be empty' }),
});
export type NoteRequest = z.infer<typeof noteRequestSchema>;

export const planListQuerySchema = z.object({
  device: z.coerce.number({ message: 'expected device as a numeric id' }).int().positive({ message: 'expected a positive device id' }).optional(),
});

/** GET /api/devices/:id/operating-points: give target (pairs/s) or targetGainDb (cavity). */
export const operatingPointsQuerySchema = z.object({
  mode: z.enum(PLAN_MODES, { message: "mode must be 'cavity' or 'line'" }),
  target: z.coerce.number({ message: 'expected target as pairs/s' }).refine((x) => Number.isFinite(x) && x > 0, { message: 'target must be a pair rate > 0 pairs/s' }).optional(),
  targetGainDb: z.coerce.number({ message: 'expected targetGainDb in dB' }).refine((x) => Number.isFinite(x) && x > 0, { message: 'targetGainDb must be > 0 dB' }).optional(),
  pumpFrequencyHz: z.coerce.number({ message: 'expected pumpFrequencyHz in Hz' }).refine((x) => Number.isFinite(x) && x > 0, { message: 'pumpFrequencyHz must be > 0 Hz' }).optional(),
  top: z.coerce.number({ message: 'expected top as a whole number' }).int().min(1).max(20, { message: 'top must be at most 20' }).default(5),
});
export type OperatingPointsQuery = z.infer<typeof operatingPointsQuerySchema>;

// ---------------------------------------------------------------------------------------------
// Pump line

/** The device's pump line as the lab measured it; fills the request's power-chain fields when left out. */
export const pumpLineSchema = z
  .strictObject({
    /** dc flux period through the pump line (pump-line bias current per Φ0), A. */
    dcPeriod: positive('dcPeriod', 'A per Φ0').nullable(),
    /** Attenuators between generator and chip, dB, warm → cold. */
    attenuationDb: z
      .array(finite('attenuationDb entry', 'dB').refine((x) => x >= 0, { message: 'attenuationDb entries must be ≥ 0 dB' }), { message: 'expected attenuationDb as a list of dB values, warm → cold' })
      .max(20, { message: 'at most 20 attenuation stages' }),
    stageNames: z.array(text('stage name', 64), { message: 'expected stageNames as a list of names' }).max(20),
    /** Measured threshold power at the generator (cavity), dBm, at thresholdBias. */
    thresholdPowerDbm: finite('thresholdPowerDbm', 'dBm').nullable(),
    thresholdBias: finite('thresholdBias', 'calibration bias unit').nullable(),
    coldStageLimitW: positive('coldStageLimitW', 'W'),
    pumpLineZ0Ohm: positive('pumpLineZ0Ohm', 'Ω'),
    note: text('note', 4000).nullable(),
  })
  .refine((p) => p.stageNames.length === 0 || p.stageNames.length === p.attenuationDb.length, {
    message: 'give one stage name per attenuation stage (or none)',
    path: ['stageNames'],
  })
  .refine((p) => p.thresholdPowerDbm === null || p.thresholdBias !== null, {
    message: 'a measured threshold power needs the bias it was measured at (thresholdBias)',
    path: ['thresholdBias'],
  });
export type PumpLine = z.infer<typeof pumpLineSchema>;

export interface PumpLineRecord extends PumpLine {
  deviceId: number;
  updatedBy: { id: number; name: string } | null;
  updatedAt: string;
}
export interface PumpLineResponse {
  pumpLine: PumpLineRecord | null;
}

// ---------------------------------------------------------------------------------------------
// Plans

export interface PreviewResponse {
  result: PlanResult;
  fit: { id: number; version: number };
  ranking?: RankResult;
  /** Request fields the device's pump line filled (empty when none). */
  filledFromPumpLine: string[];
}

export interface PlanNote {
  id: number;
  authorId: number | null;
  authorName: string;
  text: string;
  createdAt: string;
}

export interface Plan {
  id: number;
  deviceId: number;
  deviceName: string;
  batchCode: string;
  /** The fit (calibration version) the plan was computed from. */
  fitId: number;
  fitVersion: number;
  /** The device's accepted fit now (null when it has none). */
  activeFitId: number | null;
  activeFitVersion: number | null;
  /** fitId !== activeFitId: the calibration changed since; offer a re-plan. */
  stale: boolean;
  authorId: number | null;
  authorName: string;
  mode: PlanMode;
  /** The request the core computed with (the pump-line fields already filled in). */
  request: PlanRequest;
  result: PlanResult;
  /** The pump line as used (null when none was stored or none of its fields was needed). */
  pumpLine: PumpLine | null;
  filledFromPumpLine: string[];
  coreVersion: string;
  createdAt: string;
  replannedFromId: number | null;
  /** The newer plan that re-planned this one, if any. */
  replannedById: number | null;
  notes: PlanNote[];
}

export interface PlanSummary {
  id: number;
  deviceId: number;
  deviceName: string;
  fitId: number;
  fitVersion: number;
  activeFitId: number | null;
  activeFitVersion: number | null;
  stale: boolean;
  authorId: number | null;
  authorName: string;
  mode: PlanMode;
  targetPairRate: number | null;
  targetGainDb: number | null;
  operatingFluxPhi0: number;
  operatingBias: number | null;
  pumpFrequencyHz: number;
  pumpAmplitudePhi0: number;
  generatorPowerDbm: number | null;
  predictedPairRate: number;
  warningCodes: string[];
  noteCount: number;
  createdAt: string;
  replannedFromId: number | null;
  replannedById: number | null;
}

export interface PlanResponse {
  plan: Plan;
}
export interface PlanListResponse {
  plans: PlanSummary[];
}
export interface PlanNoteResponse {
  note: PlanNote;
}
export interface OperatingPointsResponse {
  ranking: RankResult;
  fit: { id: number; version: number };
  filledFromPumpLine: string[];
}

// ---------------------------------------------------------------------------------------------
// Batch comparison and spec windows

export const DEFAULT_COMPARE_PARAMS = ['f0_hz', 'gamma0', 'asymmetry', 'qi'] as const;
/** Derived parameters: median over the fit's good traces (flag null); null for fits without traces. */
export const DERIVED_PARAMS = ['qi', 'ql', 'qc'] as const;
/** Iglewicz & Hoaglin (1993): modified z-score M = 0.6745·(x − median)/MAD; |M| > 3.5 flags an outlier. */
export const ROBUST_Z_FACTOR = 0.6745;
export const ROBUST_Z_OUTLIER = 3.5;

const paramName = z
  .string()
  .trim()
  .regex(/^[a-z][a-z0-9_]{0,63}$/, { message: 'parameter names are lower-case keys such as f0_hz or gamma0' });
const idList = (what: string) =>
  z
    .string({ message: `expected ${what} as comma-separated ids` })
    .transform((s, ctx) => {
      const parts = s.split(',').map((x) => x.trim()).filter((x) => x !== '');
      const ids = parts.map(Number);
      const bad = parts.find((x, i) => !(Number.isInteger(ids[i]) && ids[i] > 0));
      if (bad !== undefined) {
        ctx.addIssue({ code: 'custom', message: `${what} must be positive whole-number ids, got '${bad}'` });
        return z.NEVER;
      }
      return [...new Set(ids)];
    });

export const batchCompareQuerySchema = z.object({
  /** Comma-separated; default f0_hz,gamma0,asymmetry,qi. */
  params: z
    .string({ message: 'expected params as comma-separated names' })
    .transform((s) => s.split(',').map((x) => x.trim()).filter((x) => x !== ''))
    .pipe(z.array(paramName).min(1, { message: 'name at least one parameter' }).max(20, { message: 'at most 20 parameters' }))
    .optional(),
  /** Comma-separated batch ids; default every batch of the lab. */
  batches: idList('batches').optional(),
});
export type BatchCompareQuery = z.infer<typeof batchCompareQuerySchema>;

export interface CompareDeviceValue {
  deviceId: number;
  deviceName: string;
  fitId: number;
  fitVersion: number;
  value: number;
  stderr: number | null;
  /** 0.6745·(x − median)/MAD within the batch; null when MAD = 0. */
  robustZ: number | null;
  outlier: boolean;
  /** Inside the parameter's spec window; null when there is none. */
  inSpec: boolean | null;
}

export interface CompareParamStats {
  count: number;
  mean: number | null;
  /** Sample standard deviation (n − 1); null below two values. */
  std: number | null;
  median: number | null;
  /** Median absolute deviation from the median (unscaled). */
  mad: number | null;
  min: number | null;
  max: number | null;
  devices: CompareDeviceValue[];
}

export interface CompareBatch {
  id: number;
  code: string;
  /** Devices of the batch with an accepted calibration (the ones compared). */
  count: number;
  /** All devices of the batch. */
  deviceCount: number;
  stats: Record<string, CompareParamStats>;
}

export interface SpecBounds {
  min: number | null;
  max: number | null;
}

export interface BatchCompareResponse {
  params: string[];
  units: Record<string, string>;
  specWindows: Record<string, SpecBounds>;
  batches: CompareBatch[];
}

export const specWindowParamSchema = z.object({ param: paramName });
export const specWindowRequestSchema = z
  .strictObject({
    min: finite('min').nullable(),
    max: finite('max').nullable(),
  })
  .refine((w) => w.min !== null || w.max !== null, { message: 'give min, max or both', path: ['min'] })
  .refine((w) => w.min === null || w.max === null || w.min <= w.max, { message: 'min must not exceed max', path: ['max'] });
export type SpecWindowRequest = z.infer<typeof specWindowRequestSchema>;

export interface SpecWindow extends SpecBounds {
  param: string;
  updatedBy: { id: number; name: string } | null;
  updatedAt: string;
}
export interface SpecWindowListResponse {
  specWindows: SpecWindow[];
}
export interface SpecWindowResponse {
  specWindow: SpecWindow;
}
