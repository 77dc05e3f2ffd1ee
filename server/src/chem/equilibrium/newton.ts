// The general path, stage 1: Newton's method on the convex Gibbs (Helmholtz at
// constant volume) energy in the space of reaction extents, with a line search
// on the directional derivative and an active set for pure phases (solids,
// solvent) that run out or never form.
// This file is the iteration itself; newton-state.ts (the state and its start),
// newton-active-set.ts (held species, directions, multipliers), newton-basis.ts,
// newton-kernels.ts and newton-line-search.ts hold its parts.
import { groupTotals, logActivities, type Compact } from './compact';
import { modifiedCholeskySolve } from './linalg';
import { buildDirections, FREE, holdAtZero, negativeMultiplier, release, type Directions } from './newton-active-set';
import { adaptBasis, needsAdapting } from './newton-basis';
import { applyStep, extentStep, reducedGradient, reducedHessian, RESOLUTION, speciesStep, stepBounds, workspaceFor } from './newton-kernels';
import { lineSearch } from './newton-line-search';
import type { ExtentState, StageOutcome } from './newton-state';

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
/** The subspace optimum is also reached when the Newton decrement λ² = −gᵀp is below this times the total amount. */
export const DECREMENT_TOLERANCE = 1e-24;
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
/** Iteration cap of the extent-space Newton loop, active-set changes included (per set of absent mole-fraction phases). */
export const MAX_ITERATIONS = 500;

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
  for (let j = 0; j < m; j++) if (!c.mixture[j] && n[j] === 0 && held[j] === FREE && j !== released) holdAtZero(c, held, j);
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
      const freed = negativeMultiplier(c, held, ws.logA, ws.g, locked);
      if (freed < 0) return { ok: true, directions: dirs };
      release(c, held, freed);
      lastReleased = freed;
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
      holdAtZero(c, held, blocking);
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
        holdAtZero(c, held, j);
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
