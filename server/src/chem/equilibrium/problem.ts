// Validation and preparation of an equilibrium problem: checks every input
// (returning a message, never throwing), classifies each species' activity
// model, finds which reactions can run and which species can ever form, and
// picks a basis of linearly independent active reactions.
import {
  GAS_CONSTANT,
  STANDARD_CONCENTRATION,
  STANDARD_PRESSURE,
  type EquilibriumProblem,
  type SolverPhase,
} from './types';
import { formingCombination } from './combinations';

/** Activity model: constant activity while present (solid, solvent, sole member of a mole-fraction phase). */
export const PURE = 0;
/** Activity proportional to the amount: ln a = ln n + offset ('aq'; 'g' at constant volume). */
export const PROPORTIONAL = 1;
/** Activity from a mole fraction: ln a = ln n + offset - ln N_group ('l'; 'g' at constant pressure). */
export const FRACTION = 2;

/** Mole-fraction groups: the gas phase at constant pressure and the 'l' liquid mixture. */
export const GAS_GROUP = 0;
export const LIQUID_GROUP = 1;

/** A stoichiometric row whose largest remaining entry after elimination is below this fraction of its largest entry is dependent. */
export const DEPENDENCE_TOLERANCE = 1e-9;
/**
 * Allowed disagreement (in ln K) between a dependent reaction's ln K and the same
 * combination of the independent ones' (a ratio of K within 1 ppm), plus rounding.
 */
export const DEPENDENT_LNK_TOLERANCE = 1e-6;
/** Relative rounding allowance on the combination of ln K values. */
const LNK_ROUNDING = 1e-12;

/** Whether `phase` is one of the solver's phases (see {@link SolverPhase}). */
function isPhase(phase: unknown): phase is SolverPhase {
  return phase === 'g' || phase === 'l' || phase === 'aq' || phase === 's' || phase === 'solvent';
}

export interface Prepared {
  readonly problem: EquilibriumProblem;
  readonly speciesCount: number;
  readonly reactionCount: number;
  readonly n0: Float64Array;
  /** Stoichiometric matrix, reactions × species, row-major. */
  readonly nu: Float64Array;
  readonly lnK: Float64Array;
  /** Activity model of each species (PURE, PROPORTIONAL, FRACTION). */
  readonly model: Int8Array;
  /** Mole-fraction group of a FRACTION species (GAS_GROUP, LIQUID_GROUP), -1 otherwise. */
  readonly group: Int8Array;
  /** ln a = ln n + offset (- ln N_group); for PURE the constant ln a of the pure phase. */
  readonly offset: Float64Array;
  /** Amount in each mole-fraction group from species that take part in no active reaction. */
  readonly groupInert: Float64Array;
  readonly active: Uint8Array;
  readonly inactive: readonly number[];
  readonly formable: Uint8Array;
  /** Indices of the independent active reactions (input order, greedy). */
  readonly basis: Int32Array;
  /** Each active reaction as a combination of the basis: reactions × basis, row-major. */
  readonly basisCoefficients: Float64Array;
  /**
   * Flat pairs (reaction, direction ±1) in the order the reactions became able to run; a pair
   * (q, 0) stands for the reaction combination `combinations[q]` (see runnableReactions).
   */
  readonly kicks: readonly number[];
  /** Extents (length R each) of the reaction combinations that form species no single reaction can start. */
  readonly combinations: readonly Float64Array[];
  /** Species touched by the active reactions, ascending. */
  readonly variable: Int32Array;
  /** 1 for each species in `variable`. */
  readonly touched: Uint8Array;
  /** Σ n0 over all species. */
  readonly totalAmount: number;
}

export type PrepareOutcome = { readonly ok: true; readonly prepared: Prepared } | { readonly ok: false; readonly message: string };

const isFiniteNumber = (x: unknown): x is number => typeof x === 'number' && Number.isFinite(x);

function fail(message: string): PrepareOutcome {
  return { ok: false, message };
}

/** A species for a message: its quoted id, or its 1-based position when it has none. */
function speciesName(species: EquilibriumProblem['species'], i: number): string {
  return species[i] && typeof species[i].id === 'string' ? `"${species[i].id}"` : `#${i + 1}`;
}

/** A reaction for a message: its quoted label, or its 1-based position when it has none. */
function reactionName(reactions: EquilibriumProblem['reactions'], r: number): string {
  return reactions[r] && typeof reactions[r].label === 'string' ? `"${reactions[r].label}"` : `#${r + 1}`;
}

/**
 * The typed arrays of a prepared problem with S species and R reactions, kept from one
 * solve to the next: solving a problem of the same size again (a notebook re-solves its
 * batches on every edit; a benchmark repeats one problem) then allocates none of them.
 * This is safe because a prepared problem never outlives its solve (the result is built
 * from copies) and solves are not re-entrant; `prepare` rewrites every entry it reads.
 * The arrays whose length depends on the problem's structure (basis, variable species)
 * are kept too and replaced when that length changes.
 */
class PreparedArrays {
  readonly n0: Float64Array;
  readonly nu: Float64Array;
  readonly lnK: Float64Array;
  readonly model: Int8Array;
  readonly group: Int8Array;
  readonly offset: Float64Array;
  readonly groupInert = new Float64Array(2);
  readonly active: Uint8Array;
  readonly formable: Uint8Array;
  readonly runForward: Uint8Array;
  readonly runBackward: Uint8Array;
  readonly touched: Uint8Array;
  basis = new Int32Array(0);
  basisCoefficients = new Float64Array(0);
  variable = new Int32Array(0);
  constructor(
    readonly speciesCount: number,
    readonly reactionCount: number,
  ) {
    const S = speciesCount;
    const R = reactionCount;
    this.n0 = new Float64Array(S);
    this.nu = new Float64Array(R * S);
    this.lnK = new Float64Array(R);
    this.model = new Int8Array(S);
    this.group = new Int8Array(S);
    this.offset = new Float64Array(S);
    this.active = new Uint8Array(R);
    this.formable = new Uint8Array(S);
    this.runForward = new Uint8Array(R);
    this.runBackward = new Uint8Array(R);
    this.touched = new Uint8Array(S);
  }
}

let pooledArrays: PreparedArrays | undefined;

function preparedArrays(S: number, R: number): PreparedArrays {
  if (!pooledArrays || pooledArrays.speciesCount !== S || pooledArrays.reactionCount !== R) pooledArrays = new PreparedArrays(S, R);
  return pooledArrays;
}

/**
 * Checks the problem and builds everything the solvers need; never throws on bad input.
 * Besides the checks of the brief, a reaction with only products or only reactants is
 * invalid: no balanced reaction looks like that, and its extent would have no bound.
 * Dependence: reactions are kept greedily in input order (Gaussian elimination); a later
 * reaction that is a combination of earlier ones must have ln K equal to the same
 * combination within DEPENDENT_LNK_TOLERANCE, else the problem is invalid (naming both).
 * Formability: from the species present, a reaction can run forward once all its reactants
 * can exist and backward once all its products can (a fixed point); reactions that can do
 * neither are inactive, species never reached stay exactly zero.
 * The returned arrays are reused by the next call (see PreparedArrays): a prepared problem
 * is valid until the next `prepare`.
 */
export function prepare(problem: EquilibriumProblem): PrepareOutcome {
  if (problem === null || typeof problem !== 'object') return fail('the problem is not an object');
  const { species, reactions, conditions } = problem;
  if (!Array.isArray(species)) return fail('the species list is missing');
  if (!Array.isArray(reactions)) return fail('the reaction list is missing');
  if (conditions === null || typeof conditions !== 'object') return fail('the conditions are missing');
  const S = species.length;
  const R = reactions.length;
  const arrays = preparedArrays(S, R);

  const n0 = arrays.n0;
  let hasAqueous = false;
  for (let i = 0; i < S; i++) {
    const sp = species[i];
    if (!sp || !isPhase(sp.phase)) return fail(`species ${speciesName(species, i)} has an unknown phase (expected g, l, aq, s or solvent)`);
    const amount = sp.n0;
    if (!(amount >= 0) || amount === Infinity) {
      if (typeof amount !== 'number' || Number.isNaN(amount)) return fail(`species ${speciesName(species, i)} has an initial amount that is not a number`);
      if (amount === Infinity) return fail(`species ${speciesName(species, i)} has an infinite initial amount`);
      return fail(`species ${speciesName(species, i)} has a negative initial amount (${amount} mol)`);
    }
    n0[i] = amount;
    if (sp.phase === 'aq') hasAqueous = true;
  }

  const T = conditions.T;
  if (!isFiniteNumber(T) || T <= 0) return fail(`the temperature must be a finite number above 0 K (got ${String(T)})`);
  let lnGasOffset: number; // ln a - ln n for a gas (constant volume) or ln(P/P°) (constant pressure)
  if (conditions.kind === 'constant-pressure') {
    if (!isFiniteNumber(conditions.P) || conditions.P <= 0) return fail(`the pressure must be a finite number above 0 Pa (got ${String(conditions.P)})`);
    lnGasOffset = Math.log(conditions.P / STANDARD_PRESSURE);
  } else if (conditions.kind === 'constant-volume') {
    if (!isFiniteNumber(conditions.gasVolume) || conditions.gasVolume <= 0)
      return fail(`the gas volume must be a finite number above 0 m^3 (got ${String(conditions.gasVolume)})`);
    lnGasOffset = Math.log((GAS_CONSTANT * T) / (conditions.gasVolume * STANDARD_PRESSURE));
  } else {
    return fail('the conditions must be constant-pressure or constant-volume');
  }
  const liquidVolume = problem.liquidVolume;
  if (liquidVolume !== undefined && (!isFiniteNumber(liquidVolume) || liquidVolume <= 0))
    return fail(`the liquid volume must be a finite number above 0 m^3 (got ${String(liquidVolume)})`);
  if (hasAqueous && liquidVolume === undefined) {
    const first = species.find((s) => s.phase === 'aq');
    return fail(`species "${first?.id ?? ''}" is aqueous (aq) but no liquid volume was given`);
  }

  const nu = arrays.nu;
  const lnK = arrays.lnK;
  for (let r = 0; r < R; r++) {
    const re = reactions[r];
    if (!re || !Array.isArray(re.nu)) return fail(`reaction ${reactionName(reactions, r)} has no stoichiometric coefficients`);
    if (re.nu.length !== S) return fail(`reaction ${reactionName(reactions, r)} has ${re.nu.length} stoichiometric coefficients for ${S} species`);
    let hasReactant = false;
    let hasProduct = false;
    for (let i = 0; i < S; i++) {
      const v = re.nu[i];
      if (!isFiniteNumber(v)) return fail(`reaction ${reactionName(reactions, r)} has a coefficient for species "${species[i].id}" that is not a finite number`);
      nu[r * S + i] = v;
      if (v < 0) hasReactant = true;
      if (v > 0) hasProduct = true;
    }
    if (!hasReactant && !hasProduct) return fail(`reaction ${reactionName(reactions, r)} has all stoichiometric coefficients zero`);
    if (!hasReactant) return fail(`reaction ${reactionName(reactions, r)} has no reactants (a balanced reaction needs both sides)`);
    if (!hasProduct) return fail(`reaction ${reactionName(reactions, r)} has no products (a balanced reaction needs both sides)`);
    if (!isFiniteNumber(re.lnK)) return fail(`reaction ${reactionName(reactions, r)} has a ln K that is not a finite number`);
    lnK[r] = re.lnK;
  }

  // Linear dependence among all reactions: a dependent reaction's ln K must agree. A single
  // reaction (it has a non-zero coefficient) is independent: nothing to check.
  let dependence: Dependence | undefined;
  if (R > 1) {
    const allRows: number[] = [];
    for (let r = 0; r < R; r++) allRows.push(r);
    dependence = independentRows(nu, S, allRows);
    const inconsistent = inconsistentDependence(dependence, lnK, reactions);
    if (inconsistent) return fail(inconsistent);
  }

  // Which reactions can run, and which species can ever form (fixed point from what is present).
  const { formable, runForward, runBackward } = arrays;
  const runnable = runnableReactions(nu, n0, S, R, formable, runForward, runBackward);
  const { kicks, combinations } = runnable;
  const active = arrays.active;
  const inactive: number[] = [];
  for (let r = 0; r < R; r++) {
    active[r] = runForward[r] || runBackward[r] ? 1 : 0;
    if (!active[r]) inactive.push(r);
  }
  // The independent active reactions. With every reaction active this is the elimination
  // above (same rows, same order); a single active reaction is independent by itself.
  const activeDependence = activeIndependence(nu, S, R, active, inactive.length, dependence);
  const rho = activeDependence.basis.length;
  if (arrays.basis.length !== rho) arrays.basis = new Int32Array(rho);
  const basis = arrays.basis;
  for (let k = 0; k < rho; k++) basis[k] = activeDependence.basis[k];
  if (arrays.basisCoefficients.length !== R * rho) arrays.basisCoefficients = new Float64Array(R * rho);
  const basisCoefficients = arrays.basisCoefficients;
  for (let q = 0; q < R * rho; q++) basisCoefficients[q] = 0;
  for (let k = 0; k < rho; k++) basisCoefficients[basis[k] * rho + k] = 1;
  for (const dep of activeDependence.dependent) for (let k = 0; k < rho; k++) basisCoefficients[dep.row * rho + k] = dep.coefficients[k];

  const touched = arrays.touched;
  for (let i = 0; i < S; i++) touched[i] = 0;
  for (let k = 0; k < rho; k++) {
    const r = basis[k];
    for (let i = 0; i < S; i++) if (nu[r * S + i] !== 0) touched[i] = 1;
  }
  let touchedCount = 0;
  for (let i = 0; i < S; i++) touchedCount += touched[i];
  if (arrays.variable.length !== touchedCount) arrays.variable = new Int32Array(touchedCount);
  const variable = arrays.variable;
  for (let i = 0, j = 0; i < S; i++) if (touched[i]) variable[j++] = i;

  // Activity models. A mole-fraction phase with a single member (no inert member either)
  // is a pure phase: its activity is constant while it is present.
  let gasMembers = 0;
  let liquidMembers = 0;
  const groupInert = arrays.groupInert;
  groupInert[GAS_GROUP] = 0;
  groupInert[LIQUID_GROUP] = 0;
  for (let i = 0; i < S; i++) {
    const g = groupOf(species[i].phase, conditions.kind);
    if (g < 0) continue;
    if (touched[i] || n0[i] > 0) {
      if (g === GAS_GROUP) gasMembers++;
      else liquidMembers++;
    }
    if (!touched[i]) groupInert[g] += n0[i];
  }
  const model = arrays.model;
  const group = arrays.group;
  const offset = arrays.offset;
  const lnAqueous = liquidVolume !== undefined ? -Math.log(liquidVolume * STANDARD_CONCENTRATION) : 0;
  for (let i = 0; i < S; i++) {
    const phase = species[i].phase;
    const g = groupOf(phase, conditions.kind);
    group[i] = -1;
    if (phase === 's' || phase === 'solvent') {
      model[i] = PURE;
      offset[i] = 0;
    } else if (g >= 0) {
      const gasOffset = g === GAS_GROUP ? lnGasOffset : 0;
      if ((g === GAS_GROUP ? gasMembers : liquidMembers) <= 1) {
        model[i] = PURE;
        offset[i] = gasOffset;
      } else {
        model[i] = FRACTION;
        group[i] = g;
        offset[i] = gasOffset;
      }
    } else if (phase === 'g') {
      model[i] = PROPORTIONAL;
      offset[i] = lnGasOffset;
    } else {
      model[i] = PROPORTIONAL;
      offset[i] = lnAqueous;
    }
  }

  let totalAmount = 0;
  for (let i = 0; i < S; i++) totalAmount += n0[i];

  return {
    ok: true,
    prepared: {
      problem,
      speciesCount: S,
      reactionCount: R,
      n0,
      nu,
      lnK,
      model,
      group,
      offset,
      groupInert,
      active,
      inactive,
      formable,
      basis,
      basisCoefficients,
      kicks,
      combinations,
      variable,
      touched,
      totalAmount,
    },
  };
}

/** What the formability analysis found: the kicks and the combinations they refer to. */
interface Runnable {
  readonly kicks: number[];
  readonly combinations: Float64Array[];
}

/**
 * The fixed point of formability: from the species present (n0 > 0), a reaction can run
 * forward once all its reactants can exist and backward once all its products can, and then
 * its products (reactants) can exist. Fills `formable`, `runForward`, `runBackward` and
 * returns flat pairs (reaction, direction ±1): each reaction that can run, once, with the
 * first direction it could run in, in the order they became able to run.
 * A species can also be formable when no single reaction can start it but a combination
 * can: with A + X → Y and B + Y → 2 X and X, Y absent, 3 of the first and 2 of the second
 * give 3 A + 2 B → X + Y, a feasible change of a closed system. Equilibrium is the minimum of G over all of
 * n0 + ν·ξ >= 0, so such species must form too (their −ln n makes G fall). After each fixed
 * point, formingCombination (combinations.ts) looks for the largest set of such species; its
 * reactions become active, it is recorded as a kick pair (index into `combinations`, 0), and
 * the fixed point goes on. A combination that also involves a species it does not form (that
 * species stays exactly zero, e.g. an intermediate made and used up in step) cannot be run
 * here: its reactions touch a species held at zero, which the extent model cannot
 * represent. Its species are still marked formable (so `formable` ends as the exact set of
 * species some feasible change can form) but no reaction is made active by it;
 * solveEquilibrium then solves the problem again with such reactions replaced by their
 * combinations that leave the never-formable species alone (restriction.ts).
 */
function runnableReactions(
  nu: Float64Array,
  n0: Float64Array,
  S: number,
  R: number,
  formable: Uint8Array,
  runForward: Uint8Array,
  runBackward: Uint8Array,
): Runnable {
  for (let i = 0; i < S; i++) formable[i] = n0[i] > 0 ? 1 : 0;
  for (let r = 0; r < R; r++) {
    runForward[r] = 0;
    runBackward[r] = 0;
  }
  const kicks: number[] = [];
  const combinations: Float64Array[] = [];
  for (let round = 0; round <= S; round++) {
    for (let changed = true; changed; ) {
      changed = false;
      for (let r = 0; r < R; r++) {
        for (let dir = 1; dir >= -1; dir -= 2) {
          if ((dir === 1 ? runForward : runBackward)[r]) continue;
          let ok = true;
          for (let i = 0; i < S && ok; i++) if (nu[r * S + i] * dir < 0 && !formable[i]) ok = false;
          if (!ok) continue;
          (dir === 1 ? runForward : runBackward)[r] = 1;
          if (!runForward[r] || !runBackward[r]) kicks.push(r, dir);
          for (let i = 0; i < S; i++) if (nu[r * S + i] * dir > 0) formable[i] = 1;
          changed = true;
        }
      }
    }
    const zero: number[] = [];
    for (let i = 0; i < S; i++) if (!formable[i]) zero.push(i);
    const combination = formingCombination(nu, S, R, zero);
    if (!combination) break;
    // Supported only when every species of the combination's reactions can then exist; else
    // (it also involves a species that stays zero) only formability records it.
    const next = formable.slice();
    for (const i of combination.formed) next[i] = 1;
    let supported = true;
    for (let r = 0; r < R && supported; r++) {
      if (combination.extents[r] === 0) continue;
      for (let i = 0; i < S; i++) if (nu[r * S + i] !== 0 && !next[i]) supported = false;
    }
    formable.set(next);
    if (!supported) continue;
    for (let r = 0; r < R; r++) {
      const x = combination.extents[r];
      if (x > 0) runForward[r] = 1;
      else if (x < 0) runBackward[r] = 1;
    }
    kicks.push(combinations.length, 0);
    combinations.push(combination.extents);
  }
  return { kicks, combinations };
}

/**
 * The message for a dependent reaction whose ln K disagrees with the same combination of
 * the independent ones' (beyond DEPENDENT_LNK_TOLERANCE plus rounding), or undefined.
 */
function inconsistentDependence(dependence: Dependence, lnK: Float64Array, reactions: EquilibriumProblem['reactions']): string | undefined {
  for (const dep of dependence.dependent) {
    let combined = 0;
    let magnitude = Math.abs(lnK[dep.row]);
    for (let k = 0; k < dependence.basis.length; k++) {
      const c = dep.coefficients[k];
      if (c === 0) continue;
      combined += c * lnK[dependence.basis[k]];
      magnitude += Math.abs(c * lnK[dependence.basis[k]]);
    }
    if (!(Math.abs(combined - lnK[dep.row]) <= DEPENDENT_LNK_TOLERANCE + LNK_ROUNDING * magnitude)) {
      const parts = dependence.basis.filter((_, k) => dep.coefficients[k] !== 0).map((b) => `"${reactions[b].label}"`);
      return (
        `reaction "${reactions[dep.row].label}" is a combination of ${parts.join(', ')} but its ln K (${lnK[dep.row]}) ` +
        `disagrees with theirs (${combined}): the equilibrium constants are inconsistent`
      );
    }
  }
  return undefined;
}

/** Basis of one reaction that is independent by itself (it has a non-zero coefficient). */
const SINGLE_BASIS: Dependence = { basis: [0], dependent: [] };
/** No active reaction. */
const EMPTY_BASIS: Dependence = { basis: [], dependent: [] };

/**
 * Greedy independence of the active reactions in input order. Exact shortcuts: with every
 * reaction active it is `all` (the elimination of all reactions, when there are several);
 * a single reaction is independent when active.
 */
function activeIndependence(nu: Float64Array, S: number, R: number, active: Uint8Array, inactiveCount: number, all: Dependence | undefined): Dependence {
  if (inactiveCount === 0 && all) return all;
  if (R === 1) return active[0] ? SINGLE_BASIS : EMPTY_BASIS;
  const activeRows: number[] = [];
  for (let r = 0; r < R; r++) if (active[r]) activeRows.push(r);
  return independentRows(nu, S, activeRows);
}

function groupOf(phase: SolverPhase, kind: 'constant-pressure' | 'constant-volume'): number {
  if (phase === 'l') return LIQUID_GROUP;
  if (phase === 'g' && kind === 'constant-pressure') return GAS_GROUP;
  return -1;
}

interface Dependence {
  /** Independent rows, in input order. */
  readonly basis: readonly number[];
  /** Each dependent row with its coefficients on `basis` (row ≈ Σ c_k basis_k). */
  readonly dependent: readonly { readonly row: number; readonly coefficients: Float64Array }[];
}

/**
 * Greedy independence in the given order by Gaussian elimination: each row is reduced
 * against the rows kept so far (partial pivoting on its largest entry); a row that
 * reduces to (relatively) zero is dependent, and the elimination also yields its
 * coefficients on the kept rows.
 */
function independentRows(nu: Float64Array, S: number, rows: readonly number[]): Dependence {
  if (rows.length === 1) return { basis: [rows[0]], dependent: [] }; // a reaction with a non-zero coefficient is independent
  const kept: number[] = [];
  const pivot: number[] = [];
  const dependent: { row: number; coefficients: Float64Array }[] = [];
  const count = rows.length;
  if (count === 0) return { basis: [], dependent };
  // Row e of `reduced` (S wide) is the e-th echelon row, and row e of `combos` (count wide)
  // its combination of the kept originals; the row after the last kept one is the work row.
  if (eliminationRows.length < count * S) eliminationRows = new Float64Array(count * S);
  if (eliminationCombos.length < count * count) eliminationCombos = new Float64Array(count * count);
  const reduced = eliminationRows;
  const combos = eliminationCombos;
  for (let t = 0; t < count; t++) {
    const r = rows[t];
    const at = kept.length;
    const v = at * S; // v = original(r) - Σ combo·(kept originals)
    const combo = at * count;
    let scale = 0;
    for (let i = 0; i < S; i++) {
      reduced[v + i] = nu[r * S + i];
      scale = Math.max(scale, Math.abs(reduced[v + i]));
    }
    for (let k = 0; k < count; k++) combos[combo + k] = 0;
    for (let e = 0; e < at; e++) {
      const p = pivot[e];
      const f = reduced[v + p] / reduced[e * S + p];
      if (f === 0) continue;
      for (let i = 0; i < S; i++) reduced[v + i] -= f * reduced[e * S + i];
      reduced[v + p] = 0;
      for (let k = 0; k < count; k++) combos[combo + k] += f * combos[e * count + k];
    }
    let best = -1;
    let max = DEPENDENCE_TOLERANCE * scale;
    for (let i = 0; i < S; i++) {
      if (Math.abs(reduced[v + i]) > max) {
        max = Math.abs(reduced[v + i]);
        best = i;
      }
    }
    if (best < 0) {
      // original(r) ≈ Σ combo_k · original(kept_k); padded to the final basis size below.
      dependent.push({ row: r, coefficients: combos.slice(combo, combo + count) });
    } else {
      for (let k = 0; k < count; k++) combos[combo + k] = -combos[combo + k];
      combos[combo + at] = 1;
      kept.push(r);
      pivot.push(best);
    }
  }
  // Coefficients on the basis as finally kept (rows kept after a dependent one get 0).
  for (const dep of dependent) dep.coefficients = dep.coefficients.slice(0, kept.length);
  return { basis: kept, dependent };
}

/** Work space of independentRows (echelon rows, their combinations), grown as needed; nothing in it outlives a call. */
let eliminationRows = new Float64Array(0);
let eliminationCombos = new Float64Array(0);
