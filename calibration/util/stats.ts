/**
 * Robust statistics shared by the per-trace extraction (resonator/) and the tuning fits (tuning/).
 */

/** 1.4826: MAD → standard deviation for Gaussian data (common practice). */
export const MAD_TO_SIGMA = 1.4826;

/** Median by quickselect (O(n)); reorders `a`. 0 for an empty array. */
export function medianInPlace(a: Float64Array): number {
  const n = a.length;
  if (n === 0) return 0;
  const select = (k: number): number => {
    let lo = 0;
    let hi = n - 1;
    while (hi > lo) {
      const pivot = a[(lo + hi) >> 1];
      let i = lo;
      let j = hi;
      while (i <= j) {
        while (a[i] < pivot) i++;
        while (a[j] > pivot) j--;
        if (i <= j) {
          const t = a[i];
          a[i] = a[j];
          a[j] = t;
          i++;
          j--;
        }
      }
      if (k <= j) hi = j;
      else if (k >= i) lo = i;
      else return a[k];
    }
    return a[k];
  };
  const m = n >> 1;
  if (n % 2) return select(m);
  const upper = select(m);
  // after select(m) every element left of m is ≤ a[m]: the lower middle is their maximum
  let lower = -Infinity;
  for (let i = 0; i < m; i++) if (a[i] > lower) lower = a[i];
  return 0.5 * (lower + upper);
}

/** Median of the values (not modified). 0 for none. */
export function median(values: ArrayLike<number>): number {
  return medianInPlace(Float64Array.from(values));
}

/** Median absolute deviation from the median; overwrites `a` (pass a copy). */
export function madInPlace(a: Float64Array): number {
  const m = medianInPlace(a);
  for (let k = 0; k < a.length; k++) a[k] = Math.abs(a[k] - m);
  return medianInPlace(a);
}

/** 1.4826·MAD: the standard deviation of Gaussian data, insensitive to a few outliers (common practice). */
export function robustSigma(values: ArrayLike<number>): number {
  return MAD_TO_SIGMA * madInPlace(Float64Array.from(values));
}

/**
 * White-noise σ of a smooth sampled sequence from its second differences: for white noise σ,
 * y[i+1] − 2y[i] + y[i−1] has standard deviation σ·√6, so σ = 1.4826·MAD/√6. The MAD is taken
 * about the median, which removes a slowly varying curvature; strong curvature still inflates it
 * (an upper bound). `at` lists the centre indices to use (1 … n−2); default all.
 */
export function secondDifferenceSigma(y: ArrayLike<number>, at?: ArrayLike<number>): number {
  const count = at ? at.length : Math.max(y.length - 2, 0);
  if (count === 0) return 0;
  const d = new Float64Array(count);
  for (let k = 0; k < count; k++) {
    const i = at ? at[k] : k + 1;
    d[k] = y[i + 1] - 2 * y[i] + y[i - 1];
  }
  return (MAD_TO_SIGMA / Math.sqrt(6)) * madInPlace(d);
}
