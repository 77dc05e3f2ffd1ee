// Reactions that can only run in step through a species that never forms. With
// A + X → Y and Y → B + X, X and Y absent, neither reaction can start, yet their
// sum A → B can, and X and Y stay exactly zero while it runs (an intermediate made
// and used up in step). Every feasible change n0 + ν·ξ >= 0 then keeps such
// never-formable species at zero, so the feasible extents lie in the null space of
// their rows of ν: an exact restriction, not an approximation. The problem is
// solved again with the reactions that touch those species replaced by a basis of
// that null space (combined reactions, ln K combined alike), and the answer is
// mapped back to the reactions as given.
import { lnQuotientRow, quotientLogActivities } from './activity';
import { nullSpaceBasis, reducedRowEchelon } from './linalg';
import { RANK_TOLERANCE } from './newton-active-set';
import { prepare, type Prepared } from './problem';
import type { EquilibriumProblem, EquilibriumResult, SolverReaction } from './types';

/** A combined coefficient within this many rounding units of an integer (after scaling) is that integer. */
const INTEGER_SNAP = 1e-9;

export interface Restriction {
  /** The problem with the entangled reactions replaced by their combinations. */
  readonly problem: EquilibriumProblem;
  /** Index in the restricted problem of each reaction kept as given, -1 for an entangled one. */
  readonly kept: Int32Array;
  /** Entangled reactions (indices into the original list). */
  readonly entangled: readonly number[];
  /** Per combination (restricted index `first + k`), its multiple of each entangled reaction. */
  readonly weights: readonly Float64Array[];
  /** Index of the first combination in the restricted problem. */
  readonly first: number;
}

/**
 * The restricted problem when some combination of the reactions that touch a never-formable
 * species leaves all such species unchanged (and so can run); undefined when there is none
 * (each such reaction then simply cannot run, as the active set already says).
 */
export function restrictedProblem(problem: EquilibriumProblem, p: Prepared): Restriction | undefined {
  const S = p.speciesCount;
  const R = p.reactionCount;
  if (R < 2 || p.formable.every((f) => f === 1)) return undefined; // the common case: nothing to restrict
  const stuck: number[] = [];
  const entangled: number[] = [];
  for (let r = 0; r < R; r++) {
    let touches = false;
    for (let i = 0; i < S; i++) {
      if (p.nu[r * S + i] !== 0 && !p.formable[i]) {
        touches = true;
        if (!stuck.includes(i)) stuck.push(i);
      }
    }
    if (touches) entangled.push(r);
  }
  const e = entangled.length;
  if (e < 2) return undefined;
  const m = new Float64Array(stuck.length * e);
  stuck.forEach((i, row) => entangled.forEach((r, col) => (m[row * e + col] = p.nu[r * S + i])));
  const space = nullSpaceBasis(reducedRowEchelon(m, stuck.length, e, RANK_TOLERANCE), e);
  if (space.count === 0) return undefined;

  const { reactions } = problem;
  const kept = new Int32Array(R).fill(-1);
  const restricted: SolverReaction[] = [];
  for (let r = 0; r < R; r++) {
    if (entangled.includes(r)) continue;
    kept[r] = restricted.length;
    restricted.push(reactions[r]);
  }
  const first = restricted.length;
  const weights: Float64Array[] = [];
  for (let k = 0; k < space.count; k++) {
    const w = wholeNumbers(space.basis.subarray(k * e, (k + 1) * e));
    const nu = new Array<number>(S).fill(0);
    let lnK = 0;
    const parts: string[] = [];
    entangled.forEach((r, col) => {
      if (w[col] === 0) return;
      for (let i = 0; i < S; i++) nu[i] += w[col] * p.nu[r * S + i];
      lnK += w[col] * p.lnK[r];
      parts.push(`${w[col] === 1 ? '' : w[col] === -1 ? '−' : `${w[col]}·`}${reactions[r].label}`);
    });
    for (const i of stuck) nu[i] = 0; // exactly zero by construction; drop rounding
    for (let i = 0; i < S; i++) if (Math.abs(nu[i]) < INTEGER_SNAP) nu[i] = 0;
    const hasReactant = nu.some((v) => v < 0);
    const hasProduct = nu.some((v) => v > 0);
    if (!hasReactant && !hasProduct) continue; // dependent reactions that cancel: no change
    // One-sided: a combination that only makes (or only uses) matter; impossible when the
    // reactions conserve elements, and not a reaction the solver accepts. Keep the active set.
    if (!hasReactant || !hasProduct) return undefined;
    weights.push(w);
    restricted.push({ label: parts.join(' + '), nu, lnK });
  }
  if (weights.length === 0) return undefined;
  return { problem: { ...problem, reactions: restricted }, kept, entangled, weights, first };
}

/** A null-space vector scaled to small whole numbers where it is one (1, 3/2 → 2, 3), else to a largest entry of 1. */
function wholeNumbers(vector: ArrayLike<number>): Float64Array {
  let largest = 0;
  for (let j = 0; j < vector.length; j++) largest = Math.max(largest, Math.abs(vector[j]));
  // Entries at rounding level of the largest are zeros of the exact null space.
  const v = Float64Array.from(vector, (x) => (Math.abs(x) <= RANK_TOLERANCE * largest ? 0 : x));
  let smallest = Infinity;
  for (let j = 0; j < v.length; j++) if (v[j] !== 0) smallest = Math.min(smallest, Math.abs(v[j]));
  const out = new Float64Array(v.length);
  for (let multiple = 1; multiple <= 12; multiple++) {
    let whole = true;
    for (let j = 0; j < v.length && whole; j++) {
      const x = (v[j] / smallest) * multiple;
      const rounded = Math.round(x);
      if (Math.abs(x - rounded) > INTEGER_SNAP * Math.max(1, Math.abs(x))) whole = false;
      else out[j] = rounded;
    }
    if (whole) return out;
  }
  for (let j = 0; j < v.length; j++) out[j] = v[j] / largest;
  return out;
}

/** The restricted problem's answer in terms of the reactions as given. */
export function expandedResult(problem: EquilibriumProblem, restriction: Restriction, solved: EquilibriumResult): EquilibriumResult {
  const R = problem.reactions.length;
  const S = problem.species.length;
  const extents = new Array<number>(R).fill(0);
  const lnQ = new Array<number>(R).fill(0);
  const lnQ0 = new Array<number>(R).fill(0);
  const inactive: number[] = [];
  const solvedInactive = new Set(solved.inactiveReactions);
  for (let r = 0; r < R; r++) {
    const q = restriction.kept[r];
    if (q < 0) continue;
    extents[r] = solved.extents[q];
    lnQ[r] = solved.lnQ[q];
    lnQ0[r] = solved.lnQ0[q];
    if (solvedInactive.has(q)) inactive.push(r);
  }
  // The entangled reactions: extents from the combinations, ln Q in the restricted problem's convention.
  const again = prepare(restriction.problem);
  const logA = new Float64Array(S);
  const logA0 = new Float64Array(S);
  const rowNu = new Float64Array(S);
  if (again.ok) {
    quotientLogActivities(again.prepared, solved.n, logA);
    quotientLogActivities(again.prepared, again.prepared.n0, logA0);
  }
  restriction.entangled.forEach((r, col) => {
    let runs = false;
    restriction.weights.forEach((w, k) => {
      if (w[col] === 0) return;
      extents[r] += w[col] * solved.extents[restriction.first + k];
      if (!solvedInactive.has(restriction.first + k)) runs = true;
    });
    for (let i = 0; i < S; i++) rowNu[i] = problem.reactions[r].nu[i];
    lnQ[r] = lnQuotientRow(rowNu, 0, S, logA);
    lnQ0[r] = lnQuotientRow(rowNu, 0, S, logA0);
    if (!runs) inactive.push(r);
  });
  inactive.sort((a, b) => a - b);
  return { ...solved, extents, lnQ, lnQ0, inactiveReactions: inactive };
}
