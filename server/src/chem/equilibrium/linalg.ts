// Small dense linear algebra for the equilibrium solver, written for reuse of
// preallocated Float64Arrays (row-major): LU with partial pivoting, a modified
// Cholesky (LDLᵀ) for nearly singular convex Hessians, reduced row echelon form
// with complete pivoting for null spaces, and compensated dot products.

/** Dekker/Veltkamp splitting constant 2^27 + 1: splits a double into two 26-bit halves. */
const SPLITTER = 134217729;

/** Swaps rows x and y of a row-major matrix `width` entries wide, in place. */
export function swapRows(a: Float64Array, width: number, x: number, y: number): void {
  for (let j = 0; j < width; j++) {
    const t = a[x * width + j];
    a[x * width + j] = a[y * width + j];
    a[y * width + j] = t;
  }
}

/**
 * LU factorisation with partial pivoting, in place (Doolittle, unit lower triangle stored
 * below the diagonal). `perm[k]` is the row swapped with row k at step k. Returns false
 * when a pivot is zero or not finite (singular or overflowed matrix).
 */
export function luFactor(a: Float64Array, n: number, perm: Int32Array): boolean {
  for (let k = 0; k < n; k++) {
    let p = k;
    let max = Math.abs(a[k * n + k]);
    for (let i = k + 1; i < n; i++) {
      const v = Math.abs(a[i * n + k]);
      if (v > max) {
        max = v;
        p = i;
      }
    }
    if (!(max > 0) || !Number.isFinite(max)) return false;
    perm[k] = p;
    if (p !== k) swapRows(a, n, k, p);
    const inv = 1 / a[k * n + k];
    for (let i = k + 1; i < n; i++) {
      const f = a[i * n + k] * inv;
      a[i * n + k] = f;
      if (f !== 0) for (let j = k + 1; j < n; j++) a[i * n + j] -= f * a[k * n + j];
    }
  }
  return true;
}

/** Solves A x = b in place in `b` with the factors from luFactor. */
export function luSolve(a: Float64Array, n: number, perm: Int32Array, b: Float64Array): void {
  for (let k = 0; k < n; k++) {
    const p = perm[k];
    if (p !== k) {
      const t = b[k];
      b[k] = b[p];
      b[p] = t;
    }
  }
  for (let i = 1; i < n; i++) {
    let s = b[i];
    for (let j = 0; j < i; j++) s -= a[i * n + j] * b[j];
    b[i] = s;
  }
  for (let i = n - 1; i >= 0; i--) {
    let s = b[i];
    for (let j = i + 1; j < n; j++) s -= a[i * n + j] * b[j];
    b[i] = s / a[i * n + i];
  }
}

/**
 * Solves (H + E) x = b for a symmetric positive semidefinite H, where E >= 0 is the diagonal
 * added by the Gill–Murray modified Cholesky factorisation of the symmetrically scaled
 * matrix S·H·S (S = diag(scale)): every pivot of the scaled factor is at least `minPivot`
 * and the factor stays bounded, so directions of (near) zero curvature get a large but
 * finite step instead of a division by zero. `h` (n×n) is overwritten by the factor and
 * `b` by the solution. Returns the number of pivots that were raised.
 */
export function modifiedCholeskySolve(h: Float64Array, n: number, scale: Float64Array, b: Float64Array, minPivot: number): number {
  let maxDiag = 0;
  let maxOff = 0;
  for (let i = 0; i < n; i++) {
    const si = scale[i];
    for (let j = 0; j <= i; j++) {
      const v = h[i * n + j] * si * scale[j];
      h[i * n + j] = v;
      if (i === j) maxDiag = Math.max(maxDiag, Math.abs(v));
      else maxOff = Math.max(maxOff, Math.abs(v));
    }
  }
  // Gill–Murray bound on the factor's entries: beta^2 = max(gamma, xi / sqrt(n^2 - 1), eps).
  const beta2 = Math.max(maxDiag, n > 1 ? maxOff / Math.sqrt(n * n - 1) : 0, Number.EPSILON);
  let raised = 0;
  // Column-wise LDLᵀ in the lower triangle: L[i][j] (i > j) and d[j] on the diagonal.
  for (let j = 0; j < n; j++) {
    let c = h[j * n + j];
    for (let k = 0; k < j; k++) {
      const l = h[j * n + k];
      c -= l * l * h[k * n + k];
    }
    // c_ij = H_ij - sum_k L_ik L_jk d_k for i > j (kept unscaled by d_j for the bound).
    let theta = 0;
    for (let i = j + 1; i < n; i++) {
      let s = h[i * n + j];
      for (let k = 0; k < j; k++) s -= h[i * n + k] * h[j * n + k] * h[k * n + k];
      h[i * n + j] = s;
      theta = Math.max(theta, Math.abs(s));
    }
    let d = Math.max(Math.abs(c), (theta * theta) / beta2, minPivot);
    if (!(d === c)) raised++;
    if (!Number.isFinite(d)) d = minPivot;
    h[j * n + j] = d;
    for (let i = j + 1; i < n; i++) h[i * n + j] /= d;
  }
  for (let i = 0; i < n; i++) b[i] *= scale[i];
  for (let i = 1; i < n; i++) {
    let s = b[i];
    for (let k = 0; k < i; k++) s -= h[i * n + k] * b[k];
    b[i] = s;
  }
  for (let i = 0; i < n; i++) b[i] /= h[i * n + i];
  for (let i = n - 2; i >= 0; i--) {
    let s = b[i];
    for (let k = i + 1; k < n; k++) s -= h[k * n + i] * b[k];
    b[i] = s;
  }
  for (let i = 0; i < n; i++) b[i] *= scale[i];
  return raised;
}

export interface RowEchelon {
  readonly rank: number;
  /** Column of the pivot of each of the first `rank` rows of `reduced`. */
  readonly pivotColumns: Int32Array;
  /** Reduced row echelon form (rows × cols, row-major): pivot columns are unit vectors. */
  readonly reduced: Float64Array;
}

/**
 * Gauss–Jordan reduction of a copy of `a` (rows × cols) with complete pivoting: each step
 * takes the largest remaining entry as the pivot. An entry at or below
 * `relativeTolerance` times the largest entry of `a` counts as zero.
 */
export function reducedRowEchelon(a: ArrayLike<number>, rows: number, cols: number, relativeTolerance: number): RowEchelon {
  const m = new Float64Array(rows * cols);
  for (let i = 0; i < rows * cols; i++) m[i] = a[i];
  let scale = 0;
  for (let i = 0; i < rows * cols; i++) scale = Math.max(scale, Math.abs(m[i]));
  const tol = relativeTolerance * scale;
  const isPivot = new Uint8Array(cols);
  const pivots = new Int32Array(Math.min(rows, cols));
  let rank = 0;
  while (rank < rows && rank < cols) {
    let bi = -1;
    let bj = -1;
    let best = tol;
    for (let i = rank; i < rows; i++) {
      for (let j = 0; j < cols; j++) {
        if (isPivot[j]) continue;
        const v = Math.abs(m[i * cols + j]);
        if (v > best) {
          best = v;
          bi = i;
          bj = j;
        }
      }
    }
    if (bi < 0) break;
    if (bi !== rank) swapRows(m, cols, rank, bi);
    const inv = 1 / m[rank * cols + bj];
    for (let j = 0; j < cols; j++) m[rank * cols + j] *= inv;
    m[rank * cols + bj] = 1;
    for (let i = 0; i < rows; i++) {
      if (i === rank) continue;
      const f = m[i * cols + bj];
      if (f === 0) continue;
      for (let j = 0; j < cols; j++) m[i * cols + j] -= f * m[rank * cols + j];
      m[i * cols + bj] = 0;
    }
    isPivot[bj] = 1;
    pivots[rank] = bj;
    rank++;
  }
  // Rows below the rank are numerically zero: clear them so the form is exact.
  for (let i = rank * cols; i < rows * cols; i++) m[i] = 0;
  return { rank, pivotColumns: pivots.subarray(0, rank), reduced: m };
}

/**
 * Basis of the null space {v : A v = 0} from a reduced row echelon form of A: one vector per
 * free column f (v_f = 1, v_pivot(r) = -reduced[r][f]). Returned as count × cols, row-major.
 */
export function nullSpaceBasis(e: RowEchelon, cols: number): { readonly count: number; readonly basis: Float64Array } {
  const isPivot = new Uint8Array(cols);
  for (let r = 0; r < e.rank; r++) isPivot[e.pivotColumns[r]] = 1;
  const count = cols - e.rank;
  const basis = new Float64Array(count * cols);
  let b = 0;
  for (let f = 0; f < cols; f++) {
    if (isPivot[f]) continue;
    basis[b * cols + f] = 1;
    for (let r = 0; r < e.rank; r++) basis[b * cols + e.pivotColumns[r]] = -e.reduced[r * cols + f];
    b++;
  }
  return { count, basis };
}

/**
 * Σ_i c[ci + i]·(x[i] - y[i]) for i < n, evaluated as Σ c·x - Σ c·y in twice the working
 * precision (Ogita, Rump & Oishi's Dot2: error-free TwoProduct by Dekker splitting and
 * TwoSum, errors summed separately). Used for conservation residuals, where the
 * difference is tiny compared with the terms. Falls back to the plain sum if a split
 * overflows.
 */
export function dot2Difference(c: ArrayLike<number>, ci: number, x: ArrayLike<number>, y: ArrayLike<number>, n: number): number {
  let s = 0;
  let err = 0;
  for (let pass = 0; pass < 2; pass++) {
    const v = pass === 0 ? x : y;
    for (let i = 0; i < n; i++) {
      const a = c[ci + i];
      if (a === 0) continue;
      const b = pass === 0 ? v[i] : -v[i];
      const p = a * b;
      let t = SPLITTER * a;
      const ah = t - (t - a);
      const al = a - ah;
      t = SPLITTER * b;
      const bh = t - (t - b);
      const bl = b - bh;
      const pe = al * bl - (((p - ah * bh) - al * bh) - ah * bl);
      const sn = s + p;
      const z = sn - s;
      const se = s - (sn - z) + (p - z);
      s = sn;
      err += se + pe;
    }
  }
  const r = s + err;
  if (Number.isFinite(r)) return r;
  let plain = 0;
  for (let i = 0; i < n; i++) plain += c[ci + i] * (x[i] - y[i]);
  return plain;
}

/**
 * (a·b - c·d) / e with the products and the difference formed exactly (TwoProduct and
 * TwoSum), so the only rounding is the final one or two: no cancellation when a·b ≈ c·d.
 */
export function accurateDifferenceOfProducts(a: number, b: number, c: number, d: number, e: number): number {
  const p = a * b;
  let t = SPLITTER * a;
  const ah = t - (t - a);
  const al = a - ah;
  t = SPLITTER * b;
  const bh = t - (t - b);
  const bl = b - bh;
  const pe = al * bl - (((p - ah * bh) - al * bh) - ah * bl);
  const q = c * d;
  t = SPLITTER * c;
  const ch = t - (t - c);
  const cl = c - ch;
  t = SPLITTER * d;
  const dh = t - (t - d);
  const dl = d - dh;
  const qe = cl * dl - (((q - ch * dh) - cl * dh) - ch * dl);
  const s = p - q;
  const z = s - p;
  const se = p - (s - z) + (-q - z);
  const r = (s + (se + pe - qe)) / e;
  return Number.isFinite(r) ? r : (a * b - c * d) / e;
}
