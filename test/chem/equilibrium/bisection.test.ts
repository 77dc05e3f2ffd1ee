// Cross-check of the equilibrium solver against an independent solver written
// here: plain bisection on the extent for one reaction, and nested bisection
// (outer on ξ1, inner on ξ2 given ξ1) for two, on random systems of mixture
// species ('g', 'l', 'aq') built from element-like compositions.
import { describe, expect, it } from 'vitest';
import { GAS_CONSTANT, STANDARD_CONCENTRATION, STANDARD_PRESSURE, solveEquilibrium, type EquilibriumProblem } from '../../../server/src/chem/equilibrium';
import { Random, randomNetwork } from './helpers';

/** Bisection steps: each halves the interval, so 200 reach adjacent doubles from any finite start. */
const BISECTION_STEPS = 200;

/** ln a of every species for amounts n, straight from the standard-state definitions (independent of the solver). */
function logActivities(p: EquilibriumProblem, n: readonly number[]): number[] {
  let gas = 0;
  let liquid = 0;
  p.species.forEach((s, i) => {
    if (s.phase === 'g') gas += n[i];
    if (s.phase === 'l') liquid += n[i];
  });
  const c = p.conditions;
  return p.species.map((s, i) => {
    if (s.phase === 'g')
      return c.kind === 'constant-pressure' ? Math.log(n[i] / gas) + Math.log(c.P / STANDARD_PRESSURE) : Math.log((n[i] * GAS_CONSTANT * c.T) / (c.gasVolume * STANDARD_PRESSURE));
    if (s.phase === 'l') return Math.log(n[i] / liquid);
    return Math.log(n[i] / ((p.liquidVolume ?? Number.NaN) * STANDARD_CONCENTRATION));
  });
}

function amountsAt(p: EquilibriumProblem, xi: readonly number[]): number[] {
  return p.species.map((s, i) => s.n0 + p.reactions.reduce((sum, r, k) => sum + r.nu[i] * xi[k], 0));
}

/** ln Q_r − ln K_r at extents ξ (−∞/+∞ when a product/reactant is at zero; both cannot happen strictly inside). */
function gap(p: EquilibriumProblem, xi: readonly number[], r: number): number {
  const la = logActivities(p, amountsAt(p, xi));
  let sum = -p.reactions[r].lnK;
  p.reactions[r].nu.forEach((v, i) => {
    if (v !== 0) sum += v * la[i];
  });
  return sum;
}

/** Root of an increasing function on (lo, hi) by bisection. */
function bisect(f: (x: number) => number, lo: number, hi: number): number {
  for (let k = 0; k < BISECTION_STEPS; k++) {
    const mid = 0.5 * (lo + hi);
    if (mid <= lo || mid >= hi) break;
    if (f(mid) > 0) hi = mid;
    else lo = mid;
  }
  return 0.5 * (lo + hi);
}

/** Range of ξ_r with n0 + Σ_k ν_k ξ_k >= 0 when the other extents are fixed. */
function range(p: EquilibriumProblem, xi: readonly number[], r: number): [number, number] {
  let lo = -Infinity;
  let hi = Infinity;
  const others = amountsAt(
    p,
    xi.map((x, k) => (k === r ? 0 : x)),
  );
  p.species.forEach((_, i) => {
    const v = p.reactions[r].nu[i];
    if (v > 0) lo = Math.max(lo, -others[i] / v);
    if (v < 0) hi = Math.min(hi, others[i] / -v);
  });
  return [lo, hi];
}

/** Range of ξ1 over the feasible polygon of two reactions: extremes over its vertices (pairs of active bounds). */
function outerRange(p: EquilibriumProblem): [number, number] {
  const S = p.species.length;
  const [a, b] = p.reactions.map((r) => r.nu);
  let lo = Infinity;
  let hi = -Infinity;
  for (let i = 0; i < S; i++) {
    for (let j = i + 1; j < S; j++) {
      const det = a[i] * b[j] - a[j] * b[i];
      if (det === 0) continue;
      // n0_i + a_i x + b_i y = 0 and n0_j + a_j x + b_j y = 0 (Cramer's rule)
      const x = (-p.species[i].n0 * b[j] + p.species[j].n0 * b[i]) / det;
      const y = (-a[i] * p.species[j].n0 + a[j] * p.species[i].n0) / det;
      const n = amountsAt(p, [x, y]);
      if (n.every((v, k) => v >= -1e-12 * (1 + p.species[k].n0))) {
        lo = Math.min(lo, x);
        hi = Math.max(hi, x);
      }
    }
  }
  return [lo, hi];
}

/** Independent equilibrium: bisection (one reaction) or nested bisection (two). */
function referenceExtents(p: EquilibriumProblem): number[] {
  if (p.reactions.length === 1) {
    const [lo, hi] = range(p, [0], 0);
    return [bisect((x) => gap(p, [x], 0), lo, hi)];
  }
  const inner = (x1: number): number => {
    const [lo, hi] = range(p, [x1, 0], 1);
    return bisect((x2) => gap(p, [x1, x2], 1), lo, hi);
  };
  const [lo, hi] = outerRange(p);
  // d/dξ1 of min over ξ2 of G is ln Q1 − ln K1 at the inner optimum: increasing in ξ1 (convexity)
  const x1 = bisect((x) => gap(p, [x, inner(x)], 0), lo, hi);
  return [x1, inner(x1)];
}

function independentPair(p: EquilibriumProblem): boolean {
  if (p.reactions.length < 2) return true;
  const [a, b] = p.reactions.map((r) => r.nu);
  // not proportional: some 2×2 minor is non-zero
  return a.some((_, i) => a.some((__, j) => a[i] * b[j] - a[j] * b[i] !== 0));
}

describe('cross-check against nested bisection', () => {
  it.each([1, 2])('random %s-reaction systems of gas, liquid and solute species', (reactions) => {
    const rng = new Random(4242 + reactions);
    let checked = 0;
    for (let attempt = 0; checked < 40 && attempt < 400; attempt++) {
      const { problem } = randomNetwork(rng, {
        minSpecies: 4,
        maxSpecies: 6,
        minReactions: reactions,
        maxReactions: reactions,
        phases: ['g', 'l', 'aq'],
        potentialScale: 3,
      });
      if (problem.reactions.length !== reactions || !independentPair(problem)) continue;
      // Only species that take part keep amounts; every participant must be present or formable
      // from the start for the bisection's interval to be the whole feasible range.
      const result = solveEquilibrium(problem);
      if (result.inactiveReactions.length > 0) continue;
      const xi = referenceExtents(problem);
      const reference = amountsAt(problem, xi);
      // Bisection assumes every species stays present (ln Q − ln K changes sign inside the
      // interval). Where the equilibrium is on a boundary instead (a pure gas or liquid used
      // up, a whole phase gone) the reference does not apply: it must itself satisfy mass action.
      if (!problem.reactions.every((_, r) => Math.abs(gap(problem, xi, r)) < 1e-6)) continue;
      expect(result.status).toBe('converged');
      const total = problem.species.reduce((sum, s) => sum + s.n0, 0);
      result.n.forEach((n, i) => {
        // Bisection finds extents to the rounding of ξ (~1e-16 of the total), so a species that is
        // a small difference n0 − ν·ξ is known only to that absolute level: the tolerance is 1e-9
        // relative plus 1e-13 of the total absolute (a thousand times the bisection's resolution).
        expect(Math.abs(n - reference[i])).toBeLessThanOrEqual(1e-9 * reference[i] + 1e-13 * total);
      });
      checked++;
    }
    expect(checked).toBe(40);
  });
});
