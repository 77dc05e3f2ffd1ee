// The loops of one extent-Newton iteration and their scratch workspace: the
// reduced gradient and Hessian, the species step and its relative size, the
// extent step, the bounds of a step (the first phase to run out) and applying
// it with mixture amounts kept positive.
import type { Compact } from './compact';
import { FREE } from './newton-active-set';

/**
 * Amounts below this fraction of the total are trace for the extent iteration: a step
 * that shrinks one cannot be resolved (n + t·d cancels), so a shrinking trace species'
 * step is measured against this floor and its precision left to the log-amount polish.
 * A growing species is measured against its own amount.
 */
export const RESOLUTION = 1e-9;
/** A species change within this many rounding units of the terms that form it is noise. */
const DIRECTION_NOISE = 64 * Number.EPSILON;
/** A line-search step that changes no species by more than this fraction (of max(n, floor)) made no progress. */
const STALL_CHANGE = 4 * Number.EPSILON;
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
export const POSITIVE_FLOOR = 2 ** -40;

/** The last workspace, reused by the next solve of the same size (solves are not re-entrant). */
let pooled: Workspace | undefined;

export function workspaceFor(c: Compact): Workspace {
  if (!pooled || pooled.m !== c.m || pooled.rho !== c.rho || pooled.mixtures !== c.mixtureIndex.length) pooled = new Workspace(c);
  return pooled;
}

/** Scratch arrays of one solve. */
export class Workspace {
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
export function reducedGradient(c: Compact, ws: Workspace, s: Float64Array, kappa: Float64Array, k: number): void {
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
export function reducedHessian(c: Compact, ws: Workspace, n: Float64Array, s: Float64Array, k: number): boolean {
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
export function speciesStep(c: Compact, ws: Workspace, n: Float64Array, s: Float64Array, k: number, finiteDirections: boolean): void {
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
export function extentStep(ws: Workspace, kappa: Float64Array, zb: Float64Array, k: number, rho: number): number {
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
export function stepBounds(c: Compact, ws: Workspace, n: Float64Array, held: Uint8Array): void {
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
export function applyStep(c: Compact, n: Float64Array, d: Float64Array, t: number, emptied: number, floor: number): boolean {
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
