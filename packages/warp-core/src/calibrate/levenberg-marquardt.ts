/**
 * Damped least squares (Levenberg 1944, Marquardt 1963): minimizes Σ rᵢ(p)² by solving
 * (JᵀJ + λ·diag(JᵀJ))·δ = −Jᵀr, shrinking λ after a step that lowers the cost and growing it after
 * one that does not. Marquardt's diagonal scaling makes the steps independent of each parameter's
 * units. The Jacobian is taken by central differences. A parameter vector the model refuses
 * (`residuals` returns null: a rig that cannot work) counts as a failed step, so the solver never
 * walks through invalid geometry.
 */
import { choleskySolve, normalEquations } from './matrix.js';

export interface LeastSquaresProblem {
  /** Number of parameters. */
  readonly n: number;
  /** The (already weighted) residual vector at p, always the same length; null when p is not allowed. */
  residuals(p: Float64Array): Float64Array | null;
  /** Finite-difference step for each parameter, in its own units. */
  readonly steps: ArrayLike<number>;
}

export interface LevenbergMarquardtOptions {
  /** Most Jacobian evaluations. */
  maxIterations: number;
  /** Starting damping, relative to diag(JᵀJ). */
  initialLambda: number;
  /** Stop when a step lowers the cost by less than this fraction of it. */
  costTolerance: number;
  /** Stop when every scaled step component is below this. */
  stepTolerance: number;
}

export const LEVENBERG_MARQUARDT_DEFAULTS: Readonly<LevenbergMarquardtOptions> = {
  maxIterations: 200,
  initialLambda: 1e-3,
  costTolerance: 1e-12,
  stepTolerance: 1e-10,
};

export interface LevenbergMarquardtResult {
  p: Float64Array;
  residuals: Float64Array;
  /** Σ rᵢ² at p. */
  cost: number;
  /** Row-major m×n Jacobian at p. */
  jacobian: Float64Array;
  iterations: number;
  converged: boolean;
  /** Why it stopped, in a few words. */
  reason: string;
}

function sumSquares(r: Float64Array): number {
  let s = 0;
  for (let i = 0; i < r.length; i++) s += r[i] * r[i];
  return s;
}

/**
 * Central-difference Jacobian (row-major m×n) of problem.residuals at p, where r0 = residuals(p).
 * Where one side of a difference is refused, the other side's one-sided difference is used; where
 * both are, the column is zero (that parameter cannot move from here).
 */
export function numericJacobian(problem: LeastSquaresProblem, p: Float64Array, r0: Float64Array): Float64Array {
  const m = r0.length;
  const n = problem.n;
  const J = new Float64Array(m * n);
  const q = Float64Array.from(p);
  for (let j = 0; j < n; j++) {
    const h = problem.steps[j];
    q[j] = p[j] + h;
    const rp = problem.residuals(q);
    q[j] = p[j] - h;
    const rm = problem.residuals(q);
    q[j] = p[j];
    if (rp && rm) for (let i = 0; i < m; i++) J[i * n + j] = (rp[i] - rm[i]) / (2 * h);
    else if (rp) for (let i = 0; i < m; i++) J[i * n + j] = (rp[i] - r0[i]) / h;
    else if (rm) for (let i = 0; i < m; i++) J[i * n + j] = (r0[i] - rm[i]) / h;
  }
  return J;
}

/** Minimizes Σ rᵢ(p)² from p0, which must be allowed (residuals(p0) not null). */
export function levenbergMarquardt(problem: LeastSquaresProblem, p0: ArrayLike<number>, options: Partial<LevenbergMarquardtOptions> = {}): LevenbergMarquardtResult {
  const o = { ...LEVENBERG_MARQUARDT_DEFAULTS, ...options };
  const n = problem.n;
  let p = Float64Array.from(p0);
  let r = problem.residuals(p);
  if (!r) throw new Error('levenbergMarquardt: the starting point is not allowed by the model');
  const m = r.length;
  let cost = sumSquares(r);
  let J = numericJacobian(problem, p, r);
  let lambda = o.initialLambda;
  let iterations = 0;
  let reason = 'iteration limit reached';
  let converged = false;
  if (n === 0) return { p, residuals: r, cost, jacobian: J, iterations, converged: true, reason: 'nothing to solve' };

  outer: while (iterations < o.maxIterations) {
    iterations++;
    const { JtJ, Jtr } = normalEquations(J, r, m, n);
    let maxDiag = 0;
    for (let i = 0; i < n; i++) maxDiag = Math.max(maxDiag, JtJ[i * n + i]);
    if (!(maxDiag > 0)) {
      reason = 'the measurements do not depend on the free quantities';
      break;
    }
    const D = new Float64Array(n);
    for (let i = 0; i < n; i++) D[i] = Math.max(JtJ[i * n + i], 1e-12 * maxDiag);
    // gradient small in Marquardt's scaled coordinates: at a stationary point
    let g = 0;
    for (let i = 0; i < n; i++) g = Math.max(g, Math.abs(Jtr[i]) / Math.sqrt(D[i]));
    if (g <= 1e-12 * Math.sqrt(Math.max(cost, 1e-300))) {
      converged = true;
      reason = 'gradient vanished';
      break;
    }
    const A = new Float64Array(n * n);
    const minusJtr = Jtr.map((x) => -x);
    for (;;) {
      A.set(JtJ);
      for (let i = 0; i < n; i++) A[i * n + i] += lambda * D[i];
      const delta = choleskySolve(A, minusJtr, n);
      if (delta) {
        const pNew = new Float64Array(n);
        for (let i = 0; i < n; i++) pNew[i] = p[i] + delta[i];
        const rNew = problem.residuals(pNew);
        const costNew = rNew ? sumSquares(rNew) : Infinity;
        if (rNew && costNew < cost) {
          let scaledStep = 0;
          for (let i = 0; i < n; i++) scaledStep = Math.max(scaledStep, Math.abs(delta[i]) * Math.sqrt(D[i] / maxDiag));
          const drop = cost - costNew;
          p = pNew;
          r = rNew;
          cost = costNew;
          lambda = Math.max(lambda / 3, 1e-15);
          J = numericJacobian(problem, p, r);
          if (drop <= o.costTolerance * costNew || scaledStep <= o.stepTolerance) {
            converged = true;
            reason = 'converged';
            break outer;
          }
          continue outer;
        }
        // a step to the same point (δ below rounding) means we are there
        let same = true;
        for (let i = 0; i < n; i++) if (pNew[i] !== p[i]) same = false;
        if (same) {
          converged = true;
          reason = 'converged';
          break outer;
        }
      }
      lambda *= 4;
      if (lambda > 1e16) {
        converged = true;
        reason = 'no step lowers the cost further';
        break outer;
      }
    }
  }
  return { p, residuals: r, cost, jacobian: J, iterations, converged, reason };
}
