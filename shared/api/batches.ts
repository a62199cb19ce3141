import { z } from 'zod';
import { calendarDateSchema } from './common';

const optionalText = (max: number, what: string) =>
  z
    .string({ message: `expected ${what} as text` })
    .trim()
    .max(max, { message: `${what} must be at most ${max} characters` })
    .optional();

export const createBatchSchema = z.object({
  code: z
    .string({ message: 'expected a batch code' })
    .trim()
    .min(1, { message: 'code must not be empty' })
    .max(64, { message: 'code must be at most 64 characters' }),
  wafer: optionalText(64, 'wafer'),
  processNotes: optionalText(4000, 'processNotes'),
  fabricatedOn: calendarDateSchema.optional(),
});
export type CreateBatchRequest = z.infer<typeof createBatchSchema>;

export interface FabBatch {
  id: number;
  code: string;
  wafer: string | null;
  processNotes: string | null;
  /** YYYY-MM-DD */
  fabricatedOn: string | null;
  deviceCount: number;
}
export interface BatchListResponse {
  batches: FabBatch[];
}
export interface BatchResponse {
  batch: FabBatch;
}
