// Seeded property tests of the equilibrium solver on random element-based
// networks: conservation, mass action, non-negative finite amounts,
// uniqueness from conservation-equivalent starts, and Le Chatelier's
// principle (adding product, raising pressure, adding an inert gas).
import { describe, expect, it } from 'vitest';
import { solveEquilibrium, type EquilibriumProblem, type SolverPhase } from '../../../server/src/chem/equilibrium';
import { elementViolation, expectNoNaN, Random, randomNetwork, worstMassActionGap, type Network } from './helpers';

/** Hard requirements of the brief: conservation relative to the total, mass action in ln units. */
const CONSERVATION = 1e-12;
const MASS_ACTION = 1e-9;
/**
 * Two solves of conservation-equivalent starts agree to 1e-9 relative, plus 1e-13 of the
 * total absolute: the shifted start n0 + ν·ξ is itself rounded (~1e-16 of the total), so an
 * amount fixed by a conservation difference may move by that much (a thousand-fold margin).
 */
const SAME_RELATIVE = 1e-9;
const SAME_ABSOLUTE = 1e-13;

const MIXED: readonly SolverPhase[] = ['g', 'g', 'l', 'aq', 's'];

function networks(seed: number, count: number, phases: readonly SolverPhase[], potentialScale: number): Network[] {
  const rng = new Random(seed);
  const out: Network[] = [];
  while (out.length < count) out.push(randomNetwork(rng, { minSpecies: 6, maxSpecies: 12, minReactions: 3, maxReactions: 6, phases, potentialScale }));
  return out;
}

function total(p: EquilibriumProblem): number {
  return p.species.reduce((sum, s) => sum + s.n0, 0);
}

function expectSameAmounts(a: readonly number[], b: readonly number[], scale: number): void {
  a.forEach((x, i) => expect(Math.abs(x - b[i])).toBeLessThanOrEqual(SAME_RELATIVE * Math.max(x, b[i]) + SAME_ABSOLUTE * scale));
}

describe('random networks: conservation, mass action, sign', () => {
  it.each([
    ['gas, liquid, solute and solid species, moderate K', 101, MIXED, 8],
    ['gas, liquid, solute and solid species, ln K up to a few hundred', 202, MIXED, 60],
    ['gas only', 303, ['g'] as const, 20],
  ])('%s', (_, seed, phases, scale) => {
    for (const network of networks(seed, 100, phases, scale)) {
      const { problem } = network;
      const r = solveEquilibrium(problem);
      expect(r.status, r.message).toBe('converged');
      expectNoNaN(r);
      for (const n of r.n) expect(n).toBeGreaterThanOrEqual(0);
      expect(elementViolation(network, r.n)).toBeLessThanOrEqual(CONSERVATION);
      expect(worstMassActionGap(problem, r)).toBeLessThan(MASS_ACTION);
      // A solid or solvent reported absent has exactly zero amount (not a tiny remainder).
      for (const i of r.absentPhases) expect(r.n[i]).toBe(0);
    }
  });
});

describe('uniqueness: conservation-equivalent starts reach the same equilibrium', () => {
  it('n0 and n0 + ν·ξ for a random feasible ξ', () => {
    const rng = new Random(404);
    for (const network of networks(505, 120, MIXED, 10)) {
      const { problem } = network;
      const first = solveEquilibrium(problem);
      expect(first.status, first.message).toBe('converged');
      // A random direction of the extents, scaled to half of what keeps every amount >= 0.
      const direction = problem.reactions.map(() => 2 * rng.next() - 1);
      const change = problem.species.map((_, i) => problem.reactions.reduce((sum, re, k) => sum + re.nu[i] * direction[k], 0));
      let limit = Infinity;
      change.forEach((d, i) => {
        if (d < 0) limit = Math.min(limit, problem.species[i].n0 / -d);
      });
      const t = Number.isFinite(limit) ? 0.5 * limit : 0.5;
      const shifted: EquilibriumProblem = {
        ...problem,
        species: problem.species.map((s, i) => ({ ...s, n0: Math.max(0, s.n0 + t * change[i]) })),
      };
      const second = solveEquilibrium(shifted);
      expect(second.status, second.message).toBe('converged');
      expectSameAmounts(first.n, second.n, total(problem));
      // Starting from the equilibrium itself changes nothing either.
      const again = solveEquilibrium({ ...problem, species: problem.species.map((s, i) => ({ ...s, n0: first.n[i] })) });
      expect(again.status, again.message).toBe('converged');
      expectSameAmounts(first.n, again.n, total(problem));
    }
  });
});

/** A random single gas reaction A-side ⇌ B-side over 2–4 species with small whole coefficients. */
function singleGasReaction(rng: Random, kind: 'constant-pressure' | 'constant-volume'): EquilibriumProblem {
  const S = rng.int(2, 4);
  const nu = new Array<number>(S).fill(0);
  const split = rng.int(1, S - 1);
  for (let i = 0; i < S; i++) nu[i] = i < split ? -rng.int(1, 3) : rng.int(1, 3);
  return {
    species: nu.map((_, i) => ({ id: `G${i + 1}`, phase: 'g', n0: 0.1 + 2 * rng.next() })),
    reactions: [{ label: 'R', nu, lnK: 6 * (2 * rng.next() - 1) }],
    conditions: kind === 'constant-pressure' ? { kind, T: 600, P: 1e4 + 1e6 * rng.next() } : { kind, T: 600, gasVolume: 0.001 + 0.1 * rng.next() },
  };
}

/** Extents are compared with this slack: both solves are exact to about 1e-15 of the amounts (common practice, rounding margin). */
const EXTENT_SLACK = 1e-12;

describe("Le Chatelier's principle", () => {
  it('at constant volume, adding a product to the start never increases the forward extent of a single reaction', () => {
    // At constant volume each ln a_i depends on n_i alone, so ∂ ln Q/∂n_i = ν_i/n_i > 0 for a
    // product and the extent must fall (closed form). At constant pressure this fails when the
    // product's mole fraction exceeds ν_i/Δν (see the next test).
    const rng = new Random(606);
    for (let k = 0; k < 150; k++) {
      const problem = singleGasReaction(rng, 'constant-volume');
      const products = problem.reactions[0].nu.map((v, i) => (v > 0 ? i : -1)).filter((i) => i >= 0);
      const added = rng.pick(products);
      const more: EquilibriumProblem = { ...problem, species: problem.species.map((s, i) => (i === added ? { ...s, n0: s.n0 + 0.01 + rng.next() } : s)) };
      const before = solveEquilibrium(problem);
      const after = solveEquilibrium(more);
      expect(before.status).toBe('converged');
      expect(after.status).toBe('converged');
      expect(after.extents[0]).toBeLessThanOrEqual(before.extents[0] + EXTENT_SLACK * total(more));
    }
  });

  it('at constant pressure, adding a product that is over ν_i/Δν of the gas shifts the reaction forward (the known exception)', () => {
    // A ⇌ B + 2 C: ∂ ln Q/∂n_B = 1/n_B − 2/N < 0 once y_B > 1/2 (closed form), so extra B raises ξ.
    const problem = (nB: number): EquilibriumProblem => ({
      species: [
        { id: 'A', phase: 'g', n0: 1 },
        { id: 'B', phase: 'g', n0: nB },
        { id: 'C', phase: 'g', n0: 0 },
      ],
      reactions: [{ label: 'R', nu: [-1, 1, 2], lnK: Math.log(0.01) }], // illustrative K (closed-form argument holds for any K)
      conditions: { kind: 'constant-pressure', T: 600, P: 1e5 },
    });
    const before = solveEquilibrium(problem(10));
    const after = solveEquilibrium(problem(12));
    expect(before.status).toBe('converged');
    expect(before.n[1] / before.gasMoles).toBeGreaterThan(0.5); // y_B > ν_B/Δν = 1/2 (closed form condition)
    expect(after.extents[0]).toBeGreaterThan(before.extents[0]);
    // and with little B (y_B < 1/2) the usual direction holds
    expect(solveEquilibrium(problem(0.2)).extents[0]).toBeLessThan(solveEquilibrium(problem(0.1)).extents[0]);
  });

  it('raising the pressure never lowers the amounts on the side with fewer gas moles', () => {
    const rng = new Random(707);
    let checked = 0;
    for (let k = 0; k < 150; k++) {
      const problem = singleGasReaction(rng, 'constant-pressure');
      const nu = problem.reactions[0].nu;
      const change = nu.reduce((a, b) => a + b, 0);
      if (change === 0) continue;
      const P = problem.conditions.kind === 'constant-pressure' ? problem.conditions.P : 0;
      const low = solveEquilibrium(problem);
      const high = solveEquilibrium({ ...problem, conditions: { kind: 'constant-pressure', T: 600, P: P * (1.5 + 10 * rng.next()) } });
      expect(low.status).toBe('converged');
      expect(high.status).toBe('converged');
      // Fewer gas moles: the reactant side when the reaction makes gas (Δν > 0), else the product side.
      nu.forEach((v, i) => {
        if (v !== 0 && (v < 0) === change > 0) expect(high.n[i]).toBeGreaterThanOrEqual(low.n[i] * (1 - EXTENT_SLACK));
      });
      checked++;
    }
    expect(checked).toBeGreaterThan(100);
  });

  it('at constant volume an added inert gas changes nothing', () => {
    for (const network of networks(808, 60, ['g', 'g', 'l', 's'], 8)) {
      const problem: EquilibriumProblem = { ...network.problem, conditions: { kind: 'constant-volume', T: 700, gasVolume: 0.02 } };
      const inert: EquilibriumProblem = { ...problem, species: [...problem.species, { id: 'Ar', phase: 'g', n0: 5 }], reactions: problem.reactions.map((r) => ({ ...r, nu: [...r.nu, 0] })) };
      const a = solveEquilibrium(problem);
      const b = solveEquilibrium(inert);
      expect(a.status, a.message).toBe('converged');
      expect(b.status, b.message).toBe('converged');
      expectSameAmounts(a.n, b.n.slice(0, a.n.length), total(problem));
      expect(b.n[a.n.length]).toBe(5); // the inert gas keeps its amount exactly
    }
  });

  it('at constant pressure an added inert gas shifts a gas reaction toward more gas moles', () => {
    const rng = new Random(909);
    let checked = 0;
    for (let k = 0; k < 150; k++) {
      const problem = singleGasReaction(rng, 'constant-pressure');
      const change = problem.reactions[0].nu.reduce((a, b) => a + b, 0);
      if (change === 0) continue;
      const diluted: EquilibriumProblem = {
        ...problem,
        species: [...problem.species, { id: 'N2', phase: 'g', n0: 0.5 + 5 * rng.next() }],
        reactions: problem.reactions.map((r) => ({ ...r, nu: [...r.nu, 0] })),
      };
      const a = solveEquilibrium(problem);
      const b = solveEquilibrium(diluted);
      expect(a.status).toBe('converged');
      expect(b.status).toBe('converged');
      // More gas moles on the product side (Δν > 0): dilution raises the extent, and vice versa.
      if (change > 0) expect(b.extents[0]).toBeGreaterThan(a.extents[0]);
      else expect(b.extents[0]).toBeLessThan(a.extents[0]);
      checked++;
    }
    expect(checked).toBeGreaterThan(100);
  });
});
