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

const PHASES: readonly SolverPhase[] = ['g', 'l', 'aq', 's', 'solvent'];

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
  /** Flat pairs (reaction, direction ±1) in the order the reactions became able to run. */
  readonly kicks: readonly number[];
  /** Species touched by the active reactions, ascending. */
  readonly variable: Int32Array;
  /** Σ n0 over all species. */
  readonly totalAmount: number;
}

export type PrepareOutcome = { readonly ok: true; readonly prepared: Prepared } | { readonly ok: false; readonly message: string };

const isFiniteNumber = (x: unknown): x is number => typeof x === 'number' && Number.isFinite(x);

function fail(message: string): PrepareOutcome {
  return { ok: false, message };
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
 */
export function prepare(problem: EquilibriumProblem): PrepareOutcome {
  if (problem === null || typeof problem !== 'object') return fail('the problem is not an object');
  const { species, reactions, conditions } = problem;
  if (!Array.isArray(species)) return fail('the species list is missing');
  if (!Array.isArray(reactions)) return fail('the reaction list is missing');
  if (conditions === null || typeof conditions !== 'object') return fail('the conditions are missing');
  const S = species.length;
  const R = reactions.length;

  const n0 = new Float64Array(S);
  let hasAqueous = false;
  const speciesName = (i: number): string => (species[i] && typeof species[i].id === 'string' ? `"${species[i].id}"` : `#${i + 1}`);
  for (let i = 0; i < S; i++) {
    const sp = species[i];
    if (!sp || !PHASES.includes(sp.phase)) return fail(`species ${speciesName(i)} has an unknown phase (expected g, l, aq, s or solvent)`);
    const amount = sp.n0;
    if (!(amount >= 0) || amount === Infinity) {
      if (typeof amount !== 'number' || Number.isNaN(amount)) return fail(`species ${speciesName(i)} has an initial amount that is not a number`);
      if (amount === Infinity) return fail(`species ${speciesName(i)} has an infinite initial amount`);
      return fail(`species ${speciesName(i)} has a negative initial amount (${amount} mol)`);
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

  const nu = new Float64Array(R * S);
  const lnK = new Float64Array(R);
  const reactionName = (r: number): string => (reactions[r] && typeof reactions[r].label === 'string' ? `"${reactions[r].label}"` : `#${r + 1}`);
  for (let r = 0; r < R; r++) {
    const re = reactions[r];
    if (!re || !Array.isArray(re.nu)) return fail(`reaction ${reactionName(r)} has no stoichiometric coefficients`);
    if (re.nu.length !== S) return fail(`reaction ${reactionName(r)} has ${re.nu.length} stoichiometric coefficients for ${S} species`);
    let hasReactant = false;
    let hasProduct = false;
    for (let i = 0; i < S; i++) {
      const v = re.nu[i];
      if (!isFiniteNumber(v)) return fail(`reaction ${reactionName(r)} has a coefficient for species "${species[i].id}" that is not a finite number`);
      nu[r * S + i] = v;
      if (v < 0) hasReactant = true;
      if (v > 0) hasProduct = true;
    }
    if (!hasReactant && !hasProduct) return fail(`reaction ${reactionName(r)} has all stoichiometric coefficients zero`);
    if (!hasReactant) return fail(`reaction ${reactionName(r)} has no reactants (a balanced reaction needs both sides)`);
    if (!hasProduct) return fail(`reaction ${reactionName(r)} has no products (a balanced reaction needs both sides)`);
    if (!isFiniteNumber(re.lnK)) return fail(`reaction ${reactionName(r)} has a ln K that is not a finite number`);
    lnK[r] = re.lnK;
  }

  // Linear dependence among all reactions: a dependent reaction's ln K must agree.
  const allRows: number[] = [];
  for (let r = 0; r < R; r++) allRows.push(r);
  const dependence = independentRows(nu, S, allRows);
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
      return fail(
        `reaction "${reactions[dep.row].label}" is a combination of ${parts.join(', ')} but its ln K (${lnK[dep.row]}) ` +
          `disagrees with theirs (${combined}): the equilibrium constants are inconsistent`,
      );
    }
  }

  // Which reactions can run, and which species can ever form (fixed point from what is present).
  const formable = new Uint8Array(S);
  for (let i = 0; i < S; i++) if (n0[i] > 0) formable[i] = 1;
  const runForward = new Uint8Array(R);
  const runBackward = new Uint8Array(R);
  const kicks: number[] = [];
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
  const active = new Uint8Array(R);
  const inactive: number[] = [];
  const activeRows: number[] = [];
  for (let r = 0; r < R; r++) {
    if (runForward[r] || runBackward[r]) {
      active[r] = 1;
      activeRows.push(r);
    } else inactive.push(r);
  }
  const activeDependence = independentRows(nu, S, activeRows);
  const basis = Int32Array.from(activeDependence.basis);
  const rho = basis.length;
  const basisCoefficients = new Float64Array(R * rho);
  for (let k = 0; k < rho; k++) basisCoefficients[basis[k] * rho + k] = 1;
  for (const dep of activeDependence.dependent) for (let k = 0; k < rho; k++) basisCoefficients[dep.row * rho + k] = dep.coefficients[k];

  const touched = new Uint8Array(S);
  for (const r of basis) for (let i = 0; i < S; i++) if (nu[r * S + i] !== 0) touched[i] = 1;
  let touchedCount = 0;
  for (let i = 0; i < S; i++) touchedCount += touched[i];
  const variable = new Int32Array(touchedCount);
  for (let i = 0, j = 0; i < S; i++) if (touched[i]) variable[j++] = i;

  // Activity models. A mole-fraction phase with a single member (no inert member either)
  // is a pure phase: its activity is constant while it is present.
  const members = [0, 0];
  const groupInert = new Float64Array(2);
  for (let i = 0; i < S; i++) {
    const g = groupOf(species[i].phase, conditions.kind);
    if (g < 0) continue;
    if (touched[i] || n0[i] > 0) members[g]++;
    if (!touched[i]) groupInert[g] += n0[i];
  }
  const model = new Int8Array(S);
  const group = new Int8Array(S).fill(-1);
  const offset = new Float64Array(S);
  const lnAqueous = liquidVolume !== undefined ? -Math.log(liquidVolume * STANDARD_CONCENTRATION) : 0;
  for (let i = 0; i < S; i++) {
    const phase = species[i].phase;
    const g = groupOf(phase, conditions.kind);
    if (phase === 's' || phase === 'solvent') {
      model[i] = PURE;
      offset[i] = 0;
    } else if (g >= 0) {
      const gasOffset = g === GAS_GROUP ? lnGasOffset : 0;
      if (members[g] <= 1) {
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
      variable,
      totalAmount,
    },
  };
}

function groupOf(phase: SolverPhase, kind: 'constant-pressure' | 'constant-volume'): number {
  if (phase === 'l') return LIQUID_GROUP;
  if (phase === 'g' && kind === 'constant-pressure') return GAS_GROUP;
  return -1;
}

interface Dependence {
  /** Independent rows, in input order. */
  readonly basis: number[];
  /** Each dependent row with its coefficients on `basis` (row ≈ Σ c_k basis_k). */
  readonly dependent: { readonly row: number; readonly coefficients: Float64Array }[];
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
  const reduced: Float64Array[] = []; // echelon rows
  const pivot: number[] = [];
  const combos: Float64Array[] = []; // echelon row = Σ combo_k · original(kept_k), over rows.length
  const dependent: { row: number; coefficients: Float64Array }[] = [];
  const count = rows.length;
  if (count === 0) return { basis: [], dependent };
  for (let t = 0; t < count; t++) {
    const r = rows[t];
    const v = nu.slice(r * S, r * S + S);
    let scale = 0;
    for (let i = 0; i < S; i++) scale = Math.max(scale, Math.abs(v[i]));
    const combo = new Float64Array(count); // v = original(r) - Σ combo·(kept originals)
    for (let e = 0; e < reduced.length; e++) {
      const p = pivot[e];
      const f = v[p] / reduced[e][p];
      if (f === 0) continue;
      for (let i = 0; i < S; i++) v[i] -= f * reduced[e][i];
      v[p] = 0;
      for (let k = 0; k < count; k++) combo[k] += f * combos[e][k];
    }
    let best = -1;
    let max = DEPENDENCE_TOLERANCE * scale;
    for (let i = 0; i < S; i++) {
      if (Math.abs(v[i]) > max) {
        max = Math.abs(v[i]);
        best = i;
      }
    }
    if (best < 0) {
      // original(r) ≈ Σ combo_k · original(kept_k); padded to the final basis size below.
      dependent.push({ row: r, coefficients: combo });
    } else {
      const own = new Float64Array(count);
      for (let k = 0; k < count; k++) own[k] = -combo[k];
      own[kept.length] = 1;
      kept.push(r);
      reduced.push(v);
      pivot.push(best);
      combos.push(own);
    }
  }
  // Coefficients on the basis as finally kept (rows kept after a dependent one get 0).
  for (const dep of dependent) dep.coefficients = dep.coefficients.slice(0, kept.length);
  return { basis: kept, dependent };
}
