// Invalid input to the equilibrium solver comes back as status 'invalid' with
// a message naming the species or reaction, never as an exception; plus the
// bookkeeping around the solve: inactive reactions, species that cannot form,
// dependent reactions, the Q0 conventions and the activities helper.
import { describe, expect, it } from 'vitest';
import { activities, solveEquilibrium, type EquilibriumProblem } from '../../../server/src/chem/equilibrium';
import { expectNoNaN } from './helpers';

const base: EquilibriumProblem = {
  species: [
    { id: 'A', phase: 'g', n0: 1 },
    { id: 'B', phase: 'g', n0: 0 },
  ],
  reactions: [{ label: 'R1', nu: [-1, 2], lnK: 0 }],
  conditions: { kind: 'constant-pressure', T: 300, P: 1e5 },
};

function invalid(problem: unknown, pattern: RegExp): void {
  let result: ReturnType<typeof solveEquilibrium> | undefined;
  expect(() => {
    result = solveEquilibrium(problem as EquilibriumProblem);
  }).not.toThrow();
  expect(result?.status).toBe('invalid');
  expect(result?.message).toMatch(pattern);
  if (result) expectNoNaN(result);
}

describe('invalid input', () => {
  it.each([
    ['negative amount', { ...base, species: [{ id: 'A', phase: 'g', n0: -1 }, base.species[1]] }, /species "A".*negative/],
    ['NaN amount', { ...base, species: [{ id: 'A', phase: 'g', n0: Number.NaN }, base.species[1]] }, /species "A".*not a number/],
    ['infinite amount', { ...base, species: [base.species[0], { id: 'B', phase: 'g', n0: Infinity }] }, /species "B".*infinite/],
    ['unknown phase', { ...base, species: [{ id: 'A', phase: 'plasma', n0: 1 }, base.species[1]] }, /species "A".*phase/],
    ['non-finite ln K', { ...base, reactions: [{ label: 'R1', nu: [-1, 2], lnK: Infinity }] }, /reaction "R1".*ln K/],
    ['NaN ln K', { ...base, reactions: [{ label: 'R1', nu: [-1, 2], lnK: Number.NaN }] }, /reaction "R1".*ln K/],
    ['ν length mismatch', { ...base, reactions: [{ label: 'R1', nu: [-1, 2, 0], lnK: 0 }] }, /reaction "R1".*3 stoichiometric coefficients for 2 species/],
    ['all-zero ν', { ...base, reactions: [{ label: 'R1', nu: [0, 0], lnK: 0 }] }, /reaction "R1".*all stoichiometric coefficients zero/],
    ['only products', { ...base, reactions: [{ label: 'R1', nu: [1, 2], lnK: 0 }] }, /reaction "R1".*no reactants/],
    ['non-finite ν', { ...base, reactions: [{ label: 'R1', nu: [-1, Number.NaN], lnK: 0 }] }, /reaction "R1".*species "B"/],
    ['T = 0', { ...base, conditions: { kind: 'constant-pressure', T: 0, P: 1e5 } }, /temperature/],
    ['negative T', { ...base, conditions: { kind: 'constant-volume', T: -5, gasVolume: 1 } }, /temperature/],
    ['P = 0', { ...base, conditions: { kind: 'constant-pressure', T: 300, P: 0 } }, /pressure/],
    ['negative V', { ...base, conditions: { kind: 'constant-volume', T: 300, gasVolume: -1 } }, /gas volume/],
    ['infinite V', { ...base, conditions: { kind: 'constant-volume', T: 300, gasVolume: Infinity } }, /gas volume/],
    ['aq without liquid volume', { ...base, species: [{ id: 'A', phase: 'aq', n0: 1 }, base.species[1]] }, /species "A".*aqueous.*liquid volume/],
    ['non-positive liquid volume', { ...base, liquidVolume: 0 }, /liquid volume/],
    ['unknown conditions', { ...base, conditions: { kind: 'adiabatic', T: 300 } }, /conditions/],
    ['no species list', { ...base, species: undefined }, /species list/],
  ])('%s', (_, problem, pattern) => invalid(problem, pattern));

  it('linearly dependent reactions with inconsistent ln K name both sides', () => {
    const problem: EquilibriumProblem = {
      species: [
        { id: 'A', phase: 'g', n0: 1 },
        { id: 'B', phase: 'g', n0: 0 },
        { id: 'C', phase: 'g', n0: 0 },
      ],
      reactions: [
        { label: 'first', nu: [-1, 1, 0], lnK: 1 },
        { label: 'second', nu: [0, -1, 1], lnK: 2 },
        { label: 'overall', nu: [-1, 0, 1], lnK: 3.5 }, // should be 1 + 2 = 3 (Hess's law, closed form)
      ],
      conditions: { kind: 'constant-volume', T: 300, gasVolume: 1 },
    };
    invalid(problem, /reaction "overall" is a combination of "first", "second".*inconsistent/);
  });

  it('a dependent reaction listed before a later independent one is still checked', () => {
    const problem: EquilibriumProblem = {
      species: [
        { id: 'A', phase: 'g', n0: 1 },
        { id: 'B', phase: 'g', n0: 0 },
        { id: 'C', phase: 'g', n0: 1 },
        { id: 'D', phase: 'g', n0: 0 },
      ],
      reactions: [
        { label: 'forward', nu: [-1, 1, 0, 0], lnK: 2 },
        { label: 'reverse', nu: [1, -1, 0, 0], lnK: 2 }, // should be −2 (closed form: reverse of forward)
        { label: 'other', nu: [0, 0, -1, 1], lnK: 0 },
      ],
      conditions: { kind: 'constant-volume', T: 300, gasVolume: 1 },
    };
    invalid(problem, /reaction "reverse" is a combination of "forward"/);
  });
});

describe('bookkeeping', () => {
  it('consistent dependent reactions: the later one is dropped with extent 0 and still satisfies Q = K', () => {
    const problem: EquilibriumProblem = {
      species: [
        { id: 'A', phase: 'g', n0: 1 },
        { id: 'B', phase: 'g', n0: 0 },
        { id: 'C', phase: 'g', n0: 0 },
      ],
      reactions: [
        { label: 'first', nu: [-1, 1, 0], lnK: 1 },
        { label: 'second', nu: [0, -1, 1], lnK: 2 },
        { label: 'overall', nu: [-1, 0, 1], lnK: 3 }, // 1 + 2 (Hess's law, closed form)
      ],
      conditions: { kind: 'constant-volume', T: 300, gasVolume: 1 },
    };
    const r = solveEquilibrium(problem);
    expect(r.status).toBe('converged');
    expect(r.extents[2]).toBe(0);
    // B = e·A, C = e³·A, A + B + C = 1 (closed form)
    const A = 1 / (1 + Math.E + Math.exp(3));
    expect(Math.abs(r.n[0] - A)).toBeLessThan(1e-14);
    expect(Math.abs(r.lnQ[2] - 3)).toBeLessThan(1e-12); // the dropped reaction is at equilibrium too (closed form)
  });

  it('a reaction that can run neither way is inactive; species that cannot form stay exactly 0', () => {
    const problem: EquilibriumProblem = {
      species: [
        { id: 'A', phase: 'g', n0: 1 },
        { id: 'B', phase: 'g', n0: 0 },
        { id: 'X', phase: 'g', n0: 0 },
        { id: 'Y', phase: 'g', n0: 0 },
        { id: 'Z', phase: 'g', n0: 0 },
      ],
      reactions: [
        { label: 'runs', nu: [-1, 1, 0, 0, 0], lnK: 0 },
        { label: 'stuck', nu: [0, 0, -1, -1, 1], lnK: 10 }, // needs X and Y, or Z, none of which exist
      ],
      conditions: { kind: 'constant-pressure', T: 300, P: 1e5 },
    };
    const r = solveEquilibrium(problem);
    expect(r.status).toBe('converged');
    expect(r.inactiveReactions).toEqual([1]);
    expect(r.extents[1]).toBe(0);
    expect(r.n.slice(2)).toEqual([0, 0, 0]);
    expect(Math.abs(r.n[0] - 0.5)).toBeLessThan(1e-15); // K = 1 for A ⇌ B (closed form)
    expect(r.lnQ0[1]).toBe(-Infinity); // 0/0: documented convention
  });

  it('ln Q0 is +Infinity with only a reactant absent, and a solve with no reactions is method none', () => {
    const backward: EquilibriumProblem = {
      ...base,
      species: [
        { id: 'A', phase: 'g', n0: 0 },
        { id: 'B', phase: 'g', n0: 1 },
      ],
    };
    const r = solveEquilibrium(backward);
    expect(r.lnQ0[0]).toBe(Infinity);
    expect(r.status).toBe('converged');
    const none = solveEquilibrium({ ...base, reactions: [] });
    expect(none.status).toBe('converged');
    expect(none.method).toBe('none');
    expect(none.n).toEqual([1, 0]);
  });

  it('activities(): definitions per phase, and an inert gas counts in the mole fractions', () => {
    const problem: EquilibriumProblem = {
      species: [
        { id: 'G', phase: 'g', n0: 1 },
        { id: 'N2', phase: 'g', n0: 3 },
        { id: 'L1', phase: 'l', n0: 1 },
        { id: 'L2', phase: 'l', n0: 1 },
        { id: 'S', phase: 'aq', n0: 0.5 },
        { id: 'W', phase: 'solvent', n0: 10 },
        { id: 'M', phase: 's', n0: 0 },
      ],
      reactions: [],
      conditions: { kind: 'constant-pressure', T: 300, P: 2e5 },
      liquidVolume: 1e-3,
    };
    const a = activities(problem, [1, 3, 1, 1, 0.5, 10, 0]);
    expect(a[0]).toBeCloseTo(0.5, 15); // y = 1/4 at 2 bar: 0.25·2 (definition of the gas standard state)
    expect(a[2]).toBeCloseTo(0.5, 15); // mole fraction 1/2 (definition)
    expect(a[4]).toBeCloseTo(0.5, 15); // 0.5 mol in 1 L at c° = 1 mol/L (definition)
    expect(a[5]).toBe(1); // solvent present (definition)
    expect(a[6]).toBe(0); // solid absent (documented convention)
  });
});
