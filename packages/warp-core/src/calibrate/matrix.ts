/**
 * The small dense linear algebra the calibration needs: symmetric matrices of a dozen or so rows,
 * stored row-major in Float64Arrays. Cholesky for the damped normal equations, cyclic Jacobi for the
 * symmetric eigen-decomposition (Golub & Van Loan, "Matrix Computations", §8.5: slow for big
 * matrices, but simple, and accurate for small eigenvalues, which is what rank detection needs).
 */

/**
 * Solves A·x = b for symmetric positive definite A (n×n, row-major) by Cholesky factorization.
 * Returns null when A is not numerically positive definite. A and b are not modified.
 */
export function choleskySolve(A: Float64Array, b: Float64Array, n: number): Float64Array | null {
  const L = new Float64Array(n * n);
  for (let i = 0; i < n; i++) {
    for (let j = 0; j <= i; j++) {
      let s = A[i * n + j];
      for (let k = 0; k < j; k++) s -= L[i * n + k] * L[j * n + k];
      if (i === j) {
        if (!(s > 0) || !Number.isFinite(s)) return null;
        L[i * n + i] = Math.sqrt(s);
      } else {
        L[i * n + j] = s / L[j * n + j];
      }
    }
  }
  const y = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    let s = b[i];
    for (let k = 0; k < i; k++) s -= L[i * n + k] * y[k];
    y[i] = s / L[i * n + i];
  }
  const x = new Float64Array(n);
  for (let i = n - 1; i >= 0; i--) {
    let s = y[i];
    for (let k = i + 1; k < n; k++) s -= L[k * n + i] * x[k];
    x[i] = s / L[i * n + i];
  }
  return x;
}

export interface SymmetricEigen {
  /** Eigenvalues in ascending order. */
  values: Float64Array;
  /** Eigenvectors as columns, row-major n×n: vectors[i·n + k] is component i of the k-th vector. */
  vectors: Float64Array;
}

/**
 * Eigenvalues and eigenvectors of a symmetric n×n matrix by cyclic Jacobi rotations (Golub & Van
 * Loan §8.5.3), sorted ascending. Only the symmetric part of A is used; A is not modified.
 */
export function symmetricEigen(A: Float64Array, n: number): SymmetricEigen {
  const a = new Float64Array(n * n);
  for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) a[i * n + j] = 0.5 * (A[i * n + j] + A[j * n + i]);
  const v = new Float64Array(n * n);
  for (let i = 0; i < n; i++) v[i * n + i] = 1;
  for (let sweep = 0; sweep < 100; sweep++) {
    let off = 0;
    let diag = 0;
    for (let i = 0; i < n; i++) {
      diag += a[i * n + i] * a[i * n + i];
      for (let j = i + 1; j < n; j++) off += a[i * n + j] * a[i * n + j];
    }
    if (off <= 1e-30 * diag || off === 0) break;
    for (let p = 0; p < n; p++) {
      for (let q = p + 1; q < n; q++) {
        const apq = a[p * n + q];
        if (apq === 0) continue;
        const app = a[p * n + p];
        const aqq = a[q * n + q];
        // rotation angle that zeroes a[p][q]: the stable small root of t² + 2θt − 1 = 0 (G&VL Alg. 8.5.1)
        const theta = (aqq - app) / (2 * apq);
        const t = Math.sign(theta || 1) / (Math.abs(theta) + Math.sqrt(theta * theta + 1));
        const c = 1 / Math.sqrt(t * t + 1);
        const s = t * c;
        for (let k = 0; k < n; k++) {
          const akp = a[k * n + p];
          const akq = a[k * n + q];
          a[k * n + p] = c * akp - s * akq;
          a[k * n + q] = s * akp + c * akq;
        }
        for (let k = 0; k < n; k++) {
          const apk = a[p * n + k];
          const aqk = a[q * n + k];
          a[p * n + k] = c * apk - s * aqk;
          a[q * n + k] = s * apk + c * aqk;
        }
        for (let k = 0; k < n; k++) {
          const vkp = v[k * n + p];
          const vkq = v[k * n + q];
          v[k * n + p] = c * vkp - s * vkq;
          v[k * n + q] = s * vkp + c * vkq;
        }
      }
    }
  }
  const order = Array.from({ length: n }, (_, i) => i).sort((i, j) => a[i * n + i] - a[j * n + j]);
  const values = new Float64Array(n);
  const vectors = new Float64Array(n * n);
  order.forEach((src, k) => {
    values[k] = a[src * n + src];
    for (let i = 0; i < n; i++) vectors[i * n + k] = v[i * n + src];
  });
  return { values, vectors };
}

/** Jᵀ·J (n×n) and Jᵀ·r (n) for a row-major m×n matrix J; without r, Jᵀ·r is zero. */
export function normalEquations(J: Float64Array, r: Float64Array | null, m: number, n: number): { JtJ: Float64Array; Jtr: Float64Array } {
  const JtJ = new Float64Array(n * n);
  const Jtr = new Float64Array(n);
  for (let k = 0; k < m; k++) {
    const row = k * n;
    const rk = r ? r[k] : 0;
    for (let i = 0; i < n; i++) {
      const ji = J[row + i];
      if (ji === 0) continue;
      Jtr[i] += ji * rk;
      for (let j = i; j < n; j++) JtJ[i * n + j] += ji * J[row + j];
    }
  }
  for (let i = 0; i < n; i++) for (let j = 0; j < i; j++) JtJ[i * n + j] = JtJ[j * n + i];
  return { JtJ, Jtr };
}
