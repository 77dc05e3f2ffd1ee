// The working basis of the extent Newton's directions, adapted to the current
// amounts: a Gauss–Jordan rewrite with the least abundant species as pivots, so
// that each trace species appears in one direction only.
import type { Compact } from './compact';
import { swapRows } from './linalg';
import type { Workspace } from './newton-kernels';

/** Below this fraction of the largest amount a mixture species counts as trace for the adapted basis. */
const TRACE_FRACTION = 1e-6;
/** Pivot threshold of the adapted basis: a column qualifies if its entry is at least this fraction of the largest. */
const BASIS_PIVOT_RATIO = 0.01;

/**
 * Rewrites the directions in place into a basis adapted to the current amounts (Newton's
 * step does not depend on the basis, its rounding does): Gauss–Jordan elimination whose
 * pivot in each step is the least abundant mixture species among the columns with an
 * entry of at least BASIS_PIVOT_RATIO times the largest remaining one. Each trace species
 * then appears in one direction only, so its 1/n sits on the Hessian diagonal instead of
 * swamping the curvature of combinations that do not involve it.
 */
export function adaptBasis(c: Compact, n: Float64Array, s: Float64Array, kappa: Float64Array, z: Float64Array, k: number, ws: Workspace): void {
  const { m, rho } = c;
  const { used, columnLargest, columnRow } = ws;
  used.fill(0);
  for (let step = 0; step < k; step++) {
    // One pass over the remaining rows: the largest entry, and each column's largest entry
    // with its first row: the values the two separate scans would give (Math.max keeps a NaN,
    // which stops the rewrite; `>` skips it).
    let largest = 0;
    for (let j = 0; j < m; j++) {
      columnLargest[j] = 0;
      columnRow[j] = -1;
    }
    for (let a = step; a < k; a++) {
      for (let j = 0; j < m; j++) {
        const v = Math.abs(s[a * m + j]);
        largest = Math.max(largest, v);
        if (v > columnLargest[j]) {
          columnLargest[j] = v;
          columnRow[j] = a;
        }
      }
    }
    if (!(largest > 0)) return;
    let col = -1;
    let row = -1;
    let best = Infinity;
    for (let j = 0; j < m; j++) {
      if (used[j]) continue;
      const r = columnRow[j];
      const big = columnLargest[j];
      if (big < BASIS_PIVOT_RATIO * largest) continue;
      const weight = c.mixture[j] ? n[j] : Infinity;
      if (col < 0 || weight < best) {
        best = weight;
        col = j;
        row = r;
      }
    }
    if (col < 0) return;
    used[col] = 1;
    if (row !== step) {
      swapRows(s, m, row, step);
      swapRows(z, rho, row, step);
      const t = kappa[row];
      kappa[row] = kappa[step];
      kappa[step] = t;
    }
    const inv = 1 / s[step * m + col];
    for (let j = 0; j < m; j++) s[step * m + j] *= inv;
    s[step * m + col] = 1;
    for (let r = 0; r < rho; r++) z[step * rho + r] *= inv;
    kappa[step] *= inv;
    for (let a = 0; a < k; a++) {
      if (a === step) continue;
      const f = s[a * m + col];
      if (f === 0) continue;
      for (let j = 0; j < m; j++) s[a * m + j] -= f * s[step * m + j];
      s[a * m + col] = 0;
      for (let r = 0; r < rho; r++) z[a * rho + r] -= f * z[step * rho + r];
      kappa[a] -= f * kappa[step];
    }
  }
}

/** Whether some trace mixture species (below TRACE_FRACTION of the largest amount) appears in more than one direction. */
export function needsAdapting(c: Compact, n: Float64Array, s: Float64Array, k: number): boolean {
  const { m } = c;
  let largest = 0;
  for (let j = 0; j < m; j++) largest = Math.max(largest, n[j]);
  const trace = TRACE_FRACTION * largest;
  for (let j = 0; j < m; j++) {
    if (!c.mixture[j] || n[j] >= trace) continue;
    let count = 0;
    for (let a = 0; a < k; a++) if (s[a * m + j] !== 0 && ++count > 1) return true;
  }
  return false;
}
