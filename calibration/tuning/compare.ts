/**
 * Model comparison for a tuning curve: exact vs approx, asymmetric vs symmetric SQUID, by AIC and
 * BIC as the engine defines them (n ln(χ²/n) + 2k, n ln(χ²/n) + k ln n; lmfit's convention).
 * All four fits share one σ per point (the given σ, or the robust σ of the reference fit,
 * exact + asymmetric), so χ² and therefore AIC/BIC differences are comparable. Points the
 * reference fit flags as outliers are left out of all four, so a few spurious picks do not decide
 * the comparison. Rule of thumb (common practice): ΔAIC > 10 is strong evidence against a model.
 */
import type { TuningModel } from '../squid/model';
import { fitTuningCurve, TuningFitOptions, TuningPoint } from './fitTuning';

export interface ModelComparisonRow {
  model: TuningModel;
  symmetric: boolean;
  nvarys: number;
  ndata: number;
  chisqr: number;
  redchi: number;
  aic: number;
  bic: number;
  /** aic − min aic over the table */
  delta_aic: number;
  delta_bic: number;
  success: boolean;
  message: string;
}

export function compareTuningModels(points: readonly TuningPoint[], options: TuningFitOptions = {}): ModelComparisonRow[] {
  const ref = fitTuningCurve(points, { ...options, model: 'exact', symmetric: false });
  const keep = points.filter((_, i) => !ref.outliers.includes(i));
  const sigma = ref.derived.noise_hz > 0 ? ref.derived.noise_hz : 1;
  const pts = keep.map((p) => ({ bias: p.bias, frHz: p.frHz, sigmaHz: p.sigmaHz ?? sigma }));
  const rows: ModelComparisonRow[] = [];
  for (const model of ['exact', 'approx'] as const) {
    for (const symmetric of [false, true]) {
      const r = fitTuningCurve(pts, { ...options, model, symmetric });
      const f = r.fit;
      rows.push({
        model, symmetric, nvarys: f?.nvarys ?? 0, ndata: f?.ndata ?? pts.length,
        chisqr: f?.chisqr ?? NaN, redchi: f?.redchi ?? NaN, aic: f?.aic ?? NaN, bic: f?.bic ?? NaN,
        delta_aic: 0, delta_bic: 0, success: r.success, message: r.message,
      });
    }
  }
  const finiteOr = (v: number) => (Number.isFinite(v) ? v : Infinity);
  const minA = Math.min(...rows.map((r) => finiteOr(r.aic)));
  const minB = Math.min(...rows.map((r) => finiteOr(r.bic)));
  for (const r of rows) {
    r.delta_aic = Number.isFinite(r.aic) ? r.aic - minA : Number.MAX_VALUE;
    r.delta_bic = Number.isFinite(r.bic) ? r.bic - minB : Number.MAX_VALUE;
    if (!Number.isFinite(r.chisqr)) { r.chisqr = 0; r.redchi = 0; r.aic = 0; r.bic = 0; }
  }
  return rows;
}
