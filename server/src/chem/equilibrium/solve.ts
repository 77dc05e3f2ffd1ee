// solveEquilibrium: validates, picks the single-reaction or the general path,
// verifies the answer (conservation, mass action, pure-phase directions) and
// builds the result. A failure to converge or to verify is reported as
// 'failed' with a message, never as a silent wrong answer.
import { activities, lnQuotient, quotientLogActivities } from './activity';
import { compact, groupTotals, logActivities, type Compact } from './compact';
import { dot2Difference, nullSpaceBasis, reducedRowEchelon } from './linalg';
import { extentNewton, VANISH_FRACTION } from './newton';
import { buildDirections, FREE, holdAtZero, negativeMultiplier, RANK_TOLERANCE, release, type Directions } from './newton-active-set';
import { initialState, NUCLEATION_FRACTION, renucleate, warmStart, type ExtentState } from './newton-state';
import { absentPhaseTest } from './phases';
import { formAbsentPhase, holdDwindledPhasesAbsent } from './phases-presence';
import { polish } from './polish';
import { conservationLaws } from './polish-stoichiometry';
import { GAS_GROUP, prepare, PURE, type Prepared } from './problem';
import { expandedResult, restrictedProblem } from './restriction';
import { solveSingleReaction } from './single';
import { GAS_CONSTANT, type EquilibriumProblem, type EquilibriumResult } from './types';

/** How verification says a reaction can still form an absent mixture phase (see vanishedPhaseDirection). */
const FORMS_ABSENT_PHASE = 'could still form an absent';
/** Hard bound on |ln Q − ln K| for an active reaction whose species are all present. */
export const LNQ_TOLERANCE = 1e-9;
/** Hard bound on the violation of each conservation law, relative to the total amount. */
export const CONSERVATION_TOLERANCE = 1e-12;
/** Rounds of (extent Newton, polish, multiplier check) before giving up on the set of present phases. */
const MAX_ACTIVE_SET_ROUNDS = 20;
/** Re-seedings of a dwindled phase before giving up. */
const MAX_NUCLEATIONS = 3;
/**
 * Changes of the set of absent mole-fraction phases (held absent, or formed after failing the
 * stability test) before giving up: each change lowers G or settles a dwindled phase, so
 * this only guards against a defect.
 */
const MAX_PHASE_CHANGES = 6;

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
 *   of PHANTOM_FRACTION of the total while it is present, so its mole fractions stay
 *   defined. When it dwindles to where the iteration cannot settle it, it is held absent
 *   instead (all its species exactly 0, its reactions restricted like those of a used-up
 *   solid) and the rest is solved without it; at that optimum the tangent-plane test
 *   (phases.ts: do the implied mole fractions sum to at most 1?) decides: stable, the phase
 *   is absent; unstable, it must be present, and is formed along its incipient composition
 *   and solved with. A present phase whose real amount ends below VANISH_FRACTION (where the
 *   test agrees within its tolerance) is declared absent too, and a final polish without
 *   the phantoms makes the answer exact. Should verification then find a reaction that could
 *   still form that phase (a real trace phase, limited by a co-product that is a trace too),
 *   the solve is repeated with such trace phases kept.
 * Reactions that can run in neither direction from what is present are inactive, species
 * that can never form stay exactly 0, and of linearly dependent (consistent) reactions only
 * the first independent ones in input order carry extents. Never throws: invalid input gives
 * status 'invalid'; a failure to converge, an amount below the double range, or a failure of
 * the final checks (conservation to CONSERVATION_TOLERANCE of the total, |ln Q − ln K| below
 * LNQ_TOLERANCE where all species are present, Q on the right side of K where a pure phase
 * is absent) gives 'failed' with a message and n0 copied.
 */
export function solveEquilibrium(problem: EquilibriumProblem, options: SolveOptions = {}): EquilibriumResult {
  try {
    return solveChecked(problem, false, options.start);
  } catch (error) {
    // A defect, not bad input: report it rather than throw into the caller.
    return invalidShaped(problem, 'failed', `internal error: ${error instanceof Error ? error.message : String(error)}`);
  }
}

export interface SolveOptions {
  /**
   * A warm start: amounts per species that conserve what the initial amounts conserve (n0 +
   * ν·ξ), such as the equilibrium at a neighbouring point of a sweep (same charge, another
   * temperature, pressure or volume). The extent iteration of the general path starts there
   * instead of at n0. It is only a hint: a start that does not conserve, or that is not
   * strictly positive in every species that can form, is ignored, and a warm solve that
   * fails is done again cold. The answer is the same either way (G is convex).
   */
  readonly start?: readonly number[];
}

/**
 * Work arrays of a solve (amounts, ln a, extents, ln a at n0), kept for the next solve of the
 * same size like the prepared problem's arrays (problem.ts): they never reach the result,
 * which `build` makes from copies, and solves are not re-entrant.
 */
class SolveArrays {
  readonly n: Float64Array;
  /** ln a in the reaction-quotient convention at the amounts being checked and reported. */
  readonly logA: Float64Array;
  readonly extents: Float64Array;
  /** ln a at the initial amounts, for lnQ0. */
  readonly startLogA: Float64Array;
  constructor(
    readonly speciesCount: number,
    readonly reactionCount: number,
  ) {
    this.n = new Float64Array(speciesCount);
    this.logA = new Float64Array(speciesCount);
    this.extents = new Float64Array(reactionCount);
    this.startLogA = new Float64Array(speciesCount);
  }
}

let pooledSolveArrays: SolveArrays | undefined;

function solveArrays(p: Prepared): SolveArrays {
  const a = pooledSolveArrays;
  if (a && a.speciesCount === p.speciesCount && a.reactionCount === p.reactionCount) return a;
  pooledSolveArrays = new SolveArrays(p.speciesCount, p.reactionCount);
  return pooledSolveArrays;
}

/**
 * `keepTrace`: a second attempt after the answer left out a mixture phase that a reaction can
 * still form: a phase whose real amount ends at trace level (below VANISH_FRACTION, limited by
 * a co-product that is itself a trace) is then kept, not declared absent.
 */
function solveChecked(problem: EquilibriumProblem, restricted = false, start?: readonly number[], keepTrace = false): EquilibriumResult {
  const prepared = prepare(problem);
  if (!prepared.ok) return invalidShaped(problem, 'invalid', prepared.message);
  const p = prepared.prepared;
  // Reactions that can only run in step through a never-formable species: solve the exact
  // restriction to their combinations that leave it alone (restriction.ts). Once is enough:
  // the restricted problem's never-formable species touch no reaction.
  const restriction = restricted ? undefined : restrictedProblem(problem, p);
  if (restriction) return expandedResult(problem, restriction, solveChecked(restriction.problem, true, start, keepTrace));
  const { n, logA, extents } = solveArrays(p);
  for (let i = 0; i < p.speciesCount; i++) n[i] = p.n0[i];
  for (let r = 0; r < p.reactionCount; r++) extents[r] = 0;
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
  const warm = start !== undefined ? warmStart(c, p, start) : undefined;
  const st = initialState(c, p, warm);
  const general = solveGeneral(c, st, p, keepTrace);
  let message = general.message;
  // A warm start is only a hint: whatever went wrong from it, solve again from n0.
  if (warm && message !== undefined) return solveChecked(problem, restricted, undefined, keepTrace);
  const iterations = st.iterations + general.iterations;
  for (let j = 0; j < c.m; j++) n[c.species[j]] = st.n[j];
  if (message === undefined) {
    quotientLogActivities(p, n, logA);
    const problemFound = verify(p, n, logA, undefined, conservationLaws(c));
    if (!problemFound) {
      for (let k = 0; k < rho; k++) extents[p.basis[k]] = st.xi[k];
      return build(p, n, logA, extents, 'converged', undefined, iterations, 'newton');
    }
    if (warm) return solveChecked(problem, restricted, undefined, keepTrace);
    if (!keepTrace && problemFound.includes(FORMS_ABSENT_PHASE)) return solveChecked(problem, restricted, undefined, true);
    message = problemFound;
  }
  if (singleMessage) message = `${message}; the single-reaction path also failed: ${singleMessage}`;
  const vanishing = vanishingPhase(p, n);
  if (vanishing) message = `${message} (${vanishing})`;
  quotientLogActivities(p, p.n0, logA);
  n.set(p.n0);
  extents.fill(0);
  return build(p, n, logA, extents, 'failed', message, iterations, 'newton');
}

/**
 * The general path: the active-set iteration (settle), then the phantom inerts are resolved
 * and a last polish makes the answer exact.
 */
function solveGeneral(c: Compact, st: ExtentState, p: Prepared, keepTrace: boolean): { message?: string; iterations: number } {
  const settled = settle(c, st, p);
  let iterations = settled.iterations;
  if (settled.message !== undefined) return settled;
  if (c.phantom[0] > 0 || c.phantom[1] > 0) {
    const directions = removePhantoms(c, st, keepTrace);
    if ('underflow' in directions) return { message: outOfRange(p, c, directions.underflow), iterations };
    const stage3 = polish(c, st, directions);
    iterations += stage3.iterations;
    if (!stage3.ok) return { message: stage3.underflow !== undefined ? outOfRange(p, c, stage3.underflow) : stage3.message, iterations };
  }
  return { iterations };
}

/**
 * The active-set iteration over the phases: extent-space Newton, then the log-amount polish;
 * the Lagrange multipliers of the held pure phases are checked again at the polished point
 * (where trace species are exact) and one that should form is released for another round.
 * A mole-fraction phase is either present (with its phantom while it could vanish) or held
 * absent (ExtentState.absent: all members exactly 0, restricted like used-up solids):
 * - when an attempt fails (Newton or polish, or the extent iteration stops because its step
 *   would empty a phase already below VANISH_FRACTION) with such a phase dwindled below
 *   NUCLEATION_FRACTION of the total, the phase is held absent and the rest is solved
 *   without it (its gain or loss in G at that level is below what the iteration can
 *   resolve, so it cannot settle the question itself);
 * - at the optimum, each absent phase must pass the tangent-plane test (absentPhaseTest);
 *   one that fails must be present at equilibrium (the optimum with it absent would be the
 *   equilibrium otherwise), and is formed along its incipient composition, which lowers G
 *   below that optimum, and the iteration goes on with it present.
 * So the choice between present and absent is made by the stability test alone. If a
 * polish fails with no phase dwindled, something at trace level must grow to a real amount:
 * the extent stage goes on in strict mode, re-seeding a phase stuck at its phantom amount
 * if needed.
 */
function settle(c: Compact, st: ExtentState, p: Prepared): { message?: string; iterations: number } {
  let iterations = 0;
  let released = -1;
  let strict = false;
  let nucleations = 0;
  let phaseChanges = 0;
  const logA = new Float64Array(c.m);
  const totals = new Float64Array(2);
  const gradient = new Float64Array(c.rho);
  for (let round = 0; ; round++) {
    if (round > MAX_ACTIVE_SET_ROUNDS) return { message: 'the set of present phases did not settle', iterations };
    const stage1 = extentNewton(c, st, released, strict);
    let failure: string | undefined;
    if (!stage1.ok) failure = stage1.message;
    else {
      const stage2 = polish(c, st, stage1.directions);
      iterations += stage2.iterations;
      if (!stage2.ok) {
        if (stage2.underflow !== undefined) return { message: outOfRange(p, c, stage2.underflow), iterations };
        failure = stage2.message ?? 'the log-amount polish failed';
      }
    }
    if (failure !== undefined) {
      // A dwindled phase: solve without it; the stability test at the optimum checks that choice.
      if (phaseChanges < MAX_PHASE_CHANGES && holdDwindledPhasesAbsent(c, st)) {
        phaseChanges++;
        strict = false;
        released = -1;
        continue;
      }
      if (strict) {
        if (nucleations < MAX_NUCLEATIONS && renucleate(c, st)) {
          nucleations++;
          released = -1;
          continue;
        }
        return { message: failure, iterations };
      }
      if (!stage1.ok) return { message: failure, iterations };
      // Something at trace level must grow to a real amount: back to the extent iteration.
      strict = true;
      released = -1;
      continue;
    }
    groupTotals(c, st.n, totals);
    logActivities(c, st.n, totals, logA);
    for (let j = 0; j < c.m; j++) if (st.held[j] !== FREE && c.mixture[j]) logA[j] = c.offset[j];
    released = negativeMultiplier(c, st.held, logA, gradient, -1);
    if (released >= 0) {
      release(c, st.held, released);
      continue;
    }
    // No pure phase should form: every absent mole-fraction phase must pass the tangent-plane test.
    let formed = false;
    for (let g = 0; g < 2 && !formed; g++) {
      if (!st.absent[g]) continue;
      const test = absentPhaseTest(c, st, g, logA);
      if (test.stable) continue;
      if (phaseChanges >= MAX_PHASE_CHANGES || !formAbsentPhase(c, st, g, test)) {
        return { message: `the absent ${g === GAS_GROUP ? 'gas' : 'liquid'} phase fails the stability test but could not be formed`, iterations };
      }
      phaseChanges++;
      formed = true;
    }
    if (!formed) break;
    strict = false;
    released = -1;
  }
  return { iterations };
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
function removePhantoms(c: Compact, st: ExtentState, keepTrace: boolean): Directions | { readonly underflow: number } {
  let vanished = false;
  const gone = [false, false];
  for (let g = 0; g < 2; g++) {
    if (!(c.phantom[g] > 0)) continue;
    let real = 0;
    for (let j = 0; j < c.m; j++) if (c.group[j] === g) real += st.n[j];
    if (real <= VANISH_FRACTION * c.total && !(keepTrace && real > 0)) {
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
  for (let i = 0; i < S; i++) if (!p.touched[i] && n[i] !== p.n0[i]) return `species "${species[i].id}" takes part in no reaction but changed`;
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
    const label = reactions[r].label;
    if (vanishedPhase) {
      // A species of a whole mixture phase that is absent has no defined activity; but where
      // the reaction can run towards it from species all present, forming it as a pure phase
      // must not lower G (its true potential there, with ln y <= 0, is lower still).
      const problemFound = vanishedPhaseDirection(p, n, logA, r, groupAmount);
      if (problemFound) return `reaction "${label}" ${problemFound}`;
      continue;
    }
    const gap = lnQuotient(p, r, logA) - p.lnK[r];
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

/**
 * The check of verifyMassAction for a reaction that touches an absent mole-fraction phase:
 * in each direction whose consumed species are all present and whose absent formed species
 * all belong to absent phases (mixture or pure), ln Q with those species at their pure-phase
 * activity must not be below ln K by more than LNQ_TOLERANCE: the phase would form otherwise.
 */
function vanishedPhaseDirection(p: Prepared, n: Float64Array, logA: Float64Array, r: number, groupAmount: readonly number[]): string | undefined {
  const S = p.speciesCount;
  for (let dir = 1; dir >= -1; dir -= 2) {
    let possible = true;
    let lnQ = 0;
    for (let i = 0; i < S && possible; i++) {
      const v = p.nu[r * S + i] * dir;
      if (v === 0) continue;
      if (n[i] > 0) lnQ += v * logA[i];
      else if (v < 0) possible = false;
      else if (p.model[i] === PURE || (p.group[i] >= 0 && groupAmount[p.group[i]] === 0)) lnQ += v * p.offset[i];
      else possible = false;
    }
    if (possible && lnQ - dir * p.lnK[r] < -LNQ_TOLERANCE) return `${FORMS_ABSENT_PHASE} ${dir > 0 ? 'product' : 'reactant'} phase (ln Q − ln K = ${dir * lnQ - p.lnK[r]} with it pure)`;
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
  const start = solveArrays(p).startLogA;
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
/** A result that carries no answer (status 'invalid' or 'failed'): the inputs' amounts and zeros, never NaN. */
export function invalidShaped(problem: EquilibriumProblem, status: 'invalid' | 'failed', message: string): EquilibriumResult {
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
