/**
 * Generic bounded, robust Levenberg–Marquardt least squares.
 *
 * Algorithm
 * - Gauss–Newton model with Marquardt scaling: solve (JᵀJ + λ·D) δ = −Jᵀr, D = running maximum
 *   of diag(JᵀJ) (as in MINPACK, which makes the iteration invariant to the parameters' units).
 *   λ follows Nielsen's gain-ratio rule (accept: λ·max(1/3, 1−(2ρ−1)³); reject: λ·ν, ν doubles).
 * - Jacobian: analytic when given, else forward differences with step diffStep·max(|p|, diffScale),
 *   taken backwards when the forward point would leave the bounds.
 * - Bounds: projected steps with an active set, not the MINUIT/lmfit sin transform. Reasons:
 *   the optimum can sit exactly on a bound (reported as atBound) instead of approaching it
 *   asymptotically; the Jacobian and covariance are in the user's own parameters (no transform
 *   derivative that vanishes at the bound); the LM path inside the box is the unconstrained one.
 *   A parameter on a bound whose gradient pushes outward is held; the step of the others is
 *   solved, and any held-on-bound parameter the solution would push outward is held too.
 * - Robust loss (soft_l1, huber, cauchy): cost = ½ Σ fScale²·ρ((r/fScale)²). Each iteration
 *   scales residuals and Jacobian rows by √ρ′(z) (iteratively reweighted least squares); the
 *   gradient of that model equals the true gradient of the robust cost, so the fixed point is
 *   the robust optimum, and steps are accepted on the true robust cost.
 *
 * Statistics (lmfit's documented definitions)
 * - chisqr = Σ r² of the plain weighted residuals, redchi = chisqr / max(1, ndata − nvarys),
 *   aic = n ln(χ²/n) + 2k, bic = n ln(χ²/n) + ln(n)·k with χ² floored at 1e-250·n inside the log.
 * - covariance = (JᵀJ)⁻¹·redchi at the solution (lmfit scale_covar, curve_fit absolute_sigma=False),
 *   with J and redchi of the plain (un-robust) residuals even for a robust loss: the robust loss is
 *   used to find the point, the error bars are those of ordinary least squares there. This is a
 *   choice: the robust alternative (scaled Jacobian, robust cost) is what curve_fit would give.
 *   Parameters on a bound stay in the matrix (as curve_fit does) but their stderr is null.
 *
 * - With a numeric Jacobian the columns are re-derived at the solution with a 16× smaller step; a
 *   column that changes by > 5% (a step far off the parameter's scale) turns success to false,
 *   since such a Jacobian makes the iteration stall where ftol/xtol would call it converged.
 *
 * Failures never throw: invalid input, non-finite start, under-determined problems and
 * non-convergence give success=false with a message; values are the last finite point.
 * All parameters fixed: the statistics are evaluated at the given values, success=true.
 */
import { choleskyDecompose, choleskySolve, invertSymmetricPositiveDefinite } from './linalg';
import { LOSSES, rhoPrime, robustCost } from './loss';
import type {
  FitResult,
  FittedParameter,
  JacobianFunction,
  LeastSquaresOptions,
  Loss,
  ParameterSpec,
  ResidualFunction,
} from './types';

const EPS = 2.220446049250313e-16;

/** Defaults; tighter than scipy's 1e-8 so the returned point agrees with references to ~1e-8. */
export const LEAST_SQUARES_DEFAULTS = {
  ftol: 1e-10,
  xtol: 1e-10,
  gtol: 1e-10,
  diffStep: Math.sqrt(EPS),
  fScale: 1,
} as const;

/** Pivot tolerance of the unit-diagonal JᵀJ when inverting for the covariance (≈ correlation 1 − 5e-14). */
const COVARIANCE_PIVOT_TOL = 1e-13;
const LAMBDA_INITIAL = 1e-3;
/** Relative change of a finite-difference column, step h vs h/16, above which the Jacobian is called unreliable. */
const JACOBIAN_CONSISTENCY = 0.05;
const LAMBDA_MAX = 1e30;
/**
 * Floor of the damping. Long runs of very successful steps shrink λ by 3 each time; without a
 * floor it underflows to 0, and 0·ν stays 0, so a singular JᵀJ (a flat direction, e.g. a parameter
 * entering only as its square, sitting at 0) could never be damped again and the loop would spin.
 */
const LAMBDA_MIN = 1e-20;

function sumSquares(r: Float64Array): number {
  let c = 0;
  for (let i = 0; i < r.length; i++) c += r[i] * r[i];
  return c;
}

function statistics(chisqr: number, ndata: number, nvarys: number): { redchi: number; aic: number; bic: number } {
  if (!(ndata > 0) || !Number.isFinite(chisqr)) return { redchi: Infinity, aic: Infinity, bic: Infinity };
  const redchi = chisqr / Math.max(1, ndata - nvarys);
  const neg2LogLikelihood = ndata * Math.log(Math.max(chisqr, 1e-250 * ndata) / ndata);
  return { redchi, aic: neg2LogLikelihood + 2 * nvarys, bic: neg2LogLikelihood + Math.log(ndata) * nvarys };
}

function errorText(e: unknown): string {
  return e instanceof Error ? e.message : String(e);
}

type Evaluation = { ok: true; r: Float64Array } | { ok: false; why: string };

interface Prepared {
  names: string[];
  initial: Float64Array;
  start: Float64Array;
  lower: Float64Array;
  upper: Float64Array;
  vary: boolean[];
  diffFloor: Float64Array;
}

/** Checks the parameter table; returns a message naming the offending parameter when it is invalid. */
function prepare(params: readonly ParameterSpec[]): Prepared | string {
  if (!Array.isArray(params) || params.length === 0) return 'no parameters given';
  const m = params.length;
  const p: Prepared = {
    names: [],
    initial: new Float64Array(m),
    start: new Float64Array(m),
    lower: new Float64Array(m),
    upper: new Float64Array(m),
    vary: [],
    diffFloor: new Float64Array(m),
  };
  const seen = new Set<string>();
  for (let i = 0; i < m; i++) {
    const s = params[i];
    const where = `parameter ${i} (${s && typeof s.name === 'string' ? `"${s.name}"` : 'unnamed'})`;
    if (!s || typeof s.name !== 'string' || s.name.length === 0) return `${where}: missing name`;
    if (seen.has(s.name)) return `${where}: duplicate name`;
    seen.add(s.name);
    const lo = s.min ?? -Infinity;
    const hi = s.max ?? Infinity;
    if (typeof s.value !== 'number' || !Number.isFinite(s.value)) return `${where}: value ${s.value} is not a finite number`;
    if (typeof lo !== 'number' || Number.isNaN(lo) || lo === Infinity) return `${where}: min ${lo} is not a number below +Infinity`;
    if (typeof hi !== 'number' || Number.isNaN(hi) || hi === -Infinity) return `${where}: max ${hi} is not a number above -Infinity`;
    if (lo > hi) return `${where}: min ${lo} is greater than max ${hi}`;
    if (s.diffScale !== undefined && !(s.diffScale > 0 && Number.isFinite(s.diffScale))) {
      return `${where}: diffScale ${s.diffScale} must be a positive finite number`;
    }
    p.names.push(s.name);
    p.initial[i] = s.value;
    // A start outside the bounds is moved onto the nearest bound (lmfit does the same).
    p.start[i] = Math.min(hi, Math.max(lo, s.value));
    p.lower[i] = lo;
    p.upper[i] = hi;
    // min == max leaves nothing to vary.
    p.vary.push(s.vary !== false && lo < hi);
    const span = hi - lo;
    p.diffFloor[i] =
      s.diffScale ?? (s.value !== 0 ? 1e-3 * Math.abs(s.value) : Number.isFinite(span) ? 1e-3 * span : 1);
  }
  return p;
}

function checkOptions(o: LeastSquaresOptions): string | null {
  if (o.loss !== undefined && !LOSSES.includes(o.loss)) return `option loss "${o.loss}" is not one of ${LOSSES.join(', ')}`;
  const positive: [string, number | undefined][] = [
    ['fScale', o.fScale],
    ['diffStep', o.diffStep],
  ];
  for (const [k, v] of positive) if (v !== undefined && !(v > 0 && Number.isFinite(v))) return `option ${k} = ${v} must be a positive finite number`;
  const nonNegative: [string, number | undefined][] = [
    ['ftol', o.ftol],
    ['xtol', o.xtol],
    ['gtol', o.gtol],
    ['maxIterations', o.maxIterations],
  ];
  for (const [k, v] of nonNegative) if (v !== undefined && !(v >= 0 && Number.isFinite(v))) return `option ${k} = ${v} must be a finite number ≥ 0`;
  return null;
}

/**
 * Minimises ½ Σ fScale²·ρ((r_i/fScale)²) over the varying parameters within their bounds.
 * `residual` returns weighted residuals (data − model)/σ; `jacobian`, when given, returns
 * ∂r_i/∂p_j for the varying parameters (rows = residuals, columns in `varyingNames` order).
 */
export function leastSquares(
  residual: ResidualFunction,
  params: ParameterSpec[],
  options: LeastSquaresOptions = {},
  jacobian?: JacobianFunction,
): FitResult {
  const loss: Loss = options.loss ?? 'linear';
  const prepared = prepare(params);
  const optionProblem = checkOptions(options);
  if (typeof prepared === 'string' || optionProblem !== null) {
    return invalidInput(params, loss, typeof prepared === 'string' ? prepared : (optionProblem as string));
  }
  const P = prepared;
  const fScale = options.fScale ?? LEAST_SQUARES_DEFAULTS.fScale;
  const ftol = options.ftol ?? LEAST_SQUARES_DEFAULTS.ftol;
  const xtol = options.xtol ?? LEAST_SQUARES_DEFAULTS.xtol;
  const gtol = options.gtol ?? LEAST_SQUARES_DEFAULTS.gtol;
  const diffStep = options.diffStep ?? LEAST_SQUARES_DEFAULTS.diffStep;
  const computeCovariance = options.computeCovariance !== false;

  const m = P.names.length;
  const varyIdx: number[] = [];
  for (let i = 0; i < m; i++) if (P.vary[i]) varyIdx.push(i);
  const k = varyIdx.length;
  const varyingNames = varyIdx.map((i) => P.names[i]);
  const maxIterations = Math.floor(options.maxIterations ?? 200 * (k + 1));
  const lo = Float64Array.from(varyIdx, (i) => P.lower[i]);
  const hi = Float64Array.from(varyIdx, (i) => P.upper[i]);
  const floor = Float64Array.from(varyIdx, (i) => P.diffFloor[i]);

  let nfev = 0;
  let njev = 0;
  let ndata = -1;
  const full = Float64Array.from(P.start);

  const record = (x: Float64Array): Record<string, number> => {
    for (let j = 0; j < k; j++) full[varyIdx[j]] = x[j];
    const o: Record<string, number> = {};
    for (let i = 0; i < m; i++) o[P.names[i]] = full[i];
    return o;
  };

  const evaluate = (x: Float64Array): Evaluation => {
    nfev++;
    let out: ArrayLike<number>;
    try {
      out = residual(record(x));
    } catch (e) {
      return { ok: false, why: `the residual function threw: ${errorText(e)}` };
    }
    if (!out || typeof out.length !== 'number') return { ok: false, why: 'the residual function did not return an array' };
    if (ndata >= 0 && out.length !== ndata) {
      return { ok: false, why: `the residual function returned ${out.length} values instead of ${ndata}` };
    }
    const r = Float64Array.from(out);
    for (let i = 0; i < r.length; i++) {
      // Float64Array.from turns non-numbers into NaN, so one finiteness test covers both.
      if (!Number.isFinite(r[i])) return { ok: false, why: `residual ${i} is ${out[i]}` };
    }
    return { ok: true, r };
  };

  // ---- start point
  let x = Float64Array.from(varyIdx, (i) => P.start[i]);
  const first = evaluate(x);
  if (!first.ok) {
    return finish({ x, r: null, converged: false, message: `residuals are not finite at the initial parameters: ${first.why}`, iterations: 0, jac: null });
  }
  ndata = first.r.length;
  if (ndata === 0) return finish({ x, r: first.r, converged: false, message: 'the residual function returned no residuals', iterations: 0, jac: null });
  if (k === 0) {
    return finish({ x, r: first.r, converged: true, message: 'no varying parameters: statistics evaluated at the given values', iterations: 0, jac: null });
  }
  if (ndata < k) {
    return finish({
      x,
      r: first.r,
      converged: false,
      message: `fewer residuals (${ndata}) than varying parameters (${k}): the fit is under-determined`,
      iterations: 0,
      jac: null,
    });
  }

  const n = ndata;

  /** Plain Jacobian at x, column-major (column j = ∂r/∂x_j, length n); a string says why it failed. */
  const computeJacobian = (xv: Float64Array, r: Float64Array, stepFactor = 1, numericOnly = false): Float64Array | string => {
    njev++;
    if (jacobian && !numericOnly) {
      let rows: number[][] | Float64Array;
      try {
        rows = jacobian(record(xv), varyingNames);
      } catch (e) {
        return `the Jacobian function threw: ${errorText(e)}`;
      }
      if (rows instanceof Float64Array) {
        // column-major, entry (i, j) at j·n + i
        if (rows.length !== n * k) return `the Jacobian function returned ${rows.length} values instead of ${n} × ${k} = ${n * k}`;
        // one multiply-add per entry: v·0 is NaN exactly when v is not finite
        let probe = 0;
        for (let q = 0; q < rows.length; q++) probe += rows[q] * 0;
        if (probe !== 0) {
          for (let q = 0; q < rows.length; q++) {
            if (!Number.isFinite(rows[q])) {
              const j = Math.floor(q / n);
              return `Jacobian entry [${q - j * n}][${j}] (${varyingNames[j]}) is ${rows[q]}`;
            }
          }
        }
        return rows; // the engine keeps this array (see JacobianFunction)
      }
      if (!Array.isArray(rows) || rows.length !== n) return `the Jacobian function returned ${Array.isArray(rows) ? rows.length : 'no'} rows instead of ${n}`;
      const jac = new Float64Array(n * k);
      for (let i = 0; i < n; i++) {
        const row = rows[i];
        if (!row || row.length !== k) return `Jacobian row ${i} has ${row ? row.length : 0} entries instead of ${k}`;
        for (let j = 0; j < k; j++) {
          const v = row[j];
          if (!Number.isFinite(v)) return `Jacobian entry [${i}][${j}] (${varyingNames[j]}) is ${v}`;
          jac[j * n + i] = v;
        }
      }
      return jac;
    }
    const jac = new Float64Array(n * k);
    const xp = Float64Array.from(xv);
    for (let j = 0; j < k; j++) {
      const xj = xv[j];
      let h = stepFactor * diffStep * Math.max(Math.abs(xj), floor[j]);
      if (xj + h > hi[j]) h = xj - h >= lo[j] ? -h : hi[j] - xj >= xj - lo[j] ? hi[j] - xj : lo[j] - xj;
      let done = false;
      for (let attempt = 0; attempt < 2 && !done; attempt++) {
        const target = xj + h;
        if (target < lo[j] || target > hi[j]) break;
        xp[j] = target;
        const step = target - xj; // the step actually representable in floating point
        if (step !== 0) {
          const e = evaluate(xp);
          if (e.ok) {
            for (let i = 0; i < n; i++) jac[j * n + i] = (e.r[i] - r[i]) / step;
            done = true;
          }
        }
        h = -h; // non-finite forward point: try the other side once
      }
      // Neither side evaluable: the column stays zero and this parameter does not move this iteration.
      xp[j] = xj;
    }
    return jac;
  };

  let r = first.r;
  let cost = robustCost(r, loss, fScale);
  let jac: Float64Array | null = null;
  let lambda = LAMBDA_INITIAL;
  let nu = 2;
  const dmax = new Float64Array(k);
  const A = new Float64Array(k * k);
  const g = new Float64Array(k);
  const sqrtw = new Float64Array(n);
  const active = new Uint8Array(k);
  let iterations = 0;
  let converged = false;
  let message = '';
  let stopFailure = '';

  let weightedJac = new Float64Array(0);
  let plainGramOf: Float64Array | null = null;
  const weightedRes = new Float64Array(n);
  /** A = J̃ᵀJ̃, g = J̃ᵀr̃ with rows scaled by √ρ′ (plain J and r for the linear loss). */
  const buildNormalEquations = (jc: Float64Array) => {
    let jw = jc;
    let rw = r;
    if (loss !== 'linear') {
      if (weightedJac.length !== jc.length) weightedJac = new Float64Array(jc.length);
      for (let i = 0; i < n; i++) {
        const u = r[i] / fScale;
        sqrtw[i] = Math.sqrt(rhoPrime(loss, u * u));
        weightedRes[i] = sqrtw[i] * r[i];
      }
      for (let a = 0; a < k; a++) for (let i = 0; i < n; i++) weightedJac[a * n + i] = jc[a * n + i] * sqrtw[i];
      jw = weightedJac;
      rw = weightedRes;
    } else {
      sqrtw.fill(1);
    }
    for (let a = 0; a < k; a++) {
      const oa = a * n;
      let ga = 0;
      for (let i = 0; i < n; i++) ga += jw[oa + i] * rw[i];
      g[a] = ga;
    }
    gramInto(jw, n, k, A);
    for (let a = 0; a < k; a++) if (A[a * k + a] > dmax[a]) dmax[a] = A[a * k + a];
    // with the linear loss A is the plain JᵀJ of `jc`: finish() reuses it when jc is the final Jacobian
    plainGramOf = loss === 'linear' ? jc : null;
  };

  const markActive = () => {
    for (let j = 0; j < k; j++) {
      active[j] = (x[j] <= lo[j] && g[j] > 0) || (x[j] >= hi[j] && g[j] < 0) ? 1 : 0;
    }
  };

  /** MINPACK's gradient measure over the free parameters: max_j |J̃_jᵀ r̃| / (‖J̃_j‖ ‖r̃‖). */
  const gradientCosine = (): { gnorm: number; rnorm: number } => {
    const rnorm = Math.sqrt(sumSquaresWeighted(r, sqrtw));
    let gnorm = 0;
    if (rnorm > 0) {
      for (let j = 0; j < k; j++) {
        if (active[j] || !(A[j * k + j] > 0)) continue;
        gnorm = Math.max(gnorm, Math.abs(g[j]) / (Math.sqrt(A[j * k + j]) * rnorm));
      }
    }
    return { gnorm, rnorm };
  };

  const scaledNorms = (s: Float64Array): { step: number; point: number } => {
    let ns = 0;
    let nx = 0;
    for (let j = 0; j < k; j++) {
      const d = Math.sqrt(dmax[j] > 0 ? dmax[j] : 1);
      ns += (d * s[j]) ** 2;
      nx += (d * x[j]) ** 2;
    }
    return { step: Math.sqrt(ns), point: Math.sqrt(nx) };
  };

  const freeIdx = new Int32Array(k);
  const M = new Float64Array(k * k);
  const rhs = new Float64Array(k);
  const cholScale = new Float64Array(k);
  const delta = new Float64Array(k);

  /** Damped step over the free parameters; false when the damped matrix could not be factored. */
  const solveStep = (): boolean => {
    for (let pass = 0; pass <= k; pass++) {
      let f = 0;
      for (let j = 0; j < k; j++) if (!active[j]) freeIdx[f++] = j;
      delta.fill(0);
      if (f === 0) return true;
      for (let a = 0; a < f; a++) {
        const ja = freeIdx[a];
        for (let b = 0; b < f; b++) M[a * f + b] = A[ja * k + freeIdx[b]];
        M[a * f + a] += lambda * (dmax[ja] > 0 ? dmax[ja] : 1);
        rhs[a] = -g[ja];
      }
      const Mf = M.subarray(0, f * f);
      if (!choleskyDecompose(Mf, f, cholScale, 0)) return false;
      const b = rhs.subarray(0, f);
      choleskySolve(Mf, f, b, cholScale);
      let newlyHeld = false;
      for (let a = 0; a < f; a++) {
        const j = freeIdx[a];
        delta[j] = b[a];
        if ((x[j] <= lo[j] && b[a] < 0) || (x[j] >= hi[j] && b[a] > 0)) {
          active[j] = 1;
          newlyHeld = true;
        }
      }
      if (!newlyHeld) return true;
    }
    return true;
  };

  const trial = new Float64Array(k);
  const s = new Float64Array(k);
  /** ftol (given whether the cost change is below it) and xtol tests: the message, or null. */
  const stopTest = (costChangeSmall: boolean, norms: { step: number; point: number }): string | null => {
    if (costChangeSmall) return `converged: relative cost reduction below ftol = ${ftol}`;
    if (norms.step <= xtol * (norms.point + xtol)) return `converged: relative step below xtol = ${xtol}`;
    return null;
  };

  while (true) {
    if (jac === null) {
      const jc = computeJacobian(x, r);
      if (typeof jc === 'string') {
        stopFailure = jc;
        break;
      }
      jac = jc;
      buildNormalEquations(jac);
      markActive();
      // gtol: largest cosine between the (reweighted) residual vector and a free Jacobian column (MINPACK's test).
      const { gnorm, rnorm } = gradientCosine();
      if (rnorm === 0) {
        converged = true;
        message = 'converged: residuals are exactly zero';
        break;
      }
      if (gnorm <= gtol) {
        converged = true;
        message = `converged: gradient below gtol = ${gtol}`;
        break;
      }
    }
    if (iterations >= maxIterations) {
      message = `not converged: maximum number of iterations (${maxIterations}) reached; values are the last accepted point`;
      break;
    }
    if (lambda > LAMBDA_MAX) {
      message = 'not converged: no step reduces the cost any further (damping exceeded 1e30); tolerances may be too tight';
      break;
    }
    markActive();
    if (!solveStep()) {
      lambda *= nu;
      nu *= 2;
      continue;
    }
    let anyFree = false;
    for (let j = 0; j < k; j++) if (!active[j]) anyFree = true;
    if (!anyFree) {
      converged = true;
      message = 'converged: every varying parameter is held on a bound by the gradient';
      break;
    }
    for (let j = 0; j < k; j++) {
      trial[j] = Math.min(hi[j], Math.max(lo[j], x[j] + delta[j]));
      s[j] = trial[j] - x[j];
    }
    // Predicted decrease of the (reweighted) quadratic model for the projected step.
    let gs = 0;
    let sAs = 0;
    for (let a = 0; a < k; a++) {
      gs += g[a] * s[a];
      let row = 0;
      for (let b = 0; b < k; b++) row += A[a * k + b] * s[b];
      sAs += s[a] * row;
    }
    const predicted = -(gs + 0.5 * sAs);
    const norms = scaledNorms(s);
    iterations++;
    const e = evaluate(trial);
    if (!e.ok) {
      // Non-finite residuals at the trial point: reject and damp harder.
      lambda *= nu;
      nu *= 2;
      continue;
    }
    const newCost = robustCost(e.r, loss, fScale);
    const actual = cost - newCost;
    if (predicted > 0 && actual > 0) {
      const ratio = actual / predicted;
      const oldCost = cost;
      x = Float64Array.from(trial);
      r = e.r;
      cost = newCost;
      jac = null;
      lambda = Math.max(LAMBDA_MIN, lambda * Math.max(1 / 3, 1 - (2 * ratio - 1) ** 3));
      nu = 2;
      if (cost === 0) {
        converged = true;
        message = 'converged: residuals are exactly zero';
        break;
      }
      const stop = stopTest(actual <= ftol * oldCost && predicted <= ftol * oldCost, norms);
      if (stop) {
        converged = true;
        message = stop;
        break;
      }
    } else {
      lambda *= nu;
      nu *= 2;
      // Rounding level: neither the model nor the function can decrease the cost measurably.
      const stop = stopTest(predicted <= ftol * cost && Math.abs(actual) <= ftol * cost, norms);
      if (stop) {
        converged = true;
        message = stop;
        break;
      }
    }
  }

  if (stopFailure) {
    return finish({ x, r, converged: false, message: `stopped: ${stopFailure}`, iterations, jac: null });
  }
  // A forward difference with a step far off the parameter's scale (say 1.5e-8 s for a cable delay
  // starting at 0) gives a wrong Jacobian; the iteration then stalls and the ftol/xtol tests would
  // call that converged. Check it: recompute the columns with a 16× smaller step and compare.
  if (converged && !jacobian && options.checkJacobian !== false && cost > 0) {
    if (jac === null) {
      const jc = computeJacobian(x, r);
      if (typeof jc === 'string') return finish({ x, r, converged: false, message: `stopped: ${jc}`, iterations, jac: null });
      jac = jc;
    }
    const fine = computeJacobian(x, r, 1 / 16, true);
    const bad: string[] = [];
    if (typeof fine !== 'string') {
      for (let j = 0; j < k; j++) {
        let d2 = 0;
        let c2 = 0;
        let f2 = 0;
        for (let i = 0; i < n; i++) {
          const a = jac[j * n + i];
          const b = fine[j * n + i];
          d2 += (a - b) * (a - b);
          c2 += a * a;
          f2 += b * b;
        }
        if (Math.sqrt(d2) > JACOBIAN_CONSISTENCY * Math.sqrt(Math.max(c2, f2))) bad.push(varyingNames[j]);
      }
    }
    if (bad.length > 0) {
      converged = false;
      message =
        `not converged: the iteration stopped (${message.replace('converged: ', '')}) but the finite-difference Jacobian ` +
        `is unreliable for ${bad.join(', ')} (columns change with the step): give ${bad.length > 1 ? 'them' : 'it'} a ` +
        'diffScale near the expected size, or supply an analytic Jacobian';
    }
  }
  return finish({ x, r, converged, message, iterations, jac });

  // ---- result assembly (hoisted; closes over the state above)
  function finish(st: {
    x: Float64Array;
    r: Float64Array | null;
    converged: boolean;
    message: string;
    iterations: number;
    jac: Float64Array | null;
  }): FitResult {
    const xv = st.x;
    const values = Float64Array.from(P.start);
    for (let j = 0; j < k; j++) values[varyIdx[j]] = xv[j];
    let covariance: number[][] | null = null;
    let correlation: number[][] | null = null;
    let note = '';
    const res = st.r;
    const nd = res ? res.length : 0;
    const chisqr = res ? sumSquares(res) : Infinity;
    const stats = statistics(chisqr, nd, k);
    if (res && k > 0 && nd >= k && computeCovariance) {
      let jc: Float64Array | string | null = st.jac;
      // Covariance needs the plain Jacobian at the returned point.
      if (jc === null) jc = computeJacobianSafe(xv, res);
      if (typeof jc === 'string') {
        note = `covariance not estimated: ${jc}`;
      } else {
        const jtj = new Float64Array(k * k);
        if (jc === plainGramOf) jtj.set(A.subarray(0, k * k));
        else gramInto(jc, nd, k, jtj);
        const inv = invertSymmetricPositiveDefinite(jtj, k, COVARIANCE_PIVOT_TOL);
        if (inv === null) {
          const flat = [];
          for (let a = 0; a < k; a++) if (!(jtj[a * k + a] > 0)) flat.push(varyingNames[a]);
          note =
            'covariance not estimated: JᵀJ is singular at the solution' +
            (flat.length ? ` (the residuals do not depend on ${flat.join(', ')})` : ' (some parameters are degenerate)');
        } else if (!Number.isFinite(stats.redchi)) {
          note = 'covariance not estimated: reduced chi-square is not finite';
        } else {
          covariance = [];
          correlation = [];
          for (let a = 0; a < k; a++) {
            const cr: number[] = [];
            const rr: number[] = [];
            for (let b = 0; b < k; b++) {
              cr.push(inv[a * k + b] * stats.redchi);
              rr.push(a === b ? 1 : inv[a * k + b] / Math.sqrt(inv[a * k + a] * inv[b * k + b]));
            }
            covariance.push(cr);
            correlation.push(rr);
          }
        }
      }
    }
    const fitted: Record<string, FittedParameter> = {};
    for (let i = 0; i < m; i++) {
      const j = varyIdx.indexOf(i);
      const v = values[i];
      const atBound = P.vary[i] ? v <= P.lower[i] || v >= P.upper[i] : false;
      let stderr: number | null = null;
      if (j >= 0 && covariance && !atBound) {
        const sd = Math.sqrt(covariance[j][j]);
        stderr = Number.isFinite(sd) ? sd : null;
      }
      fitted[P.names[i]] = {
        name: P.names[i],
        value: v,
        stderr,
        initial: P.initial[i],
        min: P.lower[i],
        max: P.upper[i],
        vary: P.vary[i],
        atBound,
      };
    }
    const result: FitResult = {
      params: fitted,
      varyingNames,
      covariance,
      correlation,
      residuals: res ? Array.from(res) : [],
      chisqr,
      redchi: stats.redchi,
      aic: stats.aic,
      bic: stats.bic,
      ndata: nd,
      nvarys: k,
      nfev,
      iterations: st.iterations,
      success: st.converged,
      message: note ? `${st.message}; ${note}` : st.message,
      loss,
      nfree: nd - k,
      cost: res ? robustCost(res, loss, fScale) : Infinity,
      njev,
    };
    if (loss !== 'linear' && res) {
      result.robustWeights = Array.from(res, (ri) => rhoPrime(loss, (ri / fScale) ** 2));
    }
    return result;
  }

  function computeJacobianSafe(xv: Float64Array, res: Float64Array): Float64Array | string {
    return computeJacobian(xv, res);
  }
}

/**
 * out = JᵀJ (k×k, row-major, symmetric) of a column-major n×k matrix J. Two columns share each
 * pass over the rows (half the loads of column a); every entry is still summed in row order, so
 * the result is the same to the bit as one dot product per entry.
 */
function gramInto(jc: Float64Array, n: number, k: number, out: Float64Array): void {
  for (let a = 0; a < k; a++) {
    const oa = a * n;
    let b = 0;
    for (; b + 1 <= a; b += 2) {
      const ob = b * n;
      const oc = ob + n;
      let s0 = 0;
      let s1 = 0;
      for (let i = 0; i < n; i++) {
        const v = jc[oa + i];
        s0 += v * jc[ob + i];
        s1 += v * jc[oc + i];
      }
      out[a * k + b] = s0;
      out[b * k + a] = s0;
      out[a * k + b + 1] = s1;
      out[(b + 1) * k + a] = s1;
    }
    for (; b <= a; b++) {
      const ob = b * n;
      let sum = 0;
      for (let i = 0; i < n; i++) sum += jc[oa + i] * jc[ob + i];
      out[a * k + b] = sum;
      out[b * k + a] = sum;
    }
  }
}

function sumSquaresWeighted(r: Float64Array, sqrtw: Float64Array): number {
  let c = 0;
  for (let i = 0; i < r.length; i++) {
    const v = r[i] * sqrtw[i];
    c += v * v;
  }
  return c;
}

/** Result for a parameter table or options that cannot be fitted at all (nothing evaluated). */
function invalidInput(params: readonly ParameterSpec[], loss: Loss, why: string): FitResult {
  const fitted: Record<string, FittedParameter> = {};
  const list = Array.isArray(params) ? params : [];
  for (const s of list) {
    if (!s || typeof s.name !== 'string') continue;
    fitted[s.name] = {
      name: s.name,
      value: s.value,
      stderr: null,
      initial: s.value,
      min: s.min ?? -Infinity,
      max: s.max ?? Infinity,
      vary: s.vary !== false,
      atBound: false,
    };
  }
  return {
    params: fitted,
    varyingNames: [],
    covariance: null,
    correlation: null,
    residuals: [],
    chisqr: Infinity,
    redchi: Infinity,
    aic: Infinity,
    bic: Infinity,
    ndata: 0,
    nvarys: 0,
    nfev: 0,
    iterations: 0,
    success: false,
    message: `invalid input: ${why}`,
    loss,
  };
}
