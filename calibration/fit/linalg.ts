/**
 * Small dense linear algebra for the least-squares engine: symmetric positive-definite
 * systems of a handful of unknowns (the normal equations of a fit with 2-10 parameters).
 * Hand-written Cholesky on Float64Array: a 5×5 solve costs well under a microsecond,
 * where a general library would allocate matrices on every call.
 *
 * Matrices are square, row-major Float64Array of length n*n.
 */

/**
 * Cholesky factorisation A = L·Lᵀ in place: the lower triangle (diagonal included) of `a`
 * is overwritten by L; the strict upper triangle is left untouched and never read.
 * The matrix is first brought to unit diagonal (symmetric Jacobi scaling) so that the
 * pivot test is independent of the parameters' units; `scale` receives the factors
 * (a_ij = s_i s_j â_ij), so solve with choleskySolve(a, n, b, scale).
 *
 * Returns false when a pivot of the scaled matrix is not above `pivotTol` (not positive
 * definite to that relative precision) or a diagonal entry is not positive and finite.
 */
export function choleskyDecompose(a: Float64Array, n: number, scale: Float64Array, pivotTol = 0): boolean {
  for (let i = 0; i < n; i++) {
    const d = a[i * n + i];
    if (!(d > 0) || !Number.isFinite(d)) return false;
    scale[i] = Math.sqrt(d);
  }
  for (let i = 0; i < n; i++) {
    for (let j = 0; j <= i; j++) a[i * n + j] /= scale[i] * scale[j];
  }
  for (let j = 0; j < n; j++) {
    let d = a[j * n + j];
    for (let k = 0; k < j; k++) d -= a[j * n + k] * a[j * n + k];
    if (!(d > pivotTol) || !Number.isFinite(d)) return false;
    const ljj = Math.sqrt(d);
    a[j * n + j] = ljj;
    for (let i = j + 1; i < n; i++) {
      let s = a[i * n + j];
      for (let k = 0; k < j; k++) s -= a[i * n + k] * a[j * n + k];
      a[i * n + j] = s / ljj;
    }
  }
  return true;
}

/** Solves A x = b in place (b becomes x) from the factor written by choleskyDecompose. */
export function choleskySolve(l: Float64Array, n: number, b: Float64Array, scale: Float64Array): void {
  for (let i = 0; i < n; i++) b[i] /= scale[i];
  // L y = b
  for (let i = 0; i < n; i++) {
    let s = b[i];
    for (let k = 0; k < i; k++) s -= l[i * n + k] * b[k];
    b[i] = s / l[i * n + i];
  }
  // Lᵀ x = y
  for (let i = n - 1; i >= 0; i--) {
    let s = b[i];
    for (let k = i + 1; k < n; k++) s -= l[k * n + i] * b[k];
    b[i] = s / l[i * n + i];
  }
  for (let i = 0; i < n; i++) b[i] /= scale[i];
}

/**
 * Inverse of a symmetric positive-definite matrix, or null when it is singular to the
 * relative precision `pivotTol` (pivots of the unit-diagonal scaled matrix) or not finite.
 * The input is not modified.
 */
export function invertSymmetricPositiveDefinite(a: Float64Array, n: number, pivotTol = 1e-13): Float64Array | null {
  const l = Float64Array.from(a);
  const scale = new Float64Array(n);
  if (!choleskyDecompose(l, n, scale, pivotTol)) return null;
  const inv = new Float64Array(n * n);
  const col = new Float64Array(n);
  for (let j = 0; j < n; j++) {
    col.fill(0);
    col[j] = 1;
    choleskySolve(l, n, col, scale);
    for (let i = 0; i < n; i++) inv[i * n + j] = col[i];
  }
  // Symmetrise against rounding so correlations are exactly symmetric.
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < i; j++) {
      const m = 0.5 * (inv[i * n + j] + inv[j * n + i]);
      inv[i * n + j] = m;
      inv[j * n + i] = m;
    }
  }
  for (let i = 0; i < n * n; i++) if (!Number.isFinite(inv[i])) return null;
  return inv;
}
