// Shared helpers for the equilibrium solver tests: relative comparison, seeded
// random reaction networks built from element-like compositions (so every
// reaction is balanced in whole numbers and element totals are the
// conservation laws), and checks of conservation and mass action.
import { expect } from 'vitest';
import type { EquilibriumProblem, EquilibriumResult, SolverPhase, SolverReaction } from '../../../server/src/chem/equilibrium';
import { Random } from '../../support/random';

/** |actual − expected| <= rel·|expected|, with a message naming what is compared. */
export function expectRelative(actual: number, expected: number, rel: number, what = ''): void {
  const error = Math.abs(actual - expected);
  if (!(error <= rel * Math.abs(expected))) {
    throw new Error(`${what}: got ${actual}, expected ${expected} (relative error ${error / Math.abs(expected)} > ${rel})`);
  }
}

export interface Network {
  readonly problem: EquilibriumProblem;
  /** Element composition of each species (species × elements). */
  readonly composition: readonly (readonly number[])[];
}

export interface NetworkOptions {
  readonly minSpecies: number;
  readonly maxSpecies: number;
  readonly minReactions: number;
  readonly maxReactions: number;
  readonly phases: readonly SolverPhase[];
  /** Half-width of the uniform range of the random standard potentials μ°/RT. */
  readonly potentialScale: number;
  readonly kind?: 'constant-pressure' | 'constant-volume';
}

/**
 * A random balanced network: 2–4 element species, then compounds each made of two or
 * three earlier species (so the compound's formation reaction is balanced), reactions
 * drawn from formation reactions and differences of two, and ln K = −Σ ν·μ° from random
 * standard potentials, so linearly dependent reactions are always consistent.
 */
export function randomNetwork(rng: Random, o: NetworkOptions): Network {
  const elements = rng.int(2, 4);
  const S = rng.int(Math.max(o.minSpecies, elements + 2), o.maxSpecies);
  const composition: number[][] = [];
  const formation: number[][] = [];
  for (let i = 0; i < S; i++) {
    const nu = new Array<number>(S).fill(0);
    const c = new Array<number>(elements).fill(0);
    if (i < elements) c[i] = 1;
    else {
      const parts = rng.int(2, 3);
      for (let k = 0; k < parts; k++) {
        const j = rng.int(0, i - 1);
        nu[j] -= 1;
        for (let e = 0; e < elements; e++) c[e] += composition[j][e];
      }
      nu[i] += 1;
    }
    composition.push(c);
    formation.push(nu);
  }
  const wanted = Math.min(rng.int(o.minReactions, o.maxReactions), S - elements);
  const reactions: SolverReaction[] = [];
  const mu = composition.map(() => (2 * rng.next() - 1) * o.potentialScale);
  const used = new Set<number>();
  for (let guard = 0; reactions.length < wanted && guard < 200; guard++) {
    const a = rng.int(elements, S - 1);
    if (used.has(a)) continue;
    used.add(a);
    const nu = [...formation[a]];
    if (rng.chance(0.3)) {
      const b = rng.int(elements, S - 1);
      if (b !== a) for (let i = 0; i < S; i++) nu[i] -= formation[b][i];
    }
    if (nu.every((v) => v >= 0) || nu.every((v) => v <= 0)) continue;
    reactions.push({ label: `R${reactions.length + 1}`, nu, lnK: -nu.reduce((sum, v, i) => sum + v * mu[i], 0) });
  }
  const kind = o.kind ?? (rng.chance(0.5) ? 'constant-volume' : 'constant-pressure');
  const species = composition.map((_, i) => ({ id: `X${i + 1}`, phase: rng.pick(o.phases), n0: rng.chance(0.65) ? 0.05 + 2 * rng.next() : 0 }));
  const conditions: EquilibriumProblem['conditions'] =
    kind === 'constant-volume' ? { kind, T: 300 + 700 * rng.next(), gasVolume: 1e-3 + 0.1 * rng.next() } : { kind, T: 300 + 700 * rng.next(), P: 1e4 + 1e6 * rng.next() };
  return { problem: { species, reactions, conditions, liquidVolume: 1e-3 + 1e-2 * rng.next() }, composition };
}

/**
 * Largest element-balance violation, relative to the total initial amount. A network that
 * starts with nothing at all (total 0, which randomNetwork can draw) is measured in mol
 * instead: dividing by the zero total would give 0/0 = NaN even for the exact answer.
 */
export function elementViolation(network: Network, n: readonly number[]): number {
  const { problem, composition } = network;
  let total = 0;
  for (const s of problem.species) total += s.n0;
  if (!(total > 0)) total = 1;
  let worst = 0;
  for (let e = 0; e < composition[0].length; e++) {
    let before = 0;
    let after = 0;
    for (let i = 0; i < composition.length; i++) {
      before += composition[i][e] * problem.species[i].n0;
      after += composition[i][e] * n[i];
    }
    worst = Math.max(worst, Math.abs(after - before) / total);
  }
  return worst;
}

/** Every returned number is finite, except lnQ/lnQ0 which may be ±Infinity; nothing is NaN. */
export function expectNoNaN(result: EquilibriumResult): void {
  const lists: Array<[string, readonly number[]]> = [
    ['n', result.n],
    ['extents', result.extents],
    ['activities', result.activities],
  ];
  for (const [name, list] of lists) list.forEach((v, i) => expect(Number.isFinite(v), `${name}[${i}] = ${v}`).toBe(true));
  for (const list of [result.lnQ, result.lnQ0]) for (const v of list) expect(Number.isNaN(v)).toBe(false);
  for (const v of [result.pressure, result.gasMoles, result.gasVolume]) expect(Number.isFinite(v)).toBe(true);
}

/** |ln Q − ln K| for every active reaction whose species are all present. */
export function worstMassActionGap(problem: EquilibriumProblem, result: EquilibriumResult): number {
  let worst = 0;
  problem.reactions.forEach((r, k) => {
    if (result.inactiveReactions.includes(k)) return;
    if (r.nu.some((v, i) => v !== 0 && !(result.n[i] > 0))) return;
    worst = Math.max(worst, Math.abs(result.lnQ[k] - r.lnK));
  });
  return worst;
}

export { Random };
