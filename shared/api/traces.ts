/**
 * GET /api/fits/:id/traces/:index → TraceViewResponse (server/features/traces).
 * One raw trace of a raw-complex or Touchstone fit, re-read from the stored sweep bytes, with the
 * per-trace resonance fit evaluated on its frequencies. `index` is 0-based into the fit's
 * calibration `traces` (the sweep's trace order).
 */
import { z } from 'zod';

export const traceParamsSchema = z.object({
  id: z.coerce.number({ message: 'expected a numeric fit id' }).int().positive({ message: 'expected a positive fit id' }),
  index: z.coerce.number({ message: 'expected a numeric trace index' }).int().min(0, { message: 'trace index starts at 0' }),
});

export interface TraceExtractionSummary {
  frHz: number | null;
  ql: number | null;
  /** |Q_c| (notch) or Q_c (reflection). */
  qcAbs: number | null;
  qi: number | null;
  phiRad: number | null;
  a: number | null;
  alphaRad: number | null;
  delayS: number | null;
  snr: number | null;
  /** The data were conjugated before fitting (counter-clockwise circle). */
  conjugated: boolean;
  flag: null | 'no_resonance' | 'low_snr' | 'fit_failed';
  reason: string | null;
}

export interface TraceView {
  index: number;
  /** Traces in the fit. */
  count: number;
  bias: number;
  biasUnit: string;
  geometry: 'notch' | 'reflection';
  file: string | null;
  rows: [number, number] | null;
  freqHz: number[];
  /** Measured S as stored. */
  re: number[];
  im: number[];
  /** Fitted response on the same frequencies, same frame as re/im; null without a resonance. */
  model: { re: number[]; im: number[] } | null;
  /**
   * Measured and fitted S with the cable delay removed (S·e^{+2πifτ}, conjugated first when the
   * fit conjugated the data): the frame in which the resonance is the circle `circle`.
   */
  delayRemoved: { re: number[]; im: number[]; model: { re: number[]; im: number[] } | null };
  circle: { xc: number; yc: number; r: number } | null;
  extraction: TraceExtractionSummary;
}

export interface TraceViewResponse {
  trace: TraceView;
}
