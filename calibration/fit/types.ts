/**
 * Types of the generic least-squares engine (calibration/fit/leastsq.ts).
 * Modelled on a scientist's fitting library: every parameter has a value, bounds and a
 * vary flag; a fit result carries values, standard errors, covariance, correlations,
 * goodness of fit, success and a message. Non-convergence is a result, never a throw.
 */

export interface ParameterSpec {
  name: string;
  value: number;
  /** Lower bound (inclusive); -Infinity when absent. */
  min?: number;
  /** Upper bound (inclusive); +Infinity when absent. */
  max?: number;
  /** false keeps the parameter fixed at `value`. Default true. */
  vary?: boolean;
  /**
   * Typical magnitude: the forward-difference step is diffStep·max(|value|, diffScale), so a
   * parameter passing through zero keeps a usable step. Default: 1e-3·|initial value| when that
   * is non-zero, else 1e-3·(max - min) when both bounds are finite, else 1. Give it for
   * parameters that start at zero and live far from unit scale (e.g. a delay in seconds).
   */
  diffScale?: number;
}

/**
 * Robust losses as in common least-squares practice: rho(z) applied to z = (r / fScale)^2.
 * linear: rho = z; soft_l1: 2(sqrt(1+z)-1); huber: z if z<=1 else 2 sqrt(z)-1; cauchy: ln(1+z).
 */
export type Loss = 'linear' | 'soft_l1' | 'huber' | 'cauchy';

export interface LeastSquaresOptions {
  loss?: Loss;
  /** Residual scale at which the robust loss starts to soften (in units of the residuals). Default 1. */
  fScale?: number;
  /**
   * Maximum number of trial steps (each costs one residual evaluation; a Jacobian follows every
   * accepted step). Default 200·(nvarys + 1).
   */
  maxIterations?: number;
  /** Relative tolerance on the cost decrease (actual and predicted). Default 1e-10. */
  ftol?: number;
  /** Relative tolerance on the step size, in Jacobian-column-scaled parameters. Default 1e-10. */
  xtol?: number;
  /** Tolerance on the scaled gradient: max cosine between residual vector and a Jacobian column. Default 1e-10. */
  gtol?: number;
  /** Relative step for forward-difference Jacobians. Default √ε ≈ 1.49e-8. */
  diffStep?: number;
  /** false skips the covariance (and stderr, correlation) at the solution, e.g. for the losing starts of a multi-start fit. Default true. */
  computeCovariance?: boolean;
  /**
   * With a numeric Jacobian, re-derive it at the solution with a 16× smaller step and report
   * success=false when a column changes by more than 5% (a step far off the parameter's scale).
   * Costs nvarys evaluations. Default true.
   */
  checkJacobian?: boolean;
}

/**
 * Residual function: receives every parameter (varying and fixed) by name and returns the
 * weighted residual vector (data - model) / sigma. A non-finite entry makes the step rejected.
 */
export type ResidualFunction = (p: Readonly<Record<string, number>>) => ArrayLike<number>;

/**
 * Optional analytic Jacobian: d residual_i / d p_j for the varying parameters (columns in
 * `varyingNames` order). Either rows (number[][], one row per residual) or, cheaper for long
 * residual vectors, one column-major Float64Array of length ndata·nvarys with entry (i, j) at
 * j·ndata + i. The engine keeps that array (no copy): return a new one on every call.
 */
export type JacobianFunction = (p: Readonly<Record<string, number>>, varyingNames: readonly string[]) => number[][] | Float64Array;

export interface FittedParameter {
  name: string;
  value: number;
  /** Standard error from the covariance; null when it could not be estimated (fixed, singular, at bound). */
  stderr: number | null;
  initial: number;
  min: number;
  max: number;
  vary: boolean;
  /** true when the final value sits on a bound (its stderr is then not meaningful). */
  atBound: boolean;
}

export interface FitResult {
  params: Record<string, FittedParameter>;
  /** Names of the varying parameters, in the order of the covariance and correlation matrices. */
  varyingNames: string[];
  covariance: number[][] | null;
  correlation: number[][] | null;
  /** Final weighted residuals (data - model)/sigma, unscaled by the robust loss. */
  residuals: number[];
  /** Sum of squared weighted residuals. */
  chisqr: number;
  /** chisqr / (ndata - nvarys). */
  redchi: number;
  /** ndata*ln(chisqr/ndata) + 2*nvarys (Gaussian-likelihood convention, as lmfit documents). */
  aic: number;
  /** ndata*ln(chisqr/ndata) + ln(ndata)*nvarys. */
  bic: number;
  ndata: number;
  nvarys: number;
  nfev: number;
  iterations: number;
  success: boolean;
  message: string;
  loss: Loss;
  /** Per-residual weights the robust loss applied at the solution (1 = full weight); absent for linear loss. */
  robustWeights?: number[];
  /** ndata - nvarys (redchi divides by max(1, nfree), as lmfit does). */
  nfree?: number;
  /** Final value of the minimised cost 0.5·Σ fScale²·rho((r/fScale)²) (= chisqr/2 for the linear loss). */
  cost?: number;
  /** Number of Jacobian evaluations (numeric or analytic). */
  njev?: number;
}
