/**
 * Eigenvalues of a real symmetric tridiagonal matrix by the implicit symmetric QR
 * algorithm with Wilkinson shift (Golub & Van Loan, Matrix Computations, §8.3), and a
 * Sturm-sequence count (as in bisection, Barth, Martin & Wilkinson 1967) used to check it.
 * Written here because no installed package does dense or tridiagonal eigenvalues.
 */

const EPS = 2.220446049250313e-16;

/**
 * All eigenvalues, ascending. `diag` has n entries, `off` n−1 (off[i] couples i and i+1).
 * Inputs are not modified. Throws if the iteration fails to converge (never seen in practice).
 */
export function tridiagEigenvalues(diag: ArrayLike<number>, off: ArrayLike<number>): Float64Array {
  const n = diag.length;
  if (off.length !== Math.max(0, n - 1)) throw new RangeError(`off-diagonal must have ${n - 1} entries`);
  const d = Float64Array.from(diag);
  const e = Float64Array.from(off);
  let hi = n - 1;
  let iterations = 0;
  const maxIterations = 50 * n + 50;
  while (hi > 0) {
    if (Math.abs(e[hi - 1]) <= EPS * (Math.abs(d[hi - 1]) + Math.abs(d[hi]))) {
      e[hi - 1] = 0; // d[hi] has converged: deflate
      hi--;
      continue;
    }
    if (++iterations > maxIterations) throw new Error("tridiagonal QR did not converge");
    // Start of the unreduced block that ends at hi.
    let lo = hi - 1;
    while (lo > 0 && Math.abs(e[lo - 1]) > EPS * (Math.abs(d[lo - 1]) + Math.abs(d[lo]))) lo--;
    // Wilkinson shift: eigenvalue of the trailing 2×2 block closer to d[hi].
    const delta = (d[hi - 1] - d[hi]) / 2;
    const b2 = e[hi - 1] * e[hi - 1];
    const mu = d[hi] - b2 / (delta + (delta >= 0 ? 1 : -1) * Math.hypot(delta, e[hi - 1]));
    // Implicit QR step: a Givens rotation in plane (k, k+1) chases the bulge down the block.
    let x = d[lo] - mu;
    let z = e[lo];
    for (let k = lo; k < hi; k++) {
      const r2 = x * x + z * z;
      // Math.hypot is several times slower in V8; fall back to it only where x² + z² leaves the double range.
      const r = r2 > 1e-300 && r2 < 1e300 ? Math.sqrt(r2) : Math.hypot(x, z);
      const c = r === 0 ? 1 : x / r;
      const s = r === 0 ? 0 : z / r;
      if (k > lo) e[k - 1] = r;
      const a = d[k];
      const b = e[k];
      const dd = d[k + 1];
      d[k] = c * c * a + 2 * c * s * b + s * s * dd;
      d[k + 1] = s * s * a - 2 * c * s * b + c * c * dd;
      e[k] = c * s * (dd - a) + (c * c - s * s) * b;
      if (k < hi - 1) {
        z = s * e[k + 1]; // bulge at (k, k+2)
        e[k + 1] *= c;
        x = e[k];
      }
    }
  }
  return d.sort();
}

/** Number of eigenvalues below x, from the signs of the LDLᵀ pivots of T − xI (Sturm count). */
export function sturmCount(diag: ArrayLike<number>, off: ArrayLike<number>, x: number): number {
  let count = 0;
  let q = 1;
  for (let i = 0; i < diag.length; i++) {
    const e2 = i === 0 ? 0 : off[i - 1] * off[i - 1];
    q = diag[i] - x - (i === 0 ? 0 : e2 / q);
    if (q === 0) q = -EPS * (Math.abs(diag[i]) + Math.abs(x) + EPS); // step past an exact zero pivot
    if (q < 0) count++;
  }
  return count;
}
