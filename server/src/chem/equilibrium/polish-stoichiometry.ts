// What the polish derives from the basis stoichiometry ν: its conservation laws
// and echelon form (computed once per ν and kept on Compact.stoichiometry), the
// laws rewritten for one polish with the most abundant species as pivots, and
// the change of the basis extents that gives a change of the amounts.
import type { Compact } from './compact';
import { luFactor, luSolve, nullSpaceBasis, reducedRowEchelon, swapRows, type RowEchelon } from './linalg';
import { FREE, RANK_TOLERANCE } from './newton-active-set';
import type { ExtentState } from './newton-state';

/** Pivot threshold when rewriting the conservation laws (fraction of the largest entry). */
const LAW_PIVOT_RATIO = 0.01;
/** Entries of a rewritten conservation law below this fraction of its largest are rounding residue. */
const LAW_CLEANUP = 1e-12;

/** The scratch arrays conservationRows writes (part of the polish workspace). */
export interface LawWorkspace {
  /** The conservation laws as rewritten by conservationRows (laws × m). */
  readonly laws: Float64Array;
  readonly lawPivotUsed: Uint8Array;
  /** Each column's largest entry among the remaining laws, and its first law. */
  readonly columnLargest: Float64Array;
  readonly columnRow: Int32Array;
}

/** Conservation laws of the basis reactions over the variable species (a null-space basis of ν), computed once per ν. */
export function conservationLaws(c: Compact): { readonly count: number; readonly basis: Float64Array } {
  const derived = c.stoichiometry;
  if (!derived.laws) derived.laws = nullSpaceBasis(stoichiometricEchelon(c), c.m);
  return derived.laws;
}

/** Reduced row echelon form of the basis stoichiometry ν (rho × m), computed once per ν. */
function stoichiometricEchelon(c: Compact): RowEchelon {
  const derived = c.stoichiometry;
  if (!derived.echelon) derived.echelon = reducedRowEchelon(c.nu, c.rho, c.m, RANK_TOLERANCE);
  return derived.echelon;
}

/**
 * The conservation laws for the polish, rewritten by Gauss–Jordan elimination whose pivots
 * are the most abundant free species (among columns with an entry of at least
 * LAW_PIVOT_RATIO of the largest): each major species then appears in one law only, and a
 * law whose pivot is a trace species involves trace species alone, so a small amount fixed
 * by conservation is not disturbed by the rounding of the major ones. Entries below
 * LAW_CLEANUP of their row's largest are rounding residue and set to zero. Laws that vanish
 * on the free species (implied by held zeros) are dropped. Rows span all variable species
 * (held ones included, for the right-hand sides c·n0). The rows are left in `ws.laws`; returns
 * how many there are.
 */
export function conservationRows(c: Compact, held: Uint8Array, n: Float64Array, ws: LawWorkspace): number {
  const { m } = c;
  const all = conservationLaws(c);
  const rows = ws.laws;
  const total = all.count;
  for (let q = 0; q < total * m; q++) rows[q] = all.basis[q];
  const used = ws.lawPivotUsed;
  for (let j = 0; j < m; j++) used[j] = 0;
  let rank = 0;
  const { columnLargest, columnRow } = ws;
  for (; rank < total; rank++) {
    // One pass over the remaining laws: the largest entry on the free species, and each
    // column's largest entry with its first law: the values the two separate scans would
    // give (Math.max keeps a NaN, which stops the rewrite; `>` skips it).
    let largest = 0;
    for (let j = 0; j < m; j++) {
      columnLargest[j] = 0;
      columnRow[j] = -1;
    }
    for (let l = rank; l < total; l++) {
      for (let j = 0; j < m; j++) {
        if (held[j] !== FREE) continue;
        const v = Math.abs(rows[l * m + j]);
        largest = Math.max(largest, v);
        if (v > columnLargest[j]) {
          columnLargest[j] = v;
          columnRow[j] = l;
        }
      }
    }
    if (!(largest > RANK_TOLERANCE)) break;
    let col = -1;
    let row = -1;
    for (let j = 0; j < m; j++) {
      if (held[j] !== FREE || used[j]) continue;
      const r = columnRow[j];
      const big = columnLargest[j];
      if (big < LAW_PIVOT_RATIO * largest) continue;
      if (col < 0 || n[j] > n[col]) {
        col = j;
        row = r;
      }
    }
    if (col < 0) break;
    used[col] = 1;
    if (row !== rank) swapRows(rows, m, row, rank);
    const inv = 1 / rows[rank * m + col];
    for (let j = 0; j < m; j++) rows[rank * m + j] *= inv;
    rows[rank * m + col] = 1;
    for (let l = 0; l < total; l++) {
      if (l === rank) continue;
      const f = rows[l * m + col];
      if (f === 0) continue;
      for (let j = 0; j < m; j++) rows[l * m + j] -= f * rows[rank * m + j];
      rows[l * m + col] = 0;
    }
  }
  for (let l = 0; l < rank; l++) {
    let big = 0;
    for (let j = 0; j < m; j++) big = Math.max(big, Math.abs(rows[l * m + j]));
    for (let j = 0; j < m; j++) if (Math.abs(rows[l * m + j]) < LAW_CLEANUP * big) rows[l * m + j] = 0;
  }
  return rank;
}

/** ξ += Δξ with ν·Δξ = Δn on a set of pivot species (complete-pivoting echelon of ν) where ν is best conditioned. */
export function updateExtents(c: Compact, st: ExtentState, amounts: Float64Array): void {
  const { m, rho } = c;
  let cached = c.stoichiometry.extentSystem;
  if (cached === undefined) {
    const e = stoichiometricEchelon(c);
    if (e.rank !== rho) cached = null;
    else {
      const a = new Float64Array(rho * rho);
      for (let i = 0; i < rho; i++) for (let r = 0; r < rho; r++) a[i * rho + r] = c.nu[r * m + e.pivotColumns[i]];
      const perm = new Int32Array(rho);
      cached = luFactor(a, rho, perm) ? { pivots: e.pivotColumns, lu: a, perm } : null;
    }
    c.stoichiometry.extentSystem = cached;
  }
  if (cached === null) return;
  const b = new Float64Array(rho);
  for (let i = 0; i < rho; i++) {
    const j = cached.pivots[i];
    b[i] = amounts[j] - st.n[j];
  }
  luSolve(cached.lu, rho, cached.perm, b);
  for (let r = 0; r < rho; r++) st.xi[r] += b[r];
}
