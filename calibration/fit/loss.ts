/**
 * Robust losses of the least-squares engine, ρ(z) with z = (r/fScale)² (definitions in
 * calibration/fit/types.ts, Loss). Exported so code that ranks fits by the cost the engine
 * minimises (the multi-start tuning fits) uses exactly the engine's function.
 */
import type { Loss } from './types';

export const LOSSES: readonly Loss[] = ['linear', 'soft_l1', 'huber', 'cauchy'];

/** ρ(z) of the robust loss (z = (r/fScale)²). */
export function rho(loss: Loss, z: number): number {
  switch (loss) {
    case 'linear':
      return z;
    case 'soft_l1':
      return 2 * (Math.sqrt(1 + z) - 1);
    case 'huber':
      return z <= 1 ? z : 2 * Math.sqrt(z) - 1;
    case 'cauchy':
      return Math.log1p(z);
  }
}

/** ρ′(z): the weight a residual gets in the reweighted problem. */
export function rhoPrime(loss: Loss, z: number): number {
  switch (loss) {
    case 'linear':
      return 1;
    case 'soft_l1':
      return 1 / Math.sqrt(1 + z);
    case 'huber':
      return z <= 1 ? 1 : 1 / Math.sqrt(z);
    case 'cauchy':
      return 1 / (1 + z);
  }
}

/** Robust cost ½·fScale²·Σρ((r/fScale)²), the quantity the engine minimises; Infinity for a non-finite residual. */
export function robustCost(residuals: ArrayLike<number>, loss: Loss, fScale: number): number {
  let c = 0;
  if (loss === 'linear') {
    for (let i = 0; i < residuals.length; i++) c += residuals[i] * residuals[i];
    return Number.isFinite(c) ? 0.5 * c : Infinity;
  }
  for (let i = 0; i < residuals.length; i++) {
    const u = residuals[i] / fScale;
    c += Number.isFinite(u) ? rho(loss, u * u) : Infinity;
  }
  return 0.5 * fScale * fScale * c;
}
