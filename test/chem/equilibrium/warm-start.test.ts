// Warm starts (SolveOptions.start): a solve that begins at a neighbouring equilibrium (same
// charge, other K) must give the cold solve's answer, with extents measured from n0; a start
// that does not conserve what n0 conserves is ignored. Uniqueness of the equilibrium (G is
// convex for ideal phases, common practice) is what makes the start a mere hint.
import { describe, expect, it } from 'vitest';
import { solveEquilibrium, type EquilibriumProblem } from '../../../server/src/chem/equilibrium';
import { steamReformingProblem } from '../../../server/src/bench/solver';
import { elementViolation, Random, randomNetwork } from './helpers';

/** Same answer to the solver's own precision: 1e-9 relative plus 1e-13 of the total (as in properties.test.ts). */
const SAME_RELATIVE = 1e-9;
const SAME_ABSOLUTE = 1e-13;

/** The benchmark's steam reforming with the water-gas shift, at T, with ln K of each from an invented linear fit in 1/T. */
function steam(T: number): EquilibriumProblem {
  const base = steamReformingProblem();
  const lnK = [27 - 25000 / T, -4 + 4900 / T];
  return { ...base, reactions: base.reactions.map((r, k) => ({ ...r, lnK: lnK[k] })), conditions: { kind: 'constant-pressure', T, P: 1e6 } };
}

describe('warm starts', () => {
  it('random networks: from the equilibrium at 2 % other ln K, the same answer as cold; n = n0 + ν·ξ', () => {
    const rng = new Random(7071);
    let warmUsed = 0;
    for (let k = 0; k < 300; k++) {
      const network = randomNetwork(rng, { minSpecies: 6, maxSpecies: 12, minReactions: 3, maxReactions: 6, phases: ['g', 'g', 'l', 'aq', 's'], potentialScale: 10 });
      const before = solveEquilibrium(network.problem);
      if (before.status !== 'converged') continue;
      // Scaling every ln K keeps dependent reactions consistent (their ln K are linear combinations).
      const next: EquilibriumProblem = { ...network.problem, reactions: network.problem.reactions.map((r) => ({ ...r, lnK: r.lnK * 1.02 })) };
      const cold = solveEquilibrium(next);
      const warm = solveEquilibrium(next, { start: before.n });
      expect(warm.status).toBe(cold.status);
      if (cold.status !== 'converged') continue;
      if (warm.iterations !== cold.iterations) warmUsed++;
      const total = next.species.reduce((s, x) => s + x.n0, 0);
      cold.n.forEach((x, i) => expect(Math.abs(x - warm.n[i])).toBeLessThanOrEqual(SAME_RELATIVE * Math.max(x, warm.n[i]) + SAME_ABSOLUTE * total));
      expect(elementViolation({ ...network, problem: next }, warm.n)).toBeLessThanOrEqual(1e-12); // conservation (property)
      // The extents are from n0, not from the start.
      next.species.forEach((s, i) => {
        const reached = s.n0 + next.reactions.reduce((sum, r, q) => sum + r.nu[i] * warm.extents[q], 0);
        expect(Math.abs(reached - warm.n[i])).toBeLessThanOrEqual(1e-11 * total);
      });
      expect(warm.lnQ0).toEqual(cold.lnQ0);
    }
    expect(warmUsed).toBeGreaterThan(50); // the family does exercise the warm path
  });

  it('a temperature sweep of steam reforming with the shift: fewer iterations, the same amounts', () => {
    let cold = 0;
    let warm = 0;
    let previous: readonly number[] | undefined;
    for (let T = 700; T <= 1100; T += 5) {
      const c = solveEquilibrium(steam(T));
      const w = solveEquilibrium(steam(T), { start: previous });
      expect(w.status, w.message).toBe('converged');
      c.n.forEach((x, i) => expect(Math.abs(x - w.n[i])).toBeLessThanOrEqual(SAME_RELATIVE * x + SAME_ABSOLUTE * 4));
      cold += c.iterations;
      warm += w.iterations;
      previous = w.n;
    }
    expect(warm).toBeLessThan(cold);
  });

  it('a start that does not conserve, has the wrong length, or is not a number is ignored', () => {
    const p = steam(900);
    const cold = solveEquilibrium(p);
    for (const start of [[1, 1, 1, 1, 1], [1, 3], [NaN, 3, 0.1, 0.1, 0.1], [-1, 5, 1, 1, 1]]) {
      expect(solveEquilibrium(p, { start })).toEqual(cold);
    }
  });
});
