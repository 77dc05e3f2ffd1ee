// The solver keeps its work arrays, and what it derives from a stoichiometry, from one solve
// to the next (for speed). These tests check that no result depends on what was solved
// before: the same problems solved in other orders, interleaved with problems of the same
// shape but other coefficients and with invalid ones, give identical results.
import { describe, expect, it } from 'vitest';
import { solveEquilibrium, type EquilibriumProblem, type EquilibriumResult } from '../../../server/src/chem/equilibrium';
import { Random, randomNetwork } from './helpers';

/** Steam reforming with the water-gas shift over CH4, H2O, CO, H2, CO2 (first reaction given). */
function steam(first: readonly number[], lnK: number, n0H2O: number): EquilibriumProblem {
  return {
    species: [
      { id: 'CH4', phase: 'g', n0: 1 },
      { id: 'H2O', phase: 'g', n0: n0H2O },
      { id: 'CO', phase: 'g', n0: 0 },
      { id: 'H2', phase: 'g', n0: 0 },
      { id: 'CO2', phase: 'g', n0: 0 },
    ],
    reactions: [
      { label: 'reforming', nu: [...first], lnK },
      { label: 'shift', nu: [0, -1, -1, 1, 1], lnK: Math.log(1.4) },
    ],
    conditions: { kind: 'constant-pressure', T: 1000, P: 1e6 },
  };
}

function dissociation(n0: number, lnK: number): EquilibriumProblem {
  return {
    species: [
      { id: 'N2O4', phase: 'g', n0 },
      { id: 'NO2', phase: 'g', n0: 0.1 * n0 },
    ],
    reactions: [{ label: 'dissociation', nu: [-1, 2], lnK }],
    conditions: { kind: 'constant-pressure', T: 298.15, P: 1e5 },
  };
}

/** Problems in pairs of one shape (same numbers of species, reactions, basis and variable species), with some invalid ones. */
function problems(): EquilibriumProblem[] {
  const list: EquilibriumProblem[] = [
    steam([-1, -1, 1, 3, 0], Math.log(26), 3),
    // Same shape, other stoichiometry: CH4 + 2 H2O ⇌ CO2 + 4 H2 (K of reforming × shift).
    steam([-1, -2, 0, 4, 1], Math.log(26 * 1.4), 3),
    steam([-1, -1, 1, 3, 0], Math.log(26), 1.5),
    // Invalid after the species and part of the reactions are read.
    steam([-1, -1, 1, 3, 0], Number.NaN, 3),
    dissociation(1, Math.log(0.15)),
    dissociation(2e-9, Math.log(40)),
    { ...dissociation(1, Math.log(0.15)), reactions: [{ label: 'dissociation', nu: [-1], lnK: 0 }] },
  ];
  const rng = new Random(8080);
  for (let k = 0; k < 40; k++) {
    list.push(
      randomNetwork(rng, {
        minSpecies: 7,
        maxSpecies: 8,
        minReactions: 3,
        maxReactions: 3,
        phases: k % 2 ? ['g', 'g', 'l', 's'] : ['g', 'aq', 'solvent', 's'],
        potentialScale: 12,
      }).problem,
    );
  }
  return list;
}

/** C, H, O in CH4, H2O, CO, H2, CO2. */
const STEAM_ELEMENTS = [
  [1, 4, 0],
  [0, 2, 1],
  [1, 0, 1],
  [0, 2, 0],
  [1, 0, 2],
];
/** Element balance relative to the total amount, and |ln Q − ln K| (the solver's guarantees). */
const CONSERVATION = 1e-12;
const MASS_ACTION = 1e-9;

describe('solves do not depend on earlier solves', () => {
  it('steam reforming with either reaction set, solved alternately: conservation, mass action, extents', () => {
    const list = problems().slice(0, 3);
    for (let round = 0; round < 3; round++) {
      for (const p of list) {
        const r = solveEquilibrium(p);
        expect(r.status, r.message).toBe('converged');
        const total = p.species.reduce((sum, s) => sum + s.n0, 0);
        for (let e = 0; e < 3; e++) {
          let before = 0;
          let after = 0;
          STEAM_ELEMENTS.forEach((c, i) => {
            before += c[e] * p.species[i].n0;
            after += c[e] * r.n[i];
          });
          expect(Math.abs(after - before) / total).toBeLessThanOrEqual(CONSERVATION);
        }
        p.reactions.forEach((re, k) => expect(Math.abs(r.lnQ[k] - re.lnK)).toBeLessThan(MASS_ACTION));
        // The extents (which depend on the stoichiometry, not only on its span) reproduce the amounts.
        p.species.forEach((s, i) => {
          const fromExtents = s.n0 + p.reactions.reduce((sum, re, k) => sum + re.nu[i] * r.extents[k], 0);
          expect(Math.abs(fromExtents - r.n[i]) / total).toBeLessThanOrEqual(CONSERVATION);
        });
      }
    }
  });

  it('same results in order, in reverse order, and each solved twice in a row', () => {
    const list = problems();
    const inOrder = list.map((p) => solveEquilibrium(p));
    expect(inOrder.filter((r) => r.status === 'converged').length).toBeGreaterThan(list.length / 2);
    const reversed: EquilibriumResult[] = [];
    for (let k = list.length - 1; k >= 0; k--) reversed[k] = solveEquilibrium(list[k]);
    const twice = list.map((p) => {
      solveEquilibrium(p);
      return solveEquilibrium(p);
    });
    list.forEach((_, k) => {
      expect(reversed[k]).toEqual(inOrder[k]);
      expect(twice[k]).toEqual(inOrder[k]);
    });
  });

  it('a result keeps its values when later problems are solved', () => {
    const list = problems();
    const first = solveEquilibrium(list[0]);
    const copy = structuredClone(first);
    for (const p of list) solveEquilibrium(p);
    expect(first).toEqual(copy);
  });
});
