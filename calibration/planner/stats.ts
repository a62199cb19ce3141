/**
 * Small numerical helpers for the planner's uncertainty: a seeded PRNG, standard normals,
 * a hand-written Cholesky factorisation with a jitter fallback (mathjs has no Cholesky),
 * and percentiles.
 */

/** mulberry32: 32-bit state, period 2^32, fast and reproducible (public-domain generator). */
export function seededRandom(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

/** Standard normal deviates by the Box–Muller transform (both outputs used). */
export function normalSource(uniform: () => number): () => number {
  let spare: number | null = null;
  return () => {
    if (spare !== null) {
      const s = spare;
      spare = null;
      return s;
    }
    let u = 0;
    while (u <= 1e-300) u = uniform();
    const v = uniform();
    const r = Math.sqrt(-2 * Math.log(u));
    spare = r * Math.sin(2 * Math.PI * v);
    return r * Math.cos(2 * Math.PI * v);
  };
}

/** Lower-triangular L with A = L·Lᵀ, or null when A is not positive definite. */
export function cholesky(a: readonly (readonly number[])[]): number[][] | null {
  const n = a.length;
  const l = Array.from({ length: n }, () => new Array<number>(n).fill(0));
  for (let i = 0; i < n; i++) {
    for (let j = 0; j <= i; j++) {
      let s = a[i][j];
      for (let k = 0; k < j; k++) s -= l[i][k] * l[j][k];
      if (i === j) {
        if (!(s > 0)) return null;
        l[i][i] = Math.sqrt(s);
      } else {
        l[i][j] = s / l[j][j];
      }
    }
  }
  return l;
}

export interface CovarianceFactor {
  /** Lower-triangular factor of the covariance. */
  factor: number[][];
  /** 'cholesky' or 'cholesky+jitter' (diagonal jitter added to the correlation matrix). */
  method: 'cholesky' | 'cholesky+jitter';
  /** Relative jitter added to the correlation diagonal (0 when none). */
  jitter: number;
}

/**
 * Factor a covariance by Cholesky of its correlation matrix (scale-free, so Hz² and
 * dimensionless variances mix safely), retrying with jitter 1e-12 … 1e-3 on the diagonal.
 * Zero-variance rows are kept as zero rows (that parameter is not sampled).
 */
export function factorCovariance(cov: readonly (readonly number[])[]): CovarianceFactor | null {
  const n = cov.length;
  const sd = cov.map((row, i) => Math.sqrt(Math.max(row[i], 0)));
  const idx = sd.map((s, i) => (s > 0 && Number.isFinite(s) ? i : -1)).filter((i) => i >= 0);
  const corr = idx.map((i) => idx.map((j) => cov[i][j] / (sd[i] * sd[j])));
  for (const jitter of [0, 1e-12, 1e-10, 1e-8, 1e-6, 1e-4, 1e-3]) {
    const m = corr.map((row, i) => row.map((v, j) => (i === j ? v + jitter : v)));
    const l = cholesky(m);
    if (!l) continue;
    const factor = Array.from({ length: n }, () => new Array<number>(n).fill(0));
    idx.forEach((i, a) => idx.forEach((j, b) => { factor[i][j] = sd[i] * l[a][b]; }));
    return { factor, method: jitter === 0 ? 'cholesky' : 'cholesky+jitter', jitter };
  }
  return null;
}

/** Percentile with linear interpolation between order statistics (numpy's default 'linear'). */
export function percentile(sorted: readonly number[], p: number): number {
  if (sorted.length === 0) return NaN;
  const h = (sorted.length - 1) * (p / 100);
  const lo = Math.floor(h);
  const hi = Math.min(lo + 1, sorted.length - 1);
  return sorted[lo] + (h - lo) * (sorted[hi] - sorted[lo]);
}
