/**
 * Algebraic circle fit in the complex plane.
 *
 * Pratt's constrained algebraic fit: minimise Σ (A z_i + B x_i + C y_i + D)² with z = x² + y²
 * subject to B² + C² − 4AD = 1. Probst et al., Rev. Sci. Instrum. 86, 024706 (2015) use this
 * constraint for resonator circles; the 4×4 generalised eigenproblem M·a = η·B·a reduces, on
 * centred data, to the smallest non-negative root of a quartic-like characteristic polynomial that
 * Newton's method reaches from η = 0 (N. Chernov, "Circular and Linear Regression", CRC 2010,
 * Pratt fit by Newton iteration [from memory]). O(N), no matrix library needed: this runs inside
 * the cable-delay search dozens of times per trace.
 */

export interface Circle {
  xc: number;
  yc: number;
  r: number;
}

export interface CircleFit extends Circle {
  /** Root-mean-square geometric distance of the points from the circle. */
  rmsDistance: number;
}

/**
 * Fits a circle to the points (x_i, y_i), i in [0, n). Returns null when the points are
 * degenerate (fewer than 3, all equal, or collinear to working precision).
 */
export function fitCirclePratt(x: ArrayLike<number>, y: ArrayLike<number>, n = x.length): CircleFit | null {
  if (n < 3) return null;
  let xm = 0;
  let ym = 0;
  for (let i = 0; i < n; i++) {
    xm += x[i];
    ym += y[i];
  }
  xm /= n;
  ym /= n;
  let mxx = 0, myy = 0, mxy = 0, mxz = 0, myz = 0, mzz = 0;
  for (let i = 0; i < n; i++) {
    const xi = x[i] - xm;
    const yi = y[i] - ym;
    const zi = xi * xi + yi * yi;
    mxy += xi * yi;
    mxx += xi * xi;
    myy += yi * yi;
    mxz += xi * zi;
    myz += yi * zi;
    mzz += zi * zi;
  }
  mxx /= n; myy /= n; mxy /= n; mxz /= n; myz /= n; mzz /= n;
  const mz = mxx + myy;
  if (!(mz > 0)) return null;
  // Scale moments by the spread so the Newton tolerances are dimensionless.
  const s = mz;
  const sxx = mxx / s, syy = myy / s, sxy = mxy / s;
  const sxz = mxz / (s * Math.sqrt(s)), syz = myz / (s * Math.sqrt(s)), szz = mzz / (s * s);
  const smz = 1;
  const covXY = sxx * syy - sxy * sxy;
  const var2 = sxz * sxz + syz * syz;
  // det(M − ηB) on centred, scaled moments: A0 + A1 η + A2 η² + 4 η⁴ (the cubic term vanishes).
  const a2 = 4 * covXY - 3 * smz * smz - szz;
  const a1 = szz * smz + 4 * covXY * smz - var2 - smz * smz * smz;
  const a0 = sxz * sxz * syy + syz * syz * sxx - szz * covXY - 2 * sxz * syz * sxy + smz * smz * covXY;
  let eta = 0;
  let pOld = Infinity;
  for (let it = 0; it < 50; it++) {
    const p = a0 + eta * (a1 + eta * (a2 + 4 * eta * eta));
    if (Math.abs(p) > Math.abs(pOld)) {
      // Newton diverging: fall back to the Kåsa-like root η = 0.
      eta = 0;
      break;
    }
    pOld = p;
    const dp = a1 + eta * (2 * a2 + 16 * eta * eta);
    if (dp === 0) break;
    const etaNew = eta - p / dp;
    if (!Number.isFinite(etaNew)) break;
    const done = Math.abs(etaNew - eta) <= 1e-14 * Math.max(1, Math.abs(etaNew));
    eta = etaNew;
    if (done) break;
  }
  if (!(eta >= 0)) eta = 0;
  const det = eta * eta - eta * smz + covXY;
  if (!(Math.abs(det) > 1e-300)) return null;
  const cxs = (sxz * (syy - eta) - syz * sxy) / det / 2;
  const cys = (syz * (sxx - eta) - sxz * sxy) / det / 2;
  const rs = Math.sqrt(cxs * cxs + cys * cys + smz + 2 * eta);
  const sc = Math.sqrt(s);
  const xc = xm + cxs * sc;
  const yc = ym + cys * sc;
  const r = rs * sc;
  if (!Number.isFinite(xc) || !Number.isFinite(yc) || !(r > 0) || !Number.isFinite(r)) return null;
  let ss = 0;
  for (let i = 0; i < n; i++) {
    const dx = x[i] - xc;
    const dy = y[i] - yc;
    const d = Math.sqrt(dx * dx + dy * dy) - r;
    ss += d * d;
  }
  return { xc, yc, r, rmsDistance: Math.sqrt(ss / n) };
}
