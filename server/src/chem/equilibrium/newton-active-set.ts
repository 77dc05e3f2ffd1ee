// The active set of the extent Newton: the held-at-zero flags of the variable
// species, the reduced directions (reaction combinations that keep the held
// species at zero), holding and releasing a species, and the Lagrange
// multipliers that say when forming a held pure phase would lower G.
import type { Compact } from './compact';
import { luFactor, luSolve, nullSpaceBasis, reducedRowEchelon } from './linalg';

/** Relative pivot tolerance for ranks of constraint and stoichiometric matrices. */
export const RANK_TOLERANCE = 1e-10;
/** A pure phase held at zero is released when its multiplier (in ln units) is below minus this. */
export const MULTIPLIER_TOLERANCE = 1e-9;

/** Directions of the reduced space: reactions combined so that pure phases held at zero stay zero. */
export interface Directions {
  readonly k: number;
  /** Species change of each direction, k × m. */
  readonly s: Float64Array;
  /** Σ z·ln K of each direction. */
  readonly kappa: Float64Array;
  /** Each direction in basis-reaction extents, k × rho. */
  readonly z: Float64Array;
}

/** Held-at-zero flags of a variable species: free, an independent active constraint, or implied by the others. */
export const FREE = 0;
export const HELD = 1;
export const IMPLIED = 2;

/** Reduced directions for the held set: a basis of {z : (ν z)_j = 0 for every held j}. */
export function buildDirections(c: Compact, held: Uint8Array): Directions {
  const { m, rho } = c;
  const rows: number[] = [];
  for (let j = 0; j < m; j++) if (held[j] === HELD) rows.push(j);
  if (rows.length === 0) {
    const z = new Float64Array(rho * rho);
    for (let k = 0; k < rho; k++) z[k * rho + k] = 1;
    return { k: rho, s: c.nu, kappa: c.lnK, z };
  }
  const a = new Float64Array(rows.length * rho);
  for (let w = 0; w < rows.length; w++) for (let k = 0; k < rho; k++) a[w * rho + k] = c.nu[k * m + rows[w]];
  const { count, basis } = nullSpaceBasis(reducedRowEchelon(a, rows.length, rho, RANK_TOLERANCE), rho);
  const s = new Float64Array(count * m);
  const kappa = new Float64Array(count);
  for (let d = 0; d < count; d++) {
    let kap = 0;
    for (let k = 0; k < rho; k++) {
      const zk = basis[d * rho + k];
      if (zk === 0) continue;
      kap += zk * c.lnK[k];
      for (let j = 0; j < m; j++) s[d * m + j] += zk * c.nu[k * m + j];
    }
    kappa[d] = kap;
    for (let j = 0; j < m; j++) if (held[j] !== FREE) s[d * m + j] = 0;
  }
  return { k: count, s, kappa, z: basis };
}

/** Rank of the constraint rows of the held species plus `extra` (or -1 for none). */
function heldRank(c: Compact, held: Uint8Array, extra: number): { rank: number; count: number } {
  const rows: number[] = [];
  for (let j = 0; j < c.m; j++) if (held[j] === HELD) rows.push(j);
  if (extra >= 0) rows.push(extra);
  const a = new Float64Array(rows.length * c.rho);
  for (let w = 0; w < rows.length; w++) for (let k = 0; k < c.rho; k++) a[w * c.rho + k] = c.nu[k * c.m + rows[w]];
  return { rank: reducedRowEchelon(a, rows.length, c.rho, RANK_TOLERANCE).rank, count: rows.length };
}


/** Releases held species j, turning implied zeros that became independent into constraints. */
export function release(c: Compact, held: Uint8Array, j: number): void {
  held[j] = FREE;
  promoteImplied(c, held);
}

/** Holds species j at zero: as an independent constraint, or as implied by the others. */
export function holdAtZero(c: Compact, held: Uint8Array, j: number): void {
  const { rank, count } = heldRank(c, held, j);
  held[j] = rank === count ? HELD : IMPLIED;
}

/** After releasing a constraint, implied zeros that became independent turn into constraints. */
function promoteImplied(c: Compact, held: Uint8Array): void {
  for (let j = 0; j < c.m; j++) {
    if (held[j] !== IMPLIED) continue;
    held[j] = FREE;
    holdAtZero(c, held, j);
  }
}

/**
 * Lagrange multipliers of the held phases at a subspace optimum: g = Aᵀλ, with A the
 * rows (ν·ξ)_j of the held species (least squares through AAᵀ). λ_j < 0 means forming
 * phase j lowers G. Returns the pure phase with the most negative multiplier (not the
 * locked one), or -1 when none is below −MULTIPLIER_TOLERANCE. A held mixture species (a
 * member of an absent phase, or one whose zero such a phase forces) is never released here:
 * whether its phase forms is for the tangent-plane test. It has no ln a; its pure-phase
 * value is used instead, which only shifts its own multiplier when its row is in A.
 */
export function negativeMultiplier(c: Compact, held: Uint8Array, L: Float64Array, g: Float64Array, locked: number): number {
  const { m, rho } = c;
  const rows: number[] = [];
  for (let j = 0; j < m; j++) if (held[j] === HELD) rows.push(j);
  const w = rows.length;
  if (w === 0) return -1;
  for (let r = 0; r < rho; r++) {
    let sum = -c.lnK[r];
    for (let j = 0; j < m; j++) {
      const v = c.nu[r * m + j];
      if (v !== 0) sum += v * (held[j] !== FREE && c.mixture[j] ? c.offset[j] : L[j]);
    }
    g[r] = sum;
  }
  const aat = new Float64Array(w * w);
  const rhs = new Float64Array(w);
  for (let x = 0; x < w; x++) {
    let sum = 0;
    for (let r = 0; r < rho; r++) sum += c.nu[r * m + rows[x]] * g[r];
    rhs[x] = sum;
    for (let y = 0; y < w; y++) {
      let dot = 0;
      for (let r = 0; r < rho; r++) dot += c.nu[r * m + rows[x]] * c.nu[r * m + rows[y]];
      aat[x * w + y] = dot;
    }
  }
  const perm = new Int32Array(w);
  if (!luFactor(aat, w, perm)) return -1;
  luSolve(aat, w, perm, rhs);
  let worst = -1;
  let min = -MULTIPLIER_TOLERANCE;
  for (let x = 0; x < w; x++) {
    if (rows[x] === locked || c.mixture[rows[x]]) continue;
    if (rhs[x] < min) {
      min = rhs[x];
      worst = rows[x];
    }
  }
  return worst;
}
