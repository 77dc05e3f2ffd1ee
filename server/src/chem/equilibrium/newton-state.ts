// The state of the extent Newton and where it starts: the amounts, extents,
// held flags and absent phases of one solve (arrays pooled between solves of
// the same shape), a warm start from a neighbouring answer, the cold start
// (n0 with each reaction that first makes a species formable run part of the
// way), and re-seeding a mole-fraction phase that dwindled to its phantom.
import type { Compact } from './compact';
import { luFactor, luSolve } from './linalg';
import { FREE } from './newton-active-set';
import { POSITIVE_FLOOR } from './newton-kernels';
import type { Prepared } from './problem';

/** Each reaction that first makes a species formable is run this fraction of the way to its limit, for a strictly interior start. */
export const KICK_FRACTION = 0.1;
/** A phase with a phantom whose real amount is at most this fraction of the total may be re-seeded, or held absent after a failure. */
export const NUCLEATION_FRACTION = 1e-9;

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
