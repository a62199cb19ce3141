import { z } from 'zod';
import type { ActiveCalibrationSummary } from './calibration';
import { calendarDateSchema } from './common';

/** quarter_wave: λ/4 resonator shorted by the SQUID; phase_only: long line used as a tunable phase element. */
export const GEOMETRIES = ['quarter_wave', 'phase_only'] as const;
export const geometrySchema = z.enum(GEOMETRIES, { message: 'geometry must be quarter_wave or phase_only' });
export type Geometry = z.infer<typeof geometrySchema>;

export const CALIBRATION_STATUSES = ['none', 'proposed', 'accepted'] as const;
export type CalibrationStatus = (typeof CALIBRATION_STATUSES)[number];

const positive = (what: string, unit: string, max: number) =>
  z
    .number({ message: `expected ${what} as a number in ${unit}` })
    .positive({ message: `${what} must be positive (${unit})` })
    .max(max, { message: `${what} must be at most ${max} ${unit}` });

export const createDeviceSchema = z.object({
  name: z
    .string({ message: 'expected a device name' })
    .trim()
    .min(1, { message: 'name must not be empty' })
    .max(64, { message: 'name must be at most 64 characters' }),
  batchId: z.number({ message: 'expected batchId as a number' }).int().positive(),
  chipPosition: z.string({ message: 'expected chipPosition as text' }).trim().max(32).optional(),
  geometry: geometrySchema,
  // Bounds are sanity limits, not physics: CPW impedances are tens of ohms, resonances GHz, loop inductances pH.
  designZ0Ohm: positive('designZ0Ohm', 'ohm', 1000).optional(),
  designFrequencyHz: positive('designFrequencyHz', 'Hz', 1e12).optional(),
  loopInductanceH: positive('loopInductanceH', 'H', 1e-6).optional(),
});
export type CreateDeviceRequest = z.infer<typeof createDeviceSchema>;

export const deviceListQuerySchema = z.object({
  search: z.string().trim().max(100).optional(),
  /** Batch id (digits) or batch code. */
  batch: z.string().trim().max(64).optional(),
});
export type DeviceListQuery = z.infer<typeof deviceListQuerySchema>;

export interface Device {
  id: number;
  name: string;
  batchId: number;
  batchCode: string;
  chipPosition: string | null;
  geometry: Geometry;
  designZ0Ohm: number | null;
  designFrequencyHz: number | null;
  loopInductanceH: number | null;
  /** From the device's fits: 'accepted' when one is active, else 'proposed' when one waits for review. */
  calibrationStatus: CalibrationStatus;
  /** The accepted fit in brief; the full JSON is GET /api/devices/:id/calibration. */
  activeCalibration: ActiveCalibrationSummary | null;
}

export const createCooldownSchema = z.object({
  startedOn: calendarDateSchema,
  fridge: z
    .string({ message: 'expected the fridge name' })
    .trim()
    .min(1, { message: 'fridge must not be empty' })
    .max(64, { message: 'fridge must be at most 64 characters' }),
  notes: z.string({ message: 'expected notes as text' }).trim().max(4000).optional(),
});
export type CreateCooldownRequest = z.infer<typeof createCooldownSchema>;

export interface Cooldown {
  id: number;
  deviceId: number;
  /** YYYY-MM-DD */
  startedOn: string;
  fridge: string;
  notes: string | null;
  createdAt: string;
}

export interface DeviceListResponse {
  devices: Device[];
}
export interface DeviceResponse {
  device: Device;
}
export interface DeviceDetailResponse {
  device: Device;
  cooldowns: Cooldown[];
}
export interface CooldownResponse {
  cooldown: Cooldown;
}
