/**
 * Small dense linear-algebra kernels on Float64Array, row-major with an explicit row stride,
 * written for the kriging systems (tens to a few thousand unknowns). No allocation inside.
 */

/**
 * In-place Cholesky factorisation A = L·Lᵀ of the symmetric positive definite m × m matrix
 * stored in the lower triangle of `a` (row stride `stride`) — Golub & Van Loan, Matrix
 * Computations, ch. 4 [mem]. The strict upper triangle is not read or written.
 *
 * Returns -1 on success, or the row where the pivot was not positive enough: a pivot below
 * `relTol` × the original diagonal element means the matrix is (numerically) singular.
 */
export function cholesky(a: Float64Array, m: number, stride: number, relTol = 1e-13): number {
  for (let j = 0; j < m; j++) {
    const rowJ = j * stride;
    const ajj = a[rowJ + j];
    const d = ajj - dot(a, rowJ, a, rowJ, j);
    if (!(d > relTol * ajj) || !(ajj > 0)) return j;
    const ljj = Math.sqrt(d);
    a[rowJ + j] = ljj;
    const inv = 1 / ljj;
    for (let i = j + 1; i < m; i++) {
      const rowI = i * stride;
      a[rowI + j] = (a[rowI + j] - dot(a, rowI, a, rowJ, j)) * inv;
    }
  }
  return -1;
}

/** Σ_{k<len} x[xo + k]·y[yo + k], with four independent accumulators (shorter dependency chains). */
export function dot(x: Float64Array, xo: number, y: Float64Array, yo: number, len: number): number {
  let s0 = 0;
  let s1 = 0;
  let s2 = 0;
  let s3 = 0;
  let k = 0;
  for (; k + 3 < len; k += 4) {
    s0 += x[xo + k] * y[yo + k];
    s1 += x[xo + k + 1] * y[yo + k + 1];
    s2 += x[xo + k + 2] * y[yo + k + 2];
    s3 += x[xo + k + 3] * y[yo + k + 3];
  }
  for (; k < len; k++) s0 += x[xo + k] * y[yo + k];
  return s0 + s1 + (s2 + s3);
}

/** Right-hand sides solved together by forwardSolveGroup. */
export const GROUP = 8;

/**
 * GROUP right-hand sides at once: solve L·X = B in place for B stored interleaved
 * (b[GROUP·i + c] = row i of right-hand side c). Each element of L is loaded once for all of them
 * and the eight running sums are independent, which keeps the JIT's pipelines full.
 * `invDiag` holds 1/L_ii.
 */
export function forwardSolveGroup(l: Float64Array, invDiag: Float64Array, m: number, stride: number, b: Float64Array): void {
  for (let i = 0; i < m; i++) {
    const row = i * stride;
    const o = 8 * i;
    let s0 = b[o];
    let s1 = b[o + 1];
    let s2 = b[o + 2];
    let s3 = b[o + 3];
    let s4 = b[o + 4];
    let s5 = b[o + 5];
    let s6 = b[o + 6];
    let s7 = b[o + 7];
    for (let k = 0; k < i; k++) {
      const v = l[row + k];
      const kk = 8 * k;
      s0 -= v * b[kk];
      s1 -= v * b[kk + 1];
      s2 -= v * b[kk + 2];
      s3 -= v * b[kk + 3];
      s4 -= v * b[kk + 4];
      s5 -= v * b[kk + 5];
      s6 -= v * b[kk + 6];
      s7 -= v * b[kk + 7];
    }
    const inv = invDiag[i];
    b[o] = s0 * inv;
    b[o + 1] = s1 * inv;
    b[o + 2] = s2 * inv;
    b[o + 3] = s3 * inv;
    b[o + 4] = s4 * inv;
    b[o + 5] = s5 * inv;
    b[o + 6] = s6 * inv;
    b[o + 7] = s7 * inv;
  }
}

/** Solve L·x = b in place (b at b[offset …], L lower triangular, row stride `stride`). */
export function forwardSolve(l: Float64Array, m: number, stride: number, b: Float64Array, offset = 0): void {
  for (let i = 0; i < m; i++) {
    const row = i * stride;
    b[offset + i] = (b[offset + i] - dot(l, row, b, offset, i)) / l[row + i];
  }
}

/** Solve Lᵀ·x = b in place. */
export function backSolve(l: Float64Array, m: number, stride: number, b: Float64Array, offset = 0): void {
  for (let i = m - 1; i >= 0; i--) {
    let s = b[offset + i];
    for (let k = i + 1; k < m; k++) s -= l[k * stride + i] * b[offset + k];
    b[offset + i] = s / l[i * stride + i];
  }
}

/**
 * Ordinary least squares by Householder QR (Golub & Van Loan, Matrix Computations, ch. 5 [mem]): X is n × p
 * (row-major, copied), y has n entries. Returns the coefficients and residuals y − Xβ, or null
 * when X does not have full column rank (a column is, to rounding, a combination of the others).
 */
export function leastSquares(x: Float64Array, n: number, p: number, y: ArrayLike<number>): { beta: Float64Array; residuals: Float64Array } | null {
  if (n < p) return null;
  const a = Float64Array.from(x);
  const b = Float64Array.from(y as ArrayLike<number>);
  const colNorm = new Float64Array(p);
  for (let j = 0; j < p; j++) {
    let s = 0;
    for (let i = 0; i < n; i++) s += a[i * p + j] * a[i * p + j];
    colNorm[j] = Math.sqrt(s);
  }
  const diag = new Float64Array(p);
  for (let j = 0; j < p; j++) {
    let norm = 0;
    for (let i = j; i < n; i++) norm += a[i * p + j] * a[i * p + j];
    norm = Math.sqrt(norm);
    if (!(norm > 1e-12 * (colNorm[j] || 1)) || colNorm[j] === 0) return null;
    const alpha = a[j * p + j] > 0 ? -norm : norm;
    // v = x − alpha e1 stored in column j below the diagonal
    a[j * p + j] -= alpha;
    let vnorm2 = 0;
    for (let i = j; i < n; i++) vnorm2 += a[i * p + j] * a[i * p + j];
    diag[j] = alpha;
    if (vnorm2 === 0) continue;
    for (let c = j + 1; c < p; c++) {
      let s = 0;
      for (let i = j; i < n; i++) s += a[i * p + j] * a[i * p + c];
      const f = (2 * s) / vnorm2;
      for (let i = j; i < n; i++) a[i * p + c] -= f * a[i * p + j];
    }
    let s = 0;
    for (let i = j; i < n; i++) s += a[i * p + j] * b[i];
    const f = (2 * s) / vnorm2;
    for (let i = j; i < n; i++) b[i] -= f * a[i * p + j];
  }
  const beta = new Float64Array(p);
  for (let j = p - 1; j >= 0; j--) {
    let s = b[j];
    for (let c = j + 1; c < p; c++) s -= a[j * p + c] * beta[c];
    beta[j] = s / diag[j];
  }
  const residuals = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    let s = (y as ArrayLike<number>)[i];
    for (let j = 0; j < p; j++) s -= x[i * p + j] * beta[j];
    residuals[i] = s;
  }
  return { beta, residuals };
}
