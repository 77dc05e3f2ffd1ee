// The variable part of a prepared problem in compact form (only the species
// touched by the independent active reactions), shared by the extent-space
// Newton solver and the log-amount polish, with helpers for ln a.
import { PURE, type Prepared } from './problem';

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
}

/**
 * Amount of the phantom inert, relative to the total amount, given to a mole-fraction phase
 * that could vanish (it has no inert member and the reactions can move its species into
 * other phases). It keeps every mole fraction defined while the phase dwindles, so the
 * Newton iterations never meet a phase of zero amount; its effect on activities is this
 * small, and it is removed before the final polish.
 */
export const PHANTOM_FRACTION = 1e-30;

export function compact(p: Prepared): Compact {
  const S = p.speciesCount;
  const m = p.variable.length;
  const rho = p.basis.length;
  const nu = new Float64Array(rho * m);
  const lnK = new Float64Array(rho);
  for (let k = 0; k < rho; k++) {
    const r = p.basis[k];
    lnK[k] = p.lnK[r];
    for (let j = 0; j < m; j++) nu[k * m + j] = p.nu[r * S + p.variable[j]];
  }
  const mixture = new Uint8Array(m);
  const group = new Int8Array(m);
  const offset = new Float64Array(m);
  const n0 = new Float64Array(m);
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
  const mixtureIndex = new Int32Array(mixtureCount);
  for (let j = 0, q = 0; j < m; j++) if (mixture[j]) mixtureIndex[q++] = j;
  const groupInert = Float64Array.from(p.groupInert);
  const phantom = new Float64Array(2);
  for (let g = 0; g < 2; g++) {
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
  return {
    m,
    rho,
    species: p.variable,
    nu,
    lnK,
    mixture,
    mixtureIndex,
    group,
    offset,
    groupInert,
    phantom,
    n0,
    total,
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
  const lg0 = Math.log(totals[0]);
  const lg1 = Math.log(totals[1]);
  for (let j = 0; j < c.m; j++) {
    if (!c.mixture[j]) {
      out[j] = c.offset[j];
      continue;
    }
    const g = c.group[j];
    out[j] = Math.log(n[j]) + c.offset[j] - (g === 0 ? lg0 : g === 1 ? lg1 : 0);
  }
}
