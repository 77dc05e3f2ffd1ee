// The general path, stage 1: Newton's method on the convex Gibbs (Helmholtz at
// constant volume) energy in the space of reaction extents, with a line search
// on the directional derivative and an active set for pure phases (solids,
// solvent) that run out or never form.
import { groupTotals, logActivities, type Compact } from './compact';
import { luFactor, luSolve, modifiedCholeskySolve, nullSpaceBasis, reducedRowEchelon, swapRows } from './linalg';
import type { Prepared } from './problem';

/** Each reaction that first makes a species formable is run this fraction of the way to its limit, for a strictly interior start. */
export const KICK_FRACTION = 0.1;
/** A phase with a phantom whose real amount is at most this fraction of the total may be re-seeded, or held absent after a failure. */
export const NUCLEATION_FRACTION = 1e-9;
/**
 * A mole-fraction phase kept only by its phantom inert (real amount at most this fraction of
 * the total, where the phantom is 1e-30 of it) is absent at equilibrium; a pure phase left at
 * most this much when such a phase goes formed only alongside it and goes too.
 */
export const VANISH_FRACTION = 1e-20;
/**
 * Subspace optimum reached when no species would change by more than this fraction of
 * max(n_j, RESOLUTION·total) in a full Newton step: the major species are then accurate
 * enough for the quadratically convergent polish to finish.
 */
export const STEP_TOLERANCE = 1e-6;
/**
 * Amounts below this fraction of the total are trace for the extent iteration: a step
 * that shrinks one cannot be resolved (n + t·d cancels), so a shrinking trace species'
 * step is measured against this floor and its precision left to the log-amount polish.
 * A growing species is measured against its own amount.
 */
export const RESOLUTION = 1e-9;
/** The subspace optimum is also reached when the Newton decrement λ² = −gᵀp is below this times the total amount. */
export const DECREMENT_TOLERANCE = 1e-24;
/** A species change within this many rounding units of the terms that form it is noise. */
const DIRECTION_NOISE = 64 * Number.EPSILON;
/** A line-search step that changes no species by more than this fraction (of max(n, floor)) made no progress. */
const STALL_CHANGE = 4 * Number.EPSILON;
/**
 * After a stall, a Newton step of at most this relative size, or a Newton decrement (the
 * Gibbs energy still to gain, in units of RT) of at most STALL_DECREMENT_TOLERANCE times
 * the total amount, is accepted as a start for the polish: what is left is in species too
 * small to matter to G (major-species errors below ~1e-5), which the polish resolves.
 */
export const STALL_STEP_TOLERANCE = 1e-3;
export const STALL_DECREMENT_TOLERANCE = 1e-10;
/** Smallest pivot of the Jacobi-scaled reduced Hessian (modified Cholesky): zero-curvature directions get a large finite step. */
export const MIN_PIVOT = 1e-10;
/** A pure phase held at zero is released when its multiplier (in ln units) is below minus this. */
export const MULTIPLIER_TOLERANCE = 1e-9;
/** Line search accepts a step t when the directional derivative satisfies φ'(t) <= this × |φ'(0)| (a decrease for convex φ). */
export const LINE_SEARCH_SLOPE = 0.5;
/** Iteration cap of the extent-space Newton loop, active-set changes included (per set of absent mole-fraction phases). */
export const MAX_ITERATIONS = 500;
/** Below this fraction of the largest amount a mixture species counts as trace for the adapted basis. */
const TRACE_FRACTION = 1e-6;
/** Pivot threshold of the adapted basis: a column qualifies if its entry is at least this fraction of the largest. */
const BASIS_PIVOT_RATIO = 0.01;
/** Step growth per expansion of the line search, and the most expansions (4^30 ≈ 1e18). */
const EXPANSION_FACTOR = 4;
const MAX_EXPANSIONS = 30;
/** Iteration cap of the one-dimensional root find of φ' in the line search. */
const LINE_SEARCH_ITERATIONS = 60;
/** Relative pivot tolerance for ranks of constraint and stoichiometric matrices. */
export const RANK_TOLERANCE = 1e-10;
/**
 * The extent iteration does not push a mixture amount below this fraction of the total
 * (a boundary for the line search): smaller amounts would approach subnormal doubles,
 * where n + t·d is quantised; the log-amount polish takes them the rest of the way.
 */
export const AMOUNT_FLOOR = 1e-250;
/**
 * A mixture species already below this fraction of the total that the step would take
 * under AMOUNT_FLOOR stays at the floor instead of limiting the step: in the adapted
 * basis it is the pivot of its own direction, so its change (about n·|ln Q/K|) is far
 * below anything the other species or conservation can notice; the polish, referenced
 * to n0, then puts it at its true value.
 */
export const CLAMPABLE_AMOUNT = 1e-200;
/** A mixture amount that rounding would make non-positive keeps this fraction of its previous value. */
const POSITIVE_FLOOR = 2 ** -40;

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

export interface ExtentState {
  readonly n: Float64Array;
  readonly xi: Float64Array;
  readonly held: Uint8Array;
  /**
   * Per mole-fraction group (GAS_GROUP, LIQUID_GROUP): 1 while the whole phase is held absent
   * (every member exactly 0 and held, no phantom). Its members are never released by the
   * multiplier test; whether the phase forms is decided by the tangent-plane test (solve.ts).
   */
  readonly absent: Uint8Array;
  iterations: number;
  /** `iterations` when the set of absent phases last changed: MAX_ITERATIONS counts from here. */
  iterationBase: number;
}

export interface StageOutcome {
  readonly ok: boolean;
  readonly message?: string;
  /** A variable species (compact index) whose equilibrium amount is below the double range: retrying cannot help. */
  readonly underflow?: number;
}

/**
 * The arrays of the last extent state, reused by the next solve of the same shape: a state
 * lives for one solve (the result is built from copies) and solves are not re-entrant.
 */
class StateArrays {
  readonly n: Float64Array;
  readonly xi: Float64Array;
  readonly held: Uint8Array;
  readonly absent = new Uint8Array(2);
  /** initialState: compact position of each species, -1 outside the variable set. */
  readonly position: Int32Array;
  constructor(
    readonly m: number,
    readonly rho: number,
    readonly speciesCount: number,
  ) {
    this.n = new Float64Array(m);
    this.xi = new Float64Array(rho);
    this.held = new Uint8Array(m);
    this.position = new Int32Array(speciesCount);
  }
}

let pooledState: StateArrays | undefined;

/** A start for the extent iteration other than n0: amounts (compact order) and the basis extents that reach them from n0. */
export interface WarmStart {
  readonly n: Float64Array;
  readonly xi: Float64Array;
}

/** Largest conservation residual, relative to the total amount, of a start given as warm. */
const WARM_RESIDUAL = 1e-13;

/**
 * The warm start for `start` (amounts per species, e.g. the equilibrium at a neighbouring
 * point of a sweep), or undefined when it cannot serve: it must conserve what n0 conserves
 * (n0 + ν·ξ for basis extents ξ, to WARM_RESIDUAL of the total), leave every species outside
 * the active reactions at its n0, and be strictly positive in every species the reactions
 * touch that can form (the cold start's kicks are what make the start interior otherwise).
 */
export function warmStart(c: Compact, p: Prepared, start: readonly number[]): WarmStart | undefined {
  const S = p.speciesCount;
  const { m, rho } = c;
  if (start.length !== S) return undefined;
  for (let i = 0; i < S; i++) {
    const x = start[i];
    if (!(x >= 0) || !Number.isFinite(x)) return undefined;
    if (!p.touched[i] && x !== p.n0[i]) return undefined;
  }
  const n = new Float64Array(m);
  for (let j = 0; j < m; j++) {
    const i = c.species[j];
    n[j] = start[i];
    if (!(n[j] > 0) && p.formable[i]) return undefined;
  }
  // Basis extents by least squares: (ν νᵀ) ξ = ν (start − n0), then the residual.
  const a = new Float64Array(rho * rho);
  const xi = new Float64Array(rho);
  for (let k = 0; k < rho; k++) {
    for (let l = 0; l < rho; l++) {
      let sum = 0;
      for (let j = 0; j < m; j++) sum += c.nu[k * m + j] * c.nu[l * m + j];
      a[k * rho + l] = sum;
    }
    let b = 0;
    for (let j = 0; j < m; j++) b += c.nu[k * m + j] * (n[j] - c.n0[j]);
    xi[k] = b;
  }
  const perm = new Int32Array(rho);
  if (!luFactor(a, rho, perm)) return undefined;
  luSolve(a, rho, perm, xi);
  for (let j = 0; j < m; j++) {
    let reached = c.n0[j];
    for (let k = 0; k < rho; k++) reached += c.nu[k * m + j] * xi[k];
    if (!(Math.abs(reached - n[j]) <= WARM_RESIDUAL * c.total)) return undefined;
  }
  return { n, xi };
}

/**
 * The starting point: n0, then each reaction that first makes a species formable is run a
 * fraction of the way (closure order). Valid until the next call (its arrays are reused).
 */
export function initialState(c: Compact, p: Prepared, warm?: WarmStart): ExtentState {
  const S = p.speciesCount;
  if (!pooledState || pooledState.m !== c.m || pooledState.rho !== c.rho || pooledState.speciesCount !== S) pooledState = new StateArrays(c.m, c.rho, S);
  const { n, xi, held, absent, position } = pooledState;
  n.set(c.n0);
  xi.fill(0);
  held.fill(0);
  absent.fill(0);
  position.fill(-1);
  if (warm) {
    // A strictly interior, conservation-equivalent start: no kicks needed.
    n.set(warm.n);
    xi.set(warm.xi);
    return { n, xi, held, absent, iterations: 0, iterationBase: 0 };
  }
  for (let j = 0; j < c.m; j++) position[c.species[j]] = j;
  for (let q = 0; q < p.kicks.length; q += 2) {
    const r = p.kicks[q];
    const dir = p.kicks[q + 1];
    if (dir === 0) {
      kickCombination(c, p, p.combinations[r], n, xi, position);
      continue;
    }
    let limit = Infinity;
    for (let i = 0; i < S; i++) {
      const v = p.nu[r * S + i] * dir;
      if (v < 0) limit = Math.min(limit, n[position[i]] / -v);
    }
    if (!(limit > 0) || !Number.isFinite(limit)) continue;
    const eps = KICK_FRACTION * limit * dir;
    for (let i = 0; i < S; i++) {
      const v = p.nu[r * S + i];
      if (v !== 0) n[position[i]] += v * eps;
    }
    for (let k = 0; k < c.rho; k++) xi[k] += p.basisCoefficients[r * c.rho + k] * eps;
  }
  for (let j = 0; j < c.m; j++) if (n[j] < 0) n[j] = 0;
  return { n, xi, held, absent, iterations: 0, iterationBase: 0 };
}

/**
 * Runs the reaction combination `extents` (one per reaction; see Prepared.combinations)
 * KICK_FRACTION of the way to the limit set by n >= 0, like a single-reaction kick: the
 * species it forms (none of which any single reaction could start) become positive.
 */
function kickCombination(c: Compact, p: Prepared, extents: Float64Array, n: Float64Array, xi: Float64Array, position: Int32Array): void {
  const S = p.speciesCount;
  const change = new Float64Array(S);
  for (let r = 0; r < p.reactionCount; r++) {
    const x = extents[r];
    if (x !== 0) for (let i = 0; i < S; i++) change[i] += p.nu[r * S + i] * x;
  }
  let limit = Infinity;
  for (let i = 0; i < S; i++) if (change[i] < 0 && position[i] >= 0) limit = Math.min(limit, n[position[i]] / -change[i]);
  if (!(limit > 0) || !Number.isFinite(limit)) return;
  const eps = KICK_FRACTION * limit;
  for (let i = 0; i < S; i++) if (change[i] !== 0 && position[i] >= 0) n[position[i]] += change[i] * eps;
  for (let r = 0; r < p.reactionCount; r++) {
    const x = extents[r];
    if (x !== 0) for (let k = 0; k < c.rho; k++) xi[k] += p.basisCoefficients[r * c.rho + k] * x * eps;
  }
}

/**
 * Re-seeds a mole-fraction phase that dwindled to its phantom amount (real amount at most
 * NUCLEATION_FRACTION of the total): each basis reaction that makes net amounts of its
 * species, and changes no held phase, is run KICK_FRACTION of the way to its limit in that
 * direction. Convexity means the Newton iteration then either grows the phase (it was
 * stable, but its gain in G at phantom level was below rounding) or removes it again.
 * Returns whether anything was moved.
 */
export function renucleate(c: Compact, st: ExtentState): boolean {
  const { m, rho } = c;
  const { n, xi, held } = st;
  let moved = false;
  for (let g = 0; g < 2; g++) {
    if (!(c.phantom[g] > 0)) continue;
    let real = 0;
    for (let j = 0; j < m; j++) if (c.group[j] === g) real += n[j];
    if (real > NUCLEATION_FRACTION * c.total) continue;
    for (let r = 0; r < rho; r++) {
      let net = 0;
      let touchesHeld = false;
      for (let j = 0; j < m; j++) {
        const v = c.nu[r * m + j];
        if (v === 0) continue;
        if (c.group[j] === g) net += v;
        if (held[j] !== FREE) touchesHeld = true;
      }
      if (net === 0 || touchesHeld) continue;
      const dir = net > 0 ? 1 : -1;
      let limit = Infinity;
      for (let j = 0; j < m; j++) {
        const v = c.nu[r * m + j] * dir;
        if (v < 0 && c.group[j] !== g) limit = Math.min(limit, n[j] / -v);
      }
      if (!(limit > 0) || !Number.isFinite(limit)) continue;
      const eps = KICK_FRACTION * limit * dir;
      for (let j = 0; j < m; j++) {
        const v = c.nu[r * m + j];
        if (v === 0) continue;
        const after = n[j] + v * eps;
        n[j] = after > 0 ? after : n[j] * POSITIVE_FLOOR;
      }
      xi[r] += eps;
      moved = true;
    }
  }
  return moved;
}

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

/**
 * Rewrites the directions in place into a basis adapted to the current amounts (Newton's
 * step does not depend on the basis, its rounding does): Gauss–Jordan elimination whose
 * pivot in each step is the least abundant mixture species among the columns with an
 * entry of at least BASIS_PIVOT_RATIO times the largest remaining one. Each trace species
 * then appears in one direction only, so its 1/n sits on the Hessian diagonal instead of
 * swamping the curvature of combinations that do not involve it.
 */
function adaptBasis(c: Compact, n: Float64Array, s: Float64Array, kappa: Float64Array, z: Float64Array, k: number, ws: Workspace): void {
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
function needsAdapting(c: Compact, n: Float64Array, s: Float64Array, k: number): boolean {
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

/** Rank of the constraint rows of the held species plus `extra` (or -1 for none). */
function heldRank(c: Compact, held: Uint8Array, extra: number): { rank: number; count: number } {
  const rows: number[] = [];
  for (let j = 0; j < c.m; j++) if (held[j] === HELD) rows.push(j);
  if (extra >= 0) rows.push(extra);
  const a = new Float64Array(rows.length * c.rho);
  for (let w = 0; w < rows.length; w++) for (let k = 0; k < c.rho; k++) a[w * c.rho + k] = c.nu[k * c.m + rows[w]];
  return { rank: reducedRowEchelon(a, rows.length, c.rho, RANK_TOLERANCE).rank, count: rows.length };
}

/** Holds species j at zero: as an independent constraint, or as implied by the others. */
export function holdAtZero(c: Compact, held: Uint8Array, j: number): void {
  hold(c, held, j);
}

/** Releases held species j, turning implied zeros that became independent into constraints. */
export function release(c: Compact, held: Uint8Array, j: number): void {
  held[j] = FREE;
  promoteImplied(c, held);
}

function hold(c: Compact, held: Uint8Array, j: number): void {
  const { rank, count } = heldRank(c, held, j);
  held[j] = rank === count ? HELD : IMPLIED;
}

/** After releasing a constraint, implied zeros that became independent turn into constraints. */
function promoteImplied(c: Compact, held: Uint8Array): void {
  for (let j = 0; j < c.m; j++) {
    if (held[j] !== IMPLIED) continue;
    held[j] = FREE;
    hold(c, held, j);
  }
}

/** The last workspace, reused by the next solve of the same size (solves are not re-entrant). */
let pooled: Workspace | undefined;

function workspaceFor(c: Compact): Workspace {
  if (!pooled || pooled.m !== c.m || pooled.rho !== c.rho || pooled.mixtures !== c.mixtureIndex.length) pooled = new Workspace(c);
  return pooled;
}

/** Scratch arrays of one solve. */
class Workspace {
  readonly m: number;
  readonly rho: number;
  readonly mixtures: number;
  readonly totals = new Float64Array(2);
  readonly logA: Float64Array;
  readonly trial: Float64Array;
  readonly d: Float64Array;
  readonly dxi: Float64Array;
  readonly g: Float64Array;
  readonly gz: Float64Array;
  readonly pz: Float64Array;
  readonly h: Float64Array;
  readonly scale: Float64Array;
  readonly groupSums: Float64Array;
  readonly s: Float64Array;
  readonly kappa: Float64Array;
  readonly z: Float64Array;
  readonly used: Uint8Array;
  /** adaptBasis: each column's largest entry among the remaining rows, and its first row. */
  readonly columnLargest: Float64Array;
  readonly columnRow: Int32Array;
  /** Directions weighted by 1/√n on the mixture species (k × mixture count) and the weights. */
  readonly weighted: Float64Array;
  readonly rootWeight: Float64Array;
  /** Per direction, the mixture positions of its non-zero weighted entries (k × mixture count), and how many. */
  readonly nonzero: Int32Array;
  readonly nonzeroCount: Int32Array;
  /** Per species, Σ |p_a s_aj| over the terms of the Newton step d_j. */
  readonly stepSize: Float64Array;
  /** φ''(t) at the last point evaluated by `slope`. */
  trialCurvature = Number.NaN;
  /** Relative sizes of the last species step (speciesStep). */
  largestStep = Number.NaN;
  majorStep = Number.NaN;
  /** Bounds of the last step (stepBounds): first pure phase to run out, first mixture species to reach zero. */
  tPure = Infinity;
  blocking = -1;
  tMix = Infinity;
  emptying = -1;
  constructor(c: Compact) {
    this.m = c.m;
    this.rho = c.rho;
    this.mixtures = c.mixtureIndex.length;
    this.logA = new Float64Array(c.m);
    this.trial = new Float64Array(c.m);
    this.d = new Float64Array(c.m);
    this.dxi = new Float64Array(c.rho);
    this.g = new Float64Array(c.rho);
    this.gz = new Float64Array(c.rho);
    this.pz = new Float64Array(c.rho);
    this.h = new Float64Array(c.rho * c.rho);
    this.scale = new Float64Array(c.rho);
    this.groupSums = new Float64Array(2 * c.rho);
    this.s = new Float64Array(c.rho * c.m);
    this.kappa = new Float64Array(c.rho);
    this.z = new Float64Array(c.rho * c.rho);
    this.used = new Uint8Array(c.m);
    this.columnLargest = new Float64Array(c.m);
    this.columnRow = new Int32Array(c.m);
    this.weighted = new Float64Array(c.rho * c.mixtureIndex.length);
    this.rootWeight = new Float64Array(c.mixtureIndex.length);
    this.nonzero = new Int32Array(c.rho * c.mixtureIndex.length);
    this.nonzeroCount = new Int32Array(c.rho);
    this.stepSize = new Float64Array(c.m);
  }
}

/*
 * The loops of one extent-Newton iteration, as separate functions: each is small and does
 * the heavy work, so the engine optimises it after a few solves, while extentNewton itself
 * only sequences them.
 */

/** Gradient of G in the directions: ws.gz[a] = Σ_j s_aj ln a_j − κ_a (ln a in ws.logA). */
function reducedGradient(c: Compact, ws: Workspace, s: Float64Array, kappa: Float64Array, k: number): void {
  const m = c.m;
  const L = ws.logA;
  for (let a = 0; a < k; a++) {
    let sum = -kappa[a];
    for (let j = 0; j < m; j++) {
      const v = s[a * m + j];
      if (v !== 0) sum += v * L[j];
    }
    ws.gz[a] = sum;
  }
}

/**
 * Reduced Hessian (lower triangle, into ws.h) = Σ_j s_aj s_bj / n_j over mixture species,
 * minus the phase terms; formed from rows weighted by 1/√n_j. Also the Jacobi scaling
 * (ws.scale) and each direction's sum over each mole-fraction group (ws.groupSums).
 * The directions are sparse (a reaction involves few species), so each row's non-zero
 * weighted entries are listed and a product of two rows runs over the shorter list. Exact:
 * a skipped term is (finite)·0 = ±0, and adding ±0 to a sum that starts at +0 changes
 * nothing (in round-to-nearest such a sum is never −0); should an entry not be finite,
 * every term is formed as before. Returns whether every entry of the directions is finite.
 */
function reducedHessian(c: Compact, ws: Workspace, n: Float64Array, s: Float64Array, k: number): boolean {
  const m = c.m;
  const h = ws.h;
  const gs = ws.groupSums;
  const mix = c.mixtureIndex;
  const mm = mix.length;
  const sw = ws.weighted;
  const nonzero = ws.nonzero;
  const nonzeroCount = ws.nonzeroCount;
  // A member of an absent phase (held at exactly 0) has a zero column in every direction: weight 0, not 1/0.
  for (let jj = 0; jj < mm; jj++) {
    const amount = n[mix[jj]];
    ws.rootWeight[jj] = amount > 0 ? 1 / Math.sqrt(amount) : 0;
  }
  let finiteDirections = true;
  let finiteWeighted = true;
  for (let a = 0; a < k; a++) {
    gs[2 * a] = 0;
    gs[2 * a + 1] = 0;
    let sq = 0;
    for (let j = 0; j < m; j++) {
      const v = s[a * m + j];
      if (v === 0) continue;
      if (!(Math.abs(v) < Infinity)) finiteDirections = false;
      sq += v * v;
      const g = c.group[j];
      if (g >= 0) gs[2 * a + g] += v;
    }
    let diag = 0;
    let count = 0;
    for (let jj = 0; jj < mm; jj++) {
      const v = s[a * m + mix[jj]] * ws.rootWeight[jj];
      sw[a * mm + jj] = v;
      diag += v * v;
      if (v !== 0) {
        nonzero[a * mm + count++] = jj;
        if (!(Math.abs(v) < Infinity)) finiteWeighted = false;
      }
    }
    nonzeroCount[a] = count;
    ws.scale[a] = diag > 0 ? 1 / Math.sqrt(diag) : Math.sqrt(c.total / Math.max(sq, Number.MIN_VALUE));
  }
  const t0 = ws.totals[0];
  const t1 = ws.totals[1];
  for (let a = 0; a < k; a++) {
    const ga0 = t0 > 0 ? gs[2 * a] / t0 : 0;
    const ga1 = t1 > 0 ? gs[2 * a + 1] / t1 : 0;
    for (let b = 0; b <= a; b++) {
      let sum = 0;
      if (finiteWeighted) {
        const row = nonzeroCount[a] <= nonzeroCount[b] ? a : b;
        const end = row * mm + nonzeroCount[row];
        for (let q = row * mm; q < end; q++) {
          const jj = nonzero[q];
          sum += sw[a * mm + jj] * sw[b * mm + jj];
        }
      } else for (let jj = 0; jj < mm; jj++) sum += sw[a * mm + jj] * sw[b * mm + jj];
      h[a * k + b] = sum - ga0 * gs[2 * b] - ga1 * gs[2 * b + 1];
    }
  }
  return finiteDirections;
}

/**
 * The species step d = Σ p_a s_a (ws.d, from the step p in ws.pz) and its relative size:
 * ws.largestStep (growth measured against the species' own amount, shrinking against
 * max(n, RESOLUTION·total)) and ws.majorStep (both against that floor: what is left outside
 * trace species). A change within DIRECTION_NOISE of the terms Σ |p_a s_aj| that form it is
 * rounding and not counted. The terms are summed in one pass over the directions; p is
 * finite here (the decrement is), so with finite directions a term with p_a = 0 or s_aj = 0
 * is ±0 and adds nothing; with some entry not finite the size takes every term, as its
 * definition says.
 */
function speciesStep(c: Compact, ws: Workspace, n: Float64Array, s: Float64Array, k: number, finiteDirections: boolean): void {
  const m = c.m;
  const d = ws.d;
  const size = ws.stepSize;
  for (let j = 0; j < m; j++) {
    d[j] = 0;
    size[j] = 0;
  }
  for (let a = 0; a < k; a++) {
    const pa = ws.pz[a];
    if (pa === 0) {
      if (!finiteDirections) for (let j = 0; j < m; j++) size[j] += Math.abs(pa * s[a * m + j]);
      continue;
    }
    for (let j = 0; j < m; j++) {
      const v = s[a * m + j];
      if (v === 0) continue;
      const term = pa * v;
      d[j] += term;
      size[j] += Math.abs(term);
    }
  }
  let largestStep = 0;
  let majorStep = 0;
  const floor = RESOLUTION * c.total;
  for (let j = 0; j < m; j++) {
    const dj = d[j];
    if (dj === 0) continue;
    if (Math.abs(dj) <= DIRECTION_NOISE * size[j]) continue;
    const relative = Math.abs(dj) / Math.max(n[j], floor);
    largestStep = Math.max(largestStep, dj > 0 ? dj / n[j] : relative);
    majorStep = Math.max(majorStep, relative);
  }
  ws.largestStep = largestStep;
  ws.majorStep = majorStep;
}

/** The step in basis-reaction extents (ws.dxi = Σ p_a z_a) and its Σ p·κ, returned. */
function extentStep(ws: Workspace, kappa: Float64Array, zb: Float64Array, k: number, rho: number): number {
  for (let r = 0; r < rho; r++) ws.dxi[r] = 0;
  for (let a = 0; a < k; a++) {
    const pa = ws.pz[a];
    if (pa !== 0) for (let r = 0; r < rho; r++) ws.dxi[r] += pa * zb[a * rho + r];
  }
  let pk = 0;
  for (let a = 0; a < k; a++) pk += ws.pz[a] * kappa[a];
  return pk;
}

/**
 * Bounds of the step along ws.d: the first free pure phase to run out (ws.tPure, ws.blocking)
 * and the first mixture species to reach zero among those above CLAMPABLE_AMOUNT of the
 * total (ws.tMix, ws.emptying); Infinity and -1 when there is none.
 */
function stepBounds(c: Compact, ws: Workspace, n: Float64Array, held: Uint8Array): void {
  const d = ws.d;
  let tPure = Infinity;
  let blocking = -1;
  let tMix = Infinity;
  let emptying = -1;
  for (let j = 0; j < c.m; j++) {
    if (d[j] >= 0 || held[j] !== FREE) continue;
    const t = n[j] / -d[j];
    if (c.mixture[j]) {
      if (n[j] > CLAMPABLE_AMOUNT * c.total && t < tMix) {
        tMix = t;
        emptying = j;
      }
    } else if (t < tPure) {
      tPure = t;
      blocking = j;
    }
  }
  ws.tPure = tPure;
  ws.blocking = blocking;
  ws.tMix = tMix;
  ws.emptying = emptying;
}

/**
 * n += t·d, keeping mixture amounts positive (a trace species clamped at AMOUNT_FLOOR of the
 * total, or a fraction of its amount if rounding would empty it) and setting a pure phase
 * that runs out (`emptied`, the blocking phase when the step goes exactly to it) to exactly
 * 0. Returns whether some species changed by more than STALL_CHANGE of max(n, floor).
 */
function applyStep(c: Compact, n: Float64Array, d: Float64Array, t: number, emptied: number, floor: number): boolean {
  let moved = false;
  for (let j = 0; j < c.m; j++) {
    const dj = d[j];
    if (dj === 0) continue;
    const before = n[j];
    let after = before + t * dj;
    if (Math.abs(after - before) > STALL_CHANGE * Math.max(before, floor)) moved = true;
    if (c.mixture[j]) {
      if (dj < 0 && before <= CLAMPABLE_AMOUNT * c.total) after = Math.max(after, AMOUNT_FLOOR * c.total);
      else if (!(after > 0)) after = before * POSITIVE_FLOOR;
    } else if (after <= 0 || j === emptied) after = 0;
    n[j] = after;
  }
  return moved;
}

/**
 * Minimises G(ξ)/RT over the extents, n = n0 + ν·ξ >= 0. Gradient: ln Q_r − ln K_r.
 * Hessian: νᵀ·D·ν with D = diag(1/n_i) minus 1/N_phase on each mole-fraction phase
 * block (ideal mixing). Method choices:
 * - the amounts n are the state (updated by n += t·ν·Δξ, not recomputed as n0 + ν·ξ), so
 *   a shrinking species keeps relative precision down to AMOUNT_FLOOR;
 * - the directions are re-based every time a trace species would appear in more than one
 *   of them (adaptBasis: Gauss–Jordan with the least abundant species as pivots) — Newton's
 *   step is basis-independent, but this keeps each 1/n of a trace species on the Hessian
 *   diagonal instead of cancelling the curvature of the other directions;
 * - the reduced Hessian is Jacobi-scaled and factored by a modified Cholesky, so directions
 *   with no curvature (a solid-only exchange, a pure gas at constant pressure) take a long
 *   step that stops where a phase runs out;
 * - the step length comes from the directional derivative φ'(t) (evaluated without the
 *   cancellation that G itself would suffer): full step, expansion while φ' stays steeply
 *   negative (a species that must grow by orders of magnitude), else a safeguarded Newton
 *   root find of φ'; limited by the first pure phase to run out (added to the active set)
 *   and strictly inside the bound of the mixture species;
 * - pure phases held at zero (the active set) restrict the step to directions that keep
 *   them at zero; at a subspace optimum, a held phase with a negative Lagrange multiplier
 *   (forming it lowers G) is released.
 * Stops when the Newton step changes no species by more than STEP_TOLERANCE relative to
 * max(n, RESOLUTION·total) (trace species are left to the polish), or the decrement is
 * negligible. With `strict` (after a failed polish: a species or phase at trace level must
 * grow to a real amount, which gains little G at first) only the step test counts.
 */
export function extentNewton(c: Compact, st: ExtentState, released = -1, strict = false): StageOutcome & { directions: Directions } {
  const { m, rho } = c;
  const ws = workspaceFor(c);
  const { n, xi, held } = st;
  for (let j = 0; j < m; j++) if (!c.mixture[j] && n[j] === 0 && held[j] === FREE && j !== released) hold(c, held, j);
  let dirs = buildDirections(c, held);
  let locked = -1; // a phase re-held right after its release is not released again until the set changes
  let lastReleased = released;
  let basisFor: Directions | undefined; // the directions the working basis (ws.s, ws.kappa, ws.z) was built from
  for (;;) {
    st.iterations++;
    if (st.iterations - st.iterationBase > MAX_ITERATIONS) return { ok: false, message: 'the Newton iteration did not converge', directions: dirs };
    groupTotals(c, n, ws.totals);
    logActivities(c, n, ws.totals, ws.logA);
    const k = dirs.k;
    const s = ws.s;
    const kappa = ws.kappa;
    const zb = ws.z;
    if (basisFor !== dirs) {
      for (let q = 0; q < k * m; q++) s[q] = dirs.s[q];
      for (let a = 0; a < k; a++) kappa[a] = dirs.kappa[a];
      for (let q = 0; q < k * rho; q++) zb[q] = dirs.z[q];
      basisFor = dirs;
      adaptBasis(c, n, s, kappa, zb, k, ws);
    } else if (needsAdapting(c, n, s, k)) adaptBasis(c, n, s, kappa, zb, k, ws);
    reducedGradient(c, ws, s, kappa, k);
    const finiteDirections = reducedHessian(c, ws, n, s, k);
    for (let a = 0; a < k; a++) ws.pz[a] = -ws.gz[a];
    if (k > 0) modifiedCholeskySolve(ws.h, k, ws.scale, ws.pz, MIN_PIVOT);
    let decrement = 0;
    for (let a = 0; a < k; a++) decrement -= ws.gz[a] * ws.pz[a];
    if (!Number.isFinite(decrement)) return { ok: false, message: 'the Newton step is not finite', directions: dirs };
    speciesStep(c, ws, n, s, k, finiteDirections);
    const d = ws.d;
    const { largestStep, majorStep } = ws;
    const floor = RESOLUTION * c.total;

    if (largestStep <= STEP_TOLERANCE || (!strict && !(decrement > DECREMENT_TOLERANCE * c.total))) {
      const release = negativeMultiplier(c, held, ws.logA, ws.g, locked);
      if (release < 0) return { ok: true, directions: dirs };
      held[release] = FREE;
      promoteImplied(c, held);
      lastReleased = release;
      dirs = buildDirections(c, held);
      continue;
    }

    const pk = extentStep(ws, kappa, zb, k, rho);
    stepBounds(c, ws, n, held);
    const { tPure, blocking, tMix, emptying } = ws;
    // The full Newton step would empty a member of a phase already dwindled to its phantom
    // level: it would only creep towards zero from here (each step stops short of the
    // boundary). Whether the phase is absent is for the caller's stability test to settle.
    if (tMix <= 1 && dwindledGroup(c, n, emptying) >= 0) return { ok: false, message: 'a mole-fraction phase is dwindling away', directions: dirs };
    if (blocking >= 0 && tPure === 0) {
      // A phase at zero that this direction would make negative: hold it and recompute.
      hold(c, held, blocking);
      if (blocking === lastReleased) locked = blocking;
      dirs = buildDirections(c, held);
      continue;
    }
    const t = lineSearch(c, ws, n, d, pk, decrement, tPure, tMix);
    if (!(t > 0)) {
      if (!strict && decrement <= STALL_DECREMENT_TOLERANCE * c.total) return { ok: true, directions: dirs };
      return { ok: false, message: 'the line search could not make progress', directions: dirs };
    }
    const moved = applyStep(c, n, d, t, t === tPure ? blocking : -1, floor);
    for (let r = 0; r < rho; r++) xi[r] += t * ws.dxi[r];
    let changed = false;
    for (let j = 0; j < m; j++) {
      if (!c.mixture[j] && n[j] === 0 && held[j] === FREE) {
        hold(c, held, j);
        changed = true;
      }
    }
    if (changed) {
      locked = -1;
      lastReleased = -1;
      dirs = buildDirections(c, held);
    }
    if (!moved && !changed) {
      // Rounding noise: the step no longer changes anything resolvable. Close enough for the
      // polish if the Newton step was small, or small but for species below RESOLUTION of the
      // total (their growth is the polish's to resolve); otherwise give up.
      if (largestStep <= STALL_STEP_TOLERANCE || majorStep <= STALL_STEP_TOLERANCE || (!strict && decrement <= STALL_DECREMENT_TOLERANCE * c.total)) {
        return { ok: true, directions: dirs };
      }
      return { ok: false, message: 'the Newton iteration stalled', directions: dirs };
    }
  }
}

/**
 * The mole-fraction group of species j if it carries a phantom (it could vanish) and its real
 * amount is at most VANISH_FRACTION of the total, else -1. (A phase passing through a low
 * point on its way elsewhere rarely goes that low; from NUCLEATION_FRACTION down to here the
 * creep takes a few dozen steps.)
 */
function dwindledGroup(c: Compact, n: Float64Array, j: number): number {
  if (j < 0) return -1;
  const g = c.group[j];
  if (g < 0 || !(c.phantom[g] > 0)) return -1;
  let real = 0;
  for (let i = 0; i < c.m; i++) if (c.group[i] === g) real += n[i];
  return real <= VANISH_FRACTION * c.total ? g : -1;
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

/**
 * Step length along species direction d: φ(t) = G(n + t·d) is convex with
 * φ'(t) = Σ d_j ln a_j(n + t·d) − Σ p·κ and φ'' = dᵀ·D·d. Accepts t where
 * |φ'(t)| <= LINE_SEARCH_SLOPE·|φ'(0)|, or the step to the first pure phase running out if
 * φ' is still negative there. Starts at the full Newton step; expands while φ' is still
 * steeply negative (a trace species whose Newton step underestimates its growth);
 * otherwise a safeguarded Newton/bisection on φ' (→ +∞ at the mixture boundary, where a
 * species would reach zero) finds t.
 */
function lineSearch(c: Compact, ws: Workspace, n: Float64Array, d: Float64Array, pk: number, decrement: number, tPure: number, tMix: number): number {
  const target = LINE_SEARCH_SLOPE * decrement;
  let lo = 0;
  let hi = Math.min(tPure, tMix);
  let t = Math.min(1, tPure);
  if (t >= tMix) t = 0.5 * tMix;
  let value = slope(c, ws, n, d, pk, t);
  // Still steeply downhill: expand (a trace species that must grow by orders of magnitude).
  for (let e = 0; e < MAX_EXPANSIONS && value < -target && t < hi; e++) {
    lo = t;
    if (t === tPure) return t;
    let next = EXPANSION_FACTOR * t;
    if (next >= tPure) next = tPure;
    if (next >= tMix) next = t + 0.5 * (tMix - t);
    if (!(next > t)) break;
    t = next;
    value = slope(c, ws, n, d, pk, t);
  }
  if (value <= target && (value >= -target || t === tPure)) return t;
  if (!(value > 0) && !Number.isNaN(value)) lo = t;
  else hi = t;
  // Safeguarded Newton/bisection for |φ'(t)| <= target inside (lo, hi).
  t = 0.5 * (lo + hi);
  value = slope(c, ws, n, d, pk, t);
  for (let it = 0; it < LINE_SEARCH_ITERATIONS; it++) {
    if (Number.isNaN(value) || value > 0) hi = t;
    else lo = t;
    if (!Number.isNaN(value) && Math.abs(value) <= target) return t;
    let next = Number.NaN;
    if (!Number.isNaN(value)) next = t - value / ws.trialCurvature;
    if (!(next > lo && next < hi)) next = 0.5 * (lo + hi);
    if (hi - lo <= 1e-15 * hi) break;
    t = next;
    value = slope(c, ws, n, d, pk, t);
  }
  return lo;
}

/**
 * φ'(t) at n + t·d (NaN if a mixture amount would fall below AMOUNT_FLOOR of the total, unless
 * it is clamped there); leaves φ''(t) in ws.trialCurvature. The group totals and ln a are
 * formed as groupTotals and logActivities would (same terms, same order), but in the same
 * passes, and ln a only for the species the direction moves (the only ones φ' needs).
 */
function slope(c: Compact, ws: Workspace, n: Float64Array, d: Float64Array, pk: number, t: number): number {
  const m = c.m;
  const x = ws.trial;
  const floor = AMOUNT_FLOOR * c.total;
  const clampable = CLAMPABLE_AMOUNT * c.total;
  let total0 = c.groupInert[0];
  let total1 = c.groupInert[1];
  for (let j = 0; j < m; j++) {
    let v = n[j] + t * d[j];
    if (c.mixture[j] && d[j] < 0 && !(v >= floor)) {
      if (n[j] <= clampable) v = floor;
      else return Number.NaN;
    }
    x[j] = v;
    const g = c.group[j];
    if (g === 0) total0 += v;
    else if (g === 1) total1 += v;
  }
  const lg0 = c.hasGasGroup ? Math.log(total0) : 0;
  const lg1 = c.hasLiquidGroup ? Math.log(total1) : 0;
  let value = -pk;
  let curvature = 0;
  let dg0 = 0;
  let dg1 = 0;
  for (let j = 0; j < m; j++) {
    const dj = d[j];
    if (dj === 0) continue;
    if (!c.mixture[j]) {
      value += dj * c.offset[j];
      continue;
    }
    const g = c.group[j];
    value += dj * (Math.log(x[j]) + c.offset[j] - (g === 0 ? lg0 : g === 1 ? lg1 : 0));
    curvature += (dj * dj) / x[j];
    if (g === 0) dg0 += dj;
    else if (g === 1) dg1 += dj;
  }
  if (total0 > 0) curvature -= (dg0 * dg0) / total0;
  if (total1 > 0) curvature -= (dg1 * dg1) / total1;
  ws.trialCurvature = curvature;
  return value;
}
