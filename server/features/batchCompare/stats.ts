// Summary statistics of one parameter across the devices of a batch. Pure functions.
import { ROBUST_Z_FACTOR, ROBUST_Z_OUTLIER } from '@/shared/api/planning';

export function mean(xs: readonly number[]): number | null {
  return xs.length ? xs.reduce((a, b) => a + b, 0) / xs.length : null;
}

/** Sample standard deviation (divisor n − 1); null below two values. */
export function sampleStd(xs: readonly number[]): number | null {
  if (xs.length < 2) return null;
  const m = mean(xs) as number;
  return Math.sqrt(xs.reduce((a, x) => a + (x - m) * (x - m), 0) / (xs.length - 1));
}

export function median(xs: readonly number[]): number | null {
  if (!xs.length) return null;
  const s = [...xs].sort((a, b) => a - b);
  const h = s.length >> 1;
  return s.length % 2 ? s[h] : (s[h - 1] + s[h]) / 2;
}

/** Median absolute deviation from the median (unscaled). */
export function mad(xs: readonly number[]): number | null {
  const m = median(xs);
  return m === null ? null : median(xs.map((x) => Math.abs(x - m)));
}

/**
 * Modified z-score of Iglewicz & Hoaglin (1993), "How to Detect and Handle Outliers", ASQC Basic
 * References in Quality Control vol. 16: M_i = 0.6745·(x_i − x̃)/MAD, outlier when |M_i| > 3.5.
 * Null when MAD = 0 (more than half the values equal): the score is undefined there.
 */
export function robustZ(x: number, med: number, madValue: number): number | null {
  return madValue > 0 ? (ROBUST_Z_FACTOR * (x - med)) / madValue : null;
}

export const isOutlier = (z: number | null) => z !== null && Math.abs(z) > ROBUST_Z_OUTLIER;
