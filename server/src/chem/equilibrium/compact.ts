// The variable part of a prepared problem in compact form (only the species
// touched by the independent active reactions), shared by the extent-space
// Newton solver and the log-amount polish, with helpers for ln a.
import type { RowEchelon } from './linalg';
import { PURE, type Prepared } from './problem';

/** Pivot species of ν and the LU factors of ν on them, for turning amount changes into extent changes (polish.ts). */
export interface ExtentSystem {
  readonly pivots: Int32Array;
  readonly lu: Float64Array;
  readonly perm: Int32Array;
}

/**
 * What depends only on the basis stoichiometry ν (rho × m), filled in when first needed
 * (polish.ts): its reduced row echelon form, its conservation laws (a null-space basis), and
 * the extent system (null when ν is rank deficient). Never modified once computed.
 */
export interface Stoichiometry {
  echelon?: RowEchelon;
  laws?: { readonly count: number; readonly basis: Float64Array };
  extentSystem?: ExtentSystem | null;
}

export interface Compact {
  readonly m: number;
  readonly rho: number;
  /** Species index of each variable species. */
  readonly species: Int32Array;
  /** Stoichiometry of the basis reactions on the variable species, rho × m. */
  readonly nu: Float64Array;
  readonly lnK: Float64Array;
  /** 1 for a mixture species (ln a depends on n), 0 for a pure phase. */
  readonly mixture: Uint8Array;
  /** Positions of the mixture species. */
  readonly mixtureIndex: Int32Array;
  /** Mole-fraction group (0 gas, 1 liquid) or -1. */
  readonly group: Int8Array;
  /** Whether some variable species is in the gas group, and in the liquid group (else its ln N is never needed). */
  readonly hasGasGroup: boolean;
  readonly hasLiquidGroup: boolean;
  readonly offset: Float64Array;
  /**
   * Group amounts from species outside the variable set (inert members), plus the phantom
   * amount while one is in use; mutable so the phantom can be removed.
   */
  readonly groupInert: Float64Array;
  /** Phantom inert amount of each group (0 when the group cannot vanish or has a real inert member). */
  readonly phantom: Float64Array;
  /** Initial amounts of the variable species. */
  readonly n0: Float64Array;
  /** Scale for relative tests: Σ n0 over all species (at least the smallest positive double). */
  readonly total: number;
  /** Derived from ν alone, computed once (shared by solves with the same ν, see `stoichiometryOf`). */
  readonly stoichiometry: Stoichiometry;
}

/** The ν (rho × m) of the last general solve and what was derived from it. */
let lastStoichiometry: { readonly rho: number; readonly m: number; readonly nu: Float64Array; readonly derived: Stoichiometry } | undefined;

/**
 * The derived data for ν: those of the previous general solve when its ν has the same shape
 * and the same entries (the usual case when a notebook re-solves a batch, or solves several
 * batches of one reaction set), else a fresh, empty record. Exact: everything in it is a
 * deterministic function of ν.
 */
function stoichiometryOf(nu: Float64Array, rho: number, m: number): Stoichiometry {
  const last = lastStoichiometry;
  if (last && last.rho === rho && last.m === m) {
    let same = true;
    for (let q = 0; q < rho * m && same; q++) same = Object.is(last.nu[q], nu[q]);
    if (same) return last.derived;
  }
  const derived: Stoichiometry = {};
  lastStoichiometry = { rho, m, nu: nu.slice(), derived };
  return derived;
}

/**
 * Amount of the phantom inert, relative to the total amount, given to a mole-fraction phase
 * that could vanish (it has no inert member and the reactions can move its species into
 * other phases). It keeps every mole fraction defined while the phase dwindles, so the
 * Newton iterations never meet a phase of zero amount; its effect on activities is this
 * small, and it is removed before the final polish.
 */
export const PHANTOM_FRACTION = 1e-30;

/**
 * The arrays of the last compact problem, reused by the next one of the same shape: a
 * compact problem lives for one solve (nothing in a result refers to it) and solves are
 * not re-entrant, so `compact` can rewrite them. The mixture index, whose length depends
 * on the phases, is replaced when that length changes.
 */
class CompactArrays {
  readonly nu: Float64Array;
  readonly lnK: Float64Array;
  readonly mixture: Uint8Array;
  readonly group: Int8Array;
  readonly offset: Float64Array;
  readonly n0: Float64Array;
  readonly groupInert = new Float64Array(2);
  readonly phantom = new Float64Array(2);
  mixtureIndex = new Int32Array(0);
  constructor(
    readonly m: number,
    readonly rho: number,
  ) {
    this.nu = new Float64Array(rho * m);
    this.lnK = new Float64Array(rho);
    this.mixture = new Uint8Array(m);
    this.group = new Int8Array(m);
    this.offset = new Float64Array(m);
    this.n0 = new Float64Array(m);
  }
}

let pooledArrays: CompactArrays | undefined;

/** The compact form of a prepared problem; valid until the next call (its arrays are reused). */
export function compact(p: Prepared): Compact {
  const S = p.speciesCount;
  const m = p.variable.length;
  const rho = p.basis.length;
  if (!pooledArrays || pooledArrays.m !== m || pooledArrays.rho !== rho) pooledArrays = new CompactArrays(m, rho);
  const arrays = pooledArrays;
  const { nu, lnK, mixture, group, offset, n0, groupInert, phantom } = arrays;
  for (let k = 0; k < rho; k++) {
    const r = p.basis[k];
    lnK[k] = p.lnK[r];
    for (let j = 0; j < m; j++) nu[k * m + j] = p.nu[r * S + p.variable[j]];
  }
  for (let j = 0; j < m; j++) {
    const i = p.variable[j];
    mixture[j] = p.model[i] === PURE ? 0 : 1;
    group[j] = p.group[i];
    offset[j] = p.offset[i];
    n0[j] = p.n0[i];
  }
  const total = Math.max(p.totalAmount, Number.MIN_VALUE);
  let mixtureCount = 0;
  for (let j = 0; j < m; j++) mixtureCount += mixture[j];
  if (arrays.mixtureIndex.length !== mixtureCount) arrays.mixtureIndex = new Int32Array(mixtureCount);
  const mixtureIndex = arrays.mixtureIndex;
  for (let j = 0, q = 0; j < m; j++) if (mixture[j]) mixtureIndex[q++] = j;
  for (let g = 0; g < 2; g++) {
    groupInert[g] = p.groupInert[g];
    phantom[g] = 0;
    let members = 0;
    let others = 0;
    for (let j = 0; j < m; j++) {
      if (group[j] === g) members++;
      else others++;
    }
    if (members > 0 && others > 0 && groupInert[g] === 0) {
      phantom[g] = PHANTOM_FRACTION * total;
      groupInert[g] = phantom[g];
    }
  }
  let hasGasGroup = false;
  let hasLiquidGroup = false;
  for (let j = 0; j < m; j++) {
    if (group[j] === 0) hasGasGroup = true;
    else if (group[j] === 1) hasLiquidGroup = true;
  }
  return {
    m,
    rho,
    species: p.variable,
    nu,
    lnK,
    mixture,
    mixtureIndex,
    group,
    hasGasGroup,
    hasLiquidGroup,
    offset,
    groupInert,
    phantom,
    n0,
    total,
    stoichiometry: stoichiometryOf(nu, rho, m),
  };
}

/** Group totals (inert members included) into `totals` (length 2). */
export function groupTotals(c: Compact, n: Float64Array, totals: Float64Array): void {
  totals[0] = c.groupInert[0];
  totals[1] = c.groupInert[1];
  for (let j = 0; j < c.m; j++) {
    const g = c.group[j];
    if (g >= 0) totals[g] += n[j];
  }
}

/** ln a of every variable species into `out` (pure phases: their constant ln a). */
export function logActivities(c: Compact, n: Float64Array, totals: Float64Array, out: Float64Array): void {
  // ln N of a group only when it has members: only they use it (and the logarithm is the costly part here).
  const lg0 = c.hasGasGroup ? Math.log(totals[0]) : 0;
  const lg1 = c.hasLiquidGroup ? Math.log(totals[1]) : 0;
  for (let j = 0; j < c.m; j++) {
    if (!c.mixture[j]) {
      out[j] = c.offset[j];
      continue;
    }
    const g = c.group[j];
    out[j] = Math.log(n[j]) + c.offset[j] - (g === 0 ? lg0 : g === 1 ? lg1 : 0);
  }
}
