// solveEquilibrium: validates, picks the single-reaction or the general path,
// verifies the answer (conservation, mass action, pure-phase directions) and
// builds the result. A failure to converge or to verify is reported as
// 'failed' with a message, never as a silent wrong answer.
import { activities, lnQuotient, quotientLogActivities } from './activity';
import { compact, groupTotals, logActivities, type Compact } from './compact';
import { dot2Difference, luFactor, luSolve, nullSpaceBasis, reducedRowEchelon } from './linalg';
import {
  buildDirections,
  extentNewton,
  FREE,
  holdAtZero,
  initialState,
  negativeMultiplier,
  RANK_TOLERANCE,
  release,
  NUCLEATION_FRACTION,
  renucleate,
  type Directions,
  type ExtentState,
} from './newton';
import { conservationLaws, polish } from './polish';
import { prepare, type Prepared } from './problem';
import { solveSingleReaction } from './single';
import { GAS_CONSTANT, type EquilibriumProblem, type EquilibriumResult } from './types';

/** Hard bound on |ln Q − ln K| for an active reaction whose species are all present. */
export const LNQ_TOLERANCE = 1e-9;
/** Hard bound on the violation of each conservation law, relative to the total amount. */
export const CONSERVATION_TOLERANCE = 1e-12;
/**
 * A mole-fraction phase kept only by its phantom inert (real amount at most this fraction of
 * the total, where the phantom is 1e-30 of it) is absent at equilibrium.
 */
export const VANISH_FRACTION = 1e-20;
/** An absent mixture phase is stable if ln Σ (implied mole fractions) is at most this. */
const STABILITY_TOLERANCE = 1e-9;
/** Newton iterations, gradient tolerance and diagonal regularisation of the tangent-plane minimisation. */
const STABILITY_ITERATIONS = 50;
const STABILITY_GRADIENT = 1e-12;
const STABILITY_REGULARISATION = 1e-14;
/** Directions that do not form the absent phase must have |g⁰| below this (ln units) at the held optimum. */
const ABSENT_OPTIMUM_TOLERANCE = 1e-8;
/** Rounds of (extent Newton, polish, multiplier check) before giving up on the set of present phases. */
const MAX_ACTIVE_SET_ROUNDS = 20;
/** Re-seedings of a dwindled phase before giving up. */
const MAX_NUCLEATIONS = 3;

/**
 * Equilibrium composition by minimising the Gibbs energy (Helmholtz energy at constant T
 * and gas volume) over the reaction extents, n = n0 + ν·ξ >= 0, for ideal phases (see
 * {@link SolverPhase} for the standard states). The objective is convex, so the
 * equilibrium is unique.
 * - One independent active reaction: an exact bracketed root find on the extent, in the
 *   distance from the nearer bound (`method: 'single'`, single.ts).
 * - More: Newton's method in extent space with an active set for pure phases (newton.ts),
 *   then a Newton polish in log amounts that gives trace species full relative precision
 *   and conservation to rounding (polish.ts) (`method: 'newton'`). A mole-fraction phase
 *   (gas at constant pressure, the liquid) that could vanish carries a phantom inert amount
 *   of PHANTOM_FRACTION of the total during the iterations, so its mole fractions stay
 *   defined; if its real amount ends below VANISH_FRACTION it is declared absent, its species
 *   are held at zero, and a final polish without the phantom makes the answer exact.
 * Reactions that can run in neither direction from what is present are inactive, species
 * that can never form stay exactly 0, and of linearly dependent (consistent) reactions only
 * the first independent ones in input order carry extents. Never throws: invalid input gives
 * status 'invalid'; a failure to converge, an amount below the double range, or a failure of
 * the final checks (conservation to CONSERVATION_TOLERANCE of the total, |ln Q − ln K| below
 * LNQ_TOLERANCE where all species are present, Q on the right side of K where a pure phase
 * is absent) gives 'failed' with a message and n0 copied.
 */
export function solveEquilibrium(problem: EquilibriumProblem): EquilibriumResult {
  try {
    return solveChecked(problem);
  } catch (error) {
    // A defect, not bad input: report it rather than throw into the caller.
    return invalidShaped(problem, 'failed', `internal error: ${error instanceof Error ? error.message : String(error)}`);
  }
}

function solveChecked(problem: EquilibriumProblem): EquilibriumResult {
  const prepared = prepare(problem);
  if (!prepared.ok) return invalidShaped(problem, 'invalid', prepared.message);
  const p = prepared.prepared;
  const n = Float64Array.from(p.n0);
  /** ln a in the reaction-quotient convention at the amounts being checked and reported. */
  const logA = new Float64Array(p.speciesCount);
  const extents = new Float64Array(p.reactionCount);
  const rho = p.basis.length;
  if (rho === 0) {
    quotientLogActivities(p, n, logA);
    return build(p, n, logA, extents, 'converged', undefined, 0, 'none');
  }

  let singleMessage: string | undefined;
  if (rho === 1) {
    const single = solveSingleReaction(p, p.basis[0], n);
    if (single.ok) {
      extents[p.basis[0]] = single.extent;
      quotientLogActivities(p, n, logA);
      const problemFound = verify(p, n, logA, single.extent);
      if (!problemFound) return build(p, n, logA, extents, 'converged', undefined, single.iterations, 'single');
      singleMessage = problemFound;
    } else singleMessage = single.message;
    n.set(p.n0);
  }

  const c = compact(p);
  const st = initialState(c, p);
  const general = solveGeneral(c, st, p);
  let message = general.message;
  const iterations = st.iterations + general.iterations;
  for (let j = 0; j < c.m; j++) n[c.species[j]] = st.n[j];
  if (message === undefined) {
    quotientLogActivities(p, n, logA);
    const problemFound = verify(p, n, logA, undefined, conservationLaws(c));
    if (!problemFound) {
      for (let k = 0; k < rho; k++) extents[p.basis[k]] = st.xi[k];
      return build(p, n, logA, extents, 'converged', undefined, iterations, 'newton');
    }
    message = problemFound;
  }
  if (singleMessage) message = `${message}; the single-reaction path also failed: ${singleMessage}`;
  const vanishing = vanishingPhase(p, n);
  if (vanishing) message = `${message} (${vanishing})`;
  quotientLogActivities(p, p.n0, logA);
  return build(p, Float64Array.from(p.n0), logA, new Float64Array(p.reactionCount), 'failed', message, iterations, 'newton');
}

/**
 * The general path: extent-space Newton, then the log-amount polish; the Lagrange
 * multipliers of the held phases are checked again at the polished point (where trace
 * species are exact) and a phase that should form is released for another round. If the
 * polish fails, something at trace level must grow to a real amount: the extent stage
 * goes on in strict mode, re-seeding a phase stuck at its phantom amount if needed. Then
 * the phantom inerts are resolved and a last polish makes the answer exact.
 */
function solveGeneral(c: Compact, st: ExtentState, p: Prepared): { message?: string; iterations: number } {
  let iterations = 0;
  let released = -1;
  let strict = false;
  let nucleations = 0;
  const logA = new Float64Array(c.m);
  const totals = new Float64Array(2);
  const gradient = new Float64Array(c.rho);
  for (let round = 0; ; round++) {
    if (round > MAX_ACTIVE_SET_ROUNDS) return { message: 'the set of present phases did not settle', iterations };
    const stage1 = extentNewton(c, st, released, strict);
    if (!stage1.ok) {
      if (strict && nucleations < MAX_NUCLEATIONS && renucleate(c, st)) {
        nucleations++;
        released = -1;
        continue;
      }
      return { message: stage1.message, iterations };
    }
    const stage2 = polish(c, st, stage1.directions);
    iterations += stage2.iterations;
    if (!stage2.ok) {
      if (stage2.underflow !== undefined) return { message: outOfRange(p, c, stage2.underflow), iterations };
      if (strict) {
        if (nucleations < MAX_NUCLEATIONS && renucleate(c, st)) {
          nucleations++;
          released = -1;
          continue;
        }
        return { message: stage2.message, iterations };
      }
      // A dwindling phase may simply be absent: try that hypothesis directly.
      const absent = tryAbsentPhases(c, st);
      iterations += absent.iterations;
      if (absent.ok) return { iterations };
      // Otherwise something at trace level must grow to a real amount: back to the extent iteration.
      strict = true;
      released = -1;
      continue;
    }
    groupTotals(c, st.n, totals);
    logActivities(c, st.n, totals, logA);
    for (let j = 0; j < c.m; j++) if (st.held[j] !== FREE && c.mixture[j]) logA[j] = c.offset[j];
    released = negativeMultiplier(c, st.held, logA, gradient, -1);
    if (released < 0) break;
    release(c, st.held, released);
  }
  if (c.phantom[0] > 0 || c.phantom[1] > 0) {
    const directions = removePhantoms(c, st);
    if ('underflow' in directions) return { message: outOfRange(p, c, directions.underflow), iterations };
    const stage3 = polish(c, st, directions);
    iterations += stage3.iterations;
    if (!stage3.ok) return { message: stage3.underflow !== undefined ? outOfRange(p, c, stage3.underflow) : stage3.message, iterations };
  }
  return { iterations };
}

/**
 * The hypothesis that every phantom phase whose real amount is at most NUCLEATION_FRACTION of
 * the total is absent: its species are held at zero, the phantoms removed, and the polish
 * run. Accepted only if the polish converges, no held pure phase should form (multipliers),
 * and each absent phase passes the tangent-plane test (absentPhaseIsStable). Otherwise the
 * state is restored.
 */
function tryAbsentPhases(c: Compact, st: ExtentState): { ok: boolean; iterations: number } {
  const gone = [false, false];
  for (let g = 0; g < 2; g++) {
    if (!(c.phantom[g] > 0)) continue;
    let real = 0;
    for (let j = 0; j < c.m; j++) if (c.group[j] === g) real += st.n[j];
    gone[g] = real <= NUCLEATION_FRACTION * c.total;
  }
  if (!gone[0] && !gone[1]) return { ok: false, iterations: 0 };
  const saved = { n: Float64Array.from(st.n), xi: Float64Array.from(st.xi), held: Uint8Array.from(st.held), inert: Float64Array.from(c.groupInert), phantom: Float64Array.from(c.phantom) };
  const restore = (iterations: number): { ok: false; iterations: number } => {
    st.n.set(saved.n);
    st.xi.set(saved.xi);
    st.held.set(saved.held);
    c.groupInert.set(saved.inert);
    c.phantom.set(saved.phantom);
    return { ok: false, iterations };
  };
  for (let g = 0; g < 2; g++) {
    if (gone[g]) for (let j = 0; j < c.m; j++) if (c.group[j] === g) st.n[j] = 0;
    c.groupInert[g] -= c.phantom[g];
    c.phantom[g] = 0;
  }
  for (let j = 0; j < c.m; j++) if (!c.mixture[j] && st.n[j] <= VANISH_FRACTION * c.total) st.n[j] = 0;
  for (let j = 0; j < c.m; j++) if (st.n[j] === 0 && st.held[j] === FREE) holdAtZero(c, st.held, j);
  const result = polish(c, st, buildDirections(c, st.held));
  if (!result.ok) return restore(result.iterations);
  const totals = new Float64Array(2);
  const logA = new Float64Array(c.m);
  groupTotals(c, st.n, totals);
  logActivities(c, st.n, totals, logA);
  for (let j = 0; j < c.m; j++) if (st.held[j] !== FREE && c.mixture[j]) logA[j] = c.offset[j];
  const pureOnly = Uint8Array.from(st.held, (h, j) => (h !== FREE && c.group[j] >= 0 && gone[c.group[j]] ? FREE : h));
  if (negativeMultiplier(c, pureOnly, logA, new Float64Array(c.rho), -1) >= 0) return restore(result.iterations);
  for (let g = 0; g < 2; g++) if (gone[g] && !absentPhaseIsStable(c, st, g, logA)) return restore(result.iterations);
  return { ok: true, iterations: result.iterations };
}

/**
 * Tangent-plane test for an absent mole-fraction phase g (all its species held at zero).
 * Directions that keep the other held phases at zero have gradient g⁰ (ln a of the absent
 * species taken at their pure-phase values); at the held optimum g⁰ = Ñᵀλ with Ñ the
 * absent species' rows, and forming the phase with composition y changes G at the rate
 * Σ y_j (λ_j + ln y_j) over achievable compositions (y in the range of Ñ). By convex duality
 * the least such rate is −min over u ⊥ range(Ñ) of ln Σ_j exp(−λ_j − u_j), so the phase stays
 * absent iff that minimum is <= STABILITY_TOLERANCE. The minimum is found by Newton's method
 * on the (convex) log-sum-exp in the null-space coordinates. With all the rows independent
 * this is the familiar Σ_j exp(−λ_j) <= 1 (implied mole fractions sum to at most one).
 */
function absentPhaseIsStable(c: Compact, st: ExtentState, g: number, logA: Float64Array): boolean {
  const { m } = c;
  const members: number[] = [];
  for (let j = 0; j < m; j++) if (c.group[j] === g) members.push(j);
  const others = Uint8Array.from(st.held, (h, j) => (c.group[j] === g ? FREE : h));
  const dirs = buildDirections(c, others);
  const k = dirs.k;
  const q = members.length;
  // g⁰ per direction, and Ñ (directions × members).
  const g0 = new Float64Array(k);
  const nt = new Float64Array(k * q);
  for (let a = 0; a < k; a++) {
    let sum = -dirs.kappa[a];
    for (let j = 0; j < m; j++) {
      const v = dirs.s[a * m + j];
      if (v !== 0) sum += v * (c.group[j] === g ? c.offset[j] : logA[j]);
    }
    g0[a] = sum;
    for (let u = 0; u < q; u++) nt[a * q + u] = dirs.s[a * m + members[u]];
  }
  // A particular λ: Gauss–Jordan on [Ñᵀ | g⁰]; rows without members must have g⁰ ≈ 0 (held optimum).
  const e = reducedRowEchelon(nt, k, q, RANK_TOLERANCE);
  const lambda = new Float64Array(q);
  {
    // Re-run the elimination on the augmented system to carry g⁰ along.
    const aug = new Float64Array(k * (q + 1));
    for (let a = 0; a < k; a++) {
      for (let u = 0; u < q; u++) aug[a * (q + 1) + u] = nt[a * q + u];
      aug[a * (q + 1) + q] = g0[a];
    }
    const ea = reducedRowEchelonOnColumns(aug, k, q + 1, q);
    for (let r = 0; r < ea.rank; r++) lambda[ea.pivotColumns[r]] = ea.reduced[r * (q + 1) + q];
    for (let r = ea.rank; r < k; r++) if (Math.abs(ea.reduced[r * (q + 1) + q]) > ABSENT_OPTIMUM_TOLERANCE) return false;
  }
  const { count, basis: nullBasis } = nullSpaceBasis(e, q);
  // Minimise L(t) = ln Σ_j exp(−λ_j − (Uᵀt)_j) over t (convex), Newton with backtracking.
  const t = new Float64Array(count);
  const w = new Float64Array(q);
  const value = (tt: Float64Array): number => {
    let top = -Infinity;
    for (let u = 0; u < q; u++) {
      let x = -lambda[u];
      for (let b = 0; b < count; b++) x -= nullBasis[b * q + u] * tt[b];
      w[u] = x;
      top = Math.max(top, x);
    }
    let sum = 0;
    for (let u = 0; u < q; u++) sum += Math.exp(w[u] - top);
    for (let u = 0; u < q; u++) w[u] = Math.exp(w[u] - top) / sum; // softmax weights
    return top + Math.log(sum);
  };
  let current = value(t);
  const grad = new Float64Array(count);
  const hess = new Float64Array(count * count);
  const perm = new Int32Array(count);
  for (let it = 0; it < STABILITY_ITERATIONS && current > STABILITY_TOLERANCE; it++) {
    if (count === 0) break;
    // ∇ = −U w, ∇² = U (diag w − w wᵀ) Uᵀ
    for (let b = 0; b < count; b++) {
      let sum = 0;
      for (let u = 0; u < q; u++) sum -= nullBasis[b * q + u] * w[u];
      grad[b] = sum;
    }
    for (let b = 0; b < count; b++) {
      for (let d = 0; d < count; d++) {
        let sum = 0;
        let ub = 0;
        let ud = 0;
        for (let u = 0; u < q; u++) {
          sum += nullBasis[b * q + u] * nullBasis[d * q + u] * w[u];
          ub += nullBasis[b * q + u] * w[u];
          ud += nullBasis[d * q + u] * w[u];
        }
        hess[b * count + d] = sum - ub * ud + (b === d ? STABILITY_REGULARISATION : 0);
      }
    }
    let norm = 0;
    for (let b = 0; b < count; b++) norm = Math.max(norm, Math.abs(grad[b]));
    if (norm < STABILITY_GRADIENT) break;
    const step = Float64Array.from(grad, (x) => -x);
    if (!luFactor(hess, count, perm)) break;
    luSolve(hess, count, perm, step);
    let size = 1;
    const trial = new Float64Array(count);
    let next = current;
    for (let h = 0; h < 40; h++) {
      for (let b = 0; b < count; b++) trial[b] = t[b] + size * step[b];
      next = value(trial);
      if (next < current) break;
      size *= 0.5;
    }
    if (!(next < current)) break;
    t.set(trial);
    current = next;
    value(t);
  }
  return current <= STABILITY_TOLERANCE;
}

/** Gauss–Jordan on the first `columns` columns of a (rows × width) matrix, carrying the rest along. */
function reducedRowEchelonOnColumns(a: Float64Array, rows: number, width: number, columns: number): { rank: number; pivotColumns: Int32Array; reduced: Float64Array } {
  const m = Float64Array.from(a);
  let scale = 0;
  for (let i = 0; i < rows; i++) for (let j = 0; j < columns; j++) scale = Math.max(scale, Math.abs(m[i * width + j]));
  const tol = RANK_TOLERANCE * scale;
  const used = new Uint8Array(columns);
  const pivots = new Int32Array(Math.min(rows, columns));
  let rank = 0;
  while (rank < rows && rank < columns) {
    let bi = -1;
    let bj = -1;
    let best = tol;
    for (let i = rank; i < rows; i++) {
      for (let j = 0; j < columns; j++) {
        if (used[j]) continue;
        const v = Math.abs(m[i * width + j]);
        if (v > best) {
          best = v;
          bi = i;
          bj = j;
        }
      }
    }
    if (bi < 0) break;
    for (let j = 0; j < width; j++) {
      const tmp = m[rank * width + j];
      m[rank * width + j] = m[bi * width + j];
      m[bi * width + j] = tmp;
    }
    const inv = 1 / m[rank * width + bj];
    for (let j = 0; j < width; j++) m[rank * width + j] *= inv;
    for (let i = 0; i < rows; i++) {
      if (i === rank) continue;
      const f = m[i * width + bj];
      if (f === 0) continue;
      for (let j = 0; j < width; j++) m[i * width + j] -= f * m[rank * width + j];
    }
    used[bj] = 1;
    pivots[rank] = bj;
    rank++;
  }
  return { rank, pivotColumns: pivots.subarray(0, rank), reduced: m };
}

function outOfRange(p: Prepared, c: Compact, j: number): string {
  const id = p.problem.species[c.species[j]].id;
  return `the equilibrium amount of species "${id}" is below 2.2e-308 mol, the smallest normal double: out of range`;
}

/**
 * Ends the phantom-inert stage. A phase whose real amount is at most VANISH_FRACTION of the
 * total is absent: its species are set to zero and held there, as is any pure phase left
 * at such an amount (formed only alongside the vanished phase). Then the phantoms are
 * removed; the returned directions are for the final polish, which makes the answer exact
 * for the phases that remain. A species of a phase that remains whose amount underflowed to
 * zero is reported instead (out of the double range).
 */
function removePhantoms(c: Compact, st: ExtentState): Directions | { readonly underflow: number } {
  let vanished = false;
  const gone = [false, false];
  for (let g = 0; g < 2; g++) {
    if (!(c.phantom[g] > 0)) continue;
    let real = 0;
    for (let j = 0; j < c.m; j++) if (c.group[j] === g) real += st.n[j];
    if (real <= VANISH_FRACTION * c.total) {
      vanished = true;
      gone[g] = true;
      for (let j = 0; j < c.m; j++) if (c.group[j] === g) st.n[j] = 0;
    }
    c.groupInert[g] -= c.phantom[g];
    c.phantom[g] = 0;
  }
  // A member of a phase that stays whose amount underflowed to zero is out of the double range.
  for (let j = 0; j < c.m; j++) if (c.mixture[j] && st.n[j] === 0 && st.held[j] === FREE && !(c.group[j] >= 0 && gone[c.group[j]])) return { underflow: j };
  if (vanished) for (let j = 0; j < c.m; j++) if (!c.mixture[j] && st.n[j] <= VANISH_FRACTION * c.total) st.n[j] = 0;
  for (let j = 0; j < c.m; j++) if (st.n[j] === 0 && st.held[j] === FREE) holdAtZero(c, st.held, j);
  return buildDirections(c, st.held);
}

/**
 * Why the amounts `n` are not an acceptable equilibrium, or undefined when they are. With
 * one basis reaction and its extent given, conservation is checked as n − n0 = ν·ξ.
 */
function verify(
  p: Prepared,
  n: Float64Array,
  logA: Float64Array,
  singleExtent?: number,
  laws?: { readonly count: number; readonly basis: Float64Array },
): string | undefined {
  const S = p.speciesCount;
  const { species } = p.problem;
  for (let i = 0; i < S; i++) {
    if (!Number.isFinite(n[i]) || n[i] < 0) return `the amount of species "${species[i].id}" is not a finite non-negative number`;
    if (!p.formable[i] && n[i] !== 0) return `species "${species[i].id}" cannot form but has a non-zero amount`;
  }
  let total = 0;
  for (let i = 0; i < S; i++) total += p.n0[i] + n[i];
  if (singleExtent !== undefined) {
    const r = p.basis[0];
    for (let i = 0; i < S; i++) {
      const violation = Math.abs(n[i] - p.n0[i] - p.nu[r * S + i] * singleExtent);
      if (!(violation <= CONSERVATION_TOLERANCE * total)) return `a conservation law is violated by ${violation / total} of the total amount`;
    }
  } else {
    const problemFound = verifyConservation(p, n, total, laws);
    if (problemFound) return problemFound;
  }
  return verifyMassAction(p, n, logA);
}

/** Every conservation law of the active stoichiometry holds to CONSERVATION_TOLERANCE of the total amount. */
function verifyConservation(p: Prepared, n: Float64Array, total: number, laws?: { readonly count: number; readonly basis: Float64Array }): string | undefined {
  const S = p.speciesCount;
  const { species } = p.problem;
  const m = p.variable.length;
  const rho = p.basis.length;
  let found = laws;
  if (!found) {
    const a = new Float64Array(rho * m);
    for (let k = 0; k < rho; k++) for (let j = 0; j < m; j++) a[k * m + j] = p.nu[p.basis[k] * S + p.variable[j]];
    found = nullSpaceBasis(reducedRowEchelon(a, rho, m, RANK_TOLERANCE), m);
  }
  const { count, basis } = found;
  const nv = new Float64Array(m);
  const n0v = new Float64Array(m);
  for (let j = 0; j < m; j++) {
    nv[j] = n[p.variable[j]];
    n0v[j] = p.n0[p.variable[j]];
  }
  for (let l = 0; l < count; l++) {
    let size = 0;
    for (let j = 0; j < m; j++) size = Math.max(size, Math.abs(basis[l * m + j]));
    const violation = Math.abs(dot2Difference(basis, l * m, nv, n0v, m)) / size;
    if (!(violation <= CONSERVATION_TOLERANCE * total)) return `a conservation law is violated by ${violation / total} of the total amount`;
  }
  for (let i = 0; i < S; i++) if (!p.variable.includes(i) && n[i] !== p.n0[i]) return `species "${species[i].id}" takes part in no reaction but changed`;
  return undefined;
}

/** Mass action where every species is present, and the right side of K where a pure phase is absent. */
function verifyMassAction(p: Prepared, n: Float64Array, logA: Float64Array): string | undefined {
  const S = p.speciesCount;
  const { reactions } = p.problem;
  const groupAmount = [0, 0];
  for (let i = 0; i < S; i++) if (p.group[i] >= 0) groupAmount[p.group[i]] += n[i];
  for (let r = 0; r < p.reactionCount; r++) {
    if (!p.active[r]) continue;
    let reactantAbsent = false;
    let productAbsent = false;
    let vanishedPhase = false;
    for (let i = 0; i < S; i++) {
      const v = p.nu[r * S + i];
      if (v === 0 || n[i] > 0) continue;
      if (p.group[i] >= 0 && groupAmount[p.group[i]] === 0) vanishedPhase = true;
      if (v < 0) reactantAbsent = true;
      else productAbsent = true;
    }
    // A species of a whole mixture phase that is absent has no defined activity: no check.
    if (vanishedPhase) continue;
    const gap = lnQuotient(p, r, logA) - p.lnK[r];
    const label = reactions[r].label;
    if (!reactantAbsent && !productAbsent) {
      if (!(Math.abs(gap) < LNQ_TOLERANCE)) return `reaction "${label}" is not at equilibrium (ln Q − ln K = ${gap})`;
    } else if (reactantAbsent && !productAbsent) {
      if (!(gap < LNQ_TOLERANCE)) return `reaction "${label}" has a reactant used up but Q > K`;
    } else if (productAbsent && !reactantAbsent) {
      if (!(gap > -LNQ_TOLERANCE)) return `reaction "${label}" has a product absent but Q < K`;
    }
  }
  return undefined;
}

/** For a failure message: a mole-fraction phase that dwindled below NUCLEATION_FRACTION of the total in the last attempt. */
function vanishingPhase(p: Prepared, n: Float64Array): string | undefined {
  const totals = [0, 0];
  const members = [0, 0];
  for (let i = 0; i < p.speciesCount; i++) {
    const g = p.group[i];
    if (g < 0) continue;
    totals[g] += n[i];
    members[g]++;
  }
  for (let g = 0; g < 2; g++) {
    if (members[g] >= 2 && totals[g] < NUCLEATION_FRACTION * p.totalAmount) {
      return `the ${g === 0 ? 'gas' : 'liquid'} phase nearly vanished; the solver could not settle whether it stays`;
    }
  }
  return undefined;
}

function build(
  p: Prepared,
  n: Float64Array,
  logA: Float64Array,
  extents: Float64Array,
  status: 'converged' | 'failed',
  message: string | undefined,
  iterations: number,
  method: 'none' | 'single' | 'newton',
): EquilibriumResult {
  const S = p.speciesCount;
  const R = p.reactionCount;
  const { problem } = p;
  const lnQ = new Array<number>(R);
  for (let r = 0; r < R; r++) lnQ[r] = lnQuotient(p, r, logA);
  const start = new Float64Array(S);
  quotientLogActivities(p, p.n0, start);
  const lnQ0 = new Array<number>(R);
  for (let r = 0; r < R; r++) lnQ0[r] = lnQuotient(p, r, start);
  let gasMoles = 0;
  let anyGas = false;
  const absentPhases: number[] = [];
  const amounts = new Array<number>(S);
  for (let i = 0; i < S; i++) {
    amounts[i] = n[i];
    const phase = problem.species[i].phase;
    if (phase === 'g') {
      gasMoles += n[i];
      anyGas = true;
    }
    if ((phase === 's' || phase === 'solvent') && n[i] === 0) absentPhases.push(i);
  }
  const extentList = new Array<number>(R);
  for (let r = 0; r < R; r++) extentList[r] = extents[r];
  const { conditions } = problem;
  let pressure: number;
  let gasVolume: number;
  if (conditions.kind === 'constant-pressure') {
    pressure = conditions.P;
    gasVolume = gasMoles > 0 ? (gasMoles * GAS_CONSTANT * conditions.T) / conditions.P : 0;
  } else {
    pressure = gasMoles > 0 ? (gasMoles * GAS_CONSTANT * conditions.T) / conditions.gasVolume : 0;
    gasVolume = anyGas ? conditions.gasVolume : 0;
  }
  const result: EquilibriumResult = {
    status,
    n: amounts,
    extents: extentList,
    activities: activities(problem, amounts),
    lnQ,
    lnQ0,
    pressure,
    gasMoles,
    gasVolume,
    absentPhases,
    inactiveReactions: p.inactive.slice(),
    iterations,
    method,
  };
  return message === undefined ? result : { ...result, message };
}

/**
 * A result of the right shape for input that could not be solved at all: n holds the
 * initial amounts that are finite numbers (0 otherwise), every other array holds zeros.
 */
function invalidShaped(problem: EquilibriumProblem, status: 'invalid' | 'failed', message: string): EquilibriumResult {
  const species = problem && Array.isArray(problem.species) ? problem.species : [];
  const reactions = problem && Array.isArray(problem.reactions) ? problem.reactions : [];
  const zerosS = species.map(() => 0);
  const zerosR = reactions.map(() => 0);
  return {
    status,
    message,
    n: species.map((s) => (s && typeof s.n0 === 'number' && Number.isFinite(s.n0) ? s.n0 : 0)),
    extents: [...zerosR],
    activities: [...zerosS],
    lnQ: [...zerosR],
    lnQ0: [...zerosR],
    pressure: 0,
    gasMoles: 0,
    gasVolume: 0,
    absentPhases: [],
    inactiveReactions: [],
    iterations: 0,
    method: 'none',
  };
}
