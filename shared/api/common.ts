import { z } from 'zod';

/** The three lab roles; order is not a hierarchy (each route lists who may call it). */
export const ROLES = ['lab_lead', 'device_engineer', 'experimentalist'] as const;
export const roleSchema = z.enum(ROLES);
export type Role = z.infer<typeof roleSchema>;

export const ERROR_CODES = [
  'VALIDATION_FAILED',
  'UNAUTHENTICATED',
  'FORBIDDEN',
  'NOT_FOUND',
  'CONFLICT',
  'PAYLOAD_TOO_LARGE',
  'RATE_LIMITED',
  'INTERNAL',
  // Calibration routes (shared/api/calibration.ts): a sweep file the parser refuses (details.issues
  // with file/row/column), a device without an accepted fit, two fits with no parameter in common.
  'SWEEP_INVALID',
  'NO_ACTIVE_CALIBRATION',
  'NOT_COMPARABLE',
  // Planning routes (shared/api/planning.ts): a target the planner core refuses (above threshold, …).
  'PLAN_REFUSED',
] as const;
export type ErrorCode = (typeof ERROR_CODES)[number];

/** One field problem in a 400 VALIDATION_FAILED answer; path is dotted, e.g. "body.email". */
export interface ValidationIssue {
  path: string;
  message: string;
}

/** Every non-2xx answer from /api has this shape. */
export interface ApiErrorBody {
  error: { code: ErrorCode | string; message: string; details?: unknown };
}

/** Calendar date as the lab writes it (fabrication day, cooldown start): YYYY-MM-DD. */
export const calendarDateSchema = z.iso.date({ message: 'expected a date as YYYY-MM-DD' });

/** Positive numeric path parameter such as /api/devices/:id. */
export const idParamSchema = z.object({
  id: z.coerce
    .number({ message: 'expected a numeric id' })
    .int({ message: 'expected a whole-number id' })
    .positive({ message: 'expected a positive id' }),
});

export const emailSchema = z
  .string({ message: 'expected an e-mail address' })
  .trim()
  .toLowerCase()
  .pipe(z.email({ message: 'expected an e-mail address like name@example.org' }).max(254));

/** bcrypt reads at most 72 bytes, so longer passwords would be silently truncated: refuse them. */
export const newPasswordSchema = z
  .string({ message: 'expected a password' })
  .min(10, { message: 'password must have at least 10 characters' })
  .refine((p) => new TextEncoder().encode(p).length <= 72, {
    message: 'password must be at most 72 bytes (UTF-8)',
  });

export const personNameSchema = z
  .string({ message: 'expected a name' })
  .trim()
  .min(1, { message: 'name must not be empty' })
  .max(120, { message: 'name must be at most 120 characters' });

export interface HealthResponse {
  ok: true;
  version: string;
}
