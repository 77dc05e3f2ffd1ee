// An optimality certificate for solver results, written separately from the solver
// (it shares no code with server/src/chem/equilibrium). For an ideal system the Gibbs
// (Helmholtz) energy is convex in the reaction extents, so a composition is the
// equilibrium exactly when no feasible direction of the extents lowers it to first
// order (the Karush–Kuhn–Tucker conditions, common practice). This module searches
// for such a direction with a small linear programme:
//
//   minimise   g·d   over   −1 <= d_r <= 1,   (ν d)_i >= 0 for every absent species i,
//
// where g_r = −ln K_r + Σ_i ν_ri ln a_i is the reaction's ΔG/RT at the result. A
// clearly negative minimum is a direction that lowers G: the result is not the
// equilibrium. A species of a mixture phase that is present (or a solute) has
// ln a = −∞ while absent, so the first check is that no feasible direction can form
// one; directions then keep it at zero.
//
// A whole mixture phase that is absent (the gas phase at constant pressure, the
// liquid) would form with a mixing term; it is taken here at its pure-species
// potential, which overestimates the slope (ln y <= 0): the check can then miss a
// descent but never reports a false one.
import type { EquilibriumProblem, EquilibriumResult } from '../../../server/src/chem/equilibrium';

/** Entries below this are zero in the simplex tableau (stoichiometry is of order one). */
const PIVOT = 1e-11;

/** Minimum of c·d over −1 <= d <= 1 and rows·d >= 0 (dense simplex with Bland's rule; the origin is feasible). */
export function minimiseOverBox(rows: readonly (readonly number[])[], c: readonly number[]): { value: number; d: number[] } {
  const R = c.length;
  const m = rows.length;
  // Variables d⁺ (R), d⁻ (R), s (m), w⁺ (R), w⁻ (R); rows: −a·d⁺ + a·d⁻ + s = 0, d± + w± = 1.
  const vars = 4 * R + m;
  const width = vars + 1;
  const height = m + 2 * R;
  const tab: number[][] = [];
  const basic: number[] = [];
  for (let i = 0; i < m; i++) {
    const row = new Array<number>(width).fill(0);
    for (let r = 0; r < R; r++) {
      row[r] = -rows[i][r];
      row[R + r] = rows[i][r];
    }
    row[2 * R + i] = 1;
    tab.push(row);
    basic.push(2 * R + i);
  }
  for (let r = 0; r < 2 * R; r++) {
    const row = new Array<number>(width).fill(0);
    row[r] = 1;
    row[2 * R + m + r] = 1;
    row[vars] = 1;
    tab.push(row);
    basic.push(2 * R + m + r);
  }
  const cost = new Array<number>(width).fill(0);
  for (let r = 0; r < R; r++) {
    cost[r] = c[r];
    cost[R + r] = -c[r];
  }
  for (let pivots = 0; pivots < 100000; pivots++) {
    let enter = -1;
    for (let v = 0; v < vars; v++) {
      if (cost[v] < -PIVOT) {
        enter = v;
        break;
      }
    }
    if (enter < 0) break;
    let leave = -1;
    let best = Infinity;
    for (let i = 0; i < height; i++) {
      const a = tab[i][enter];
      if (a <= PIVOT) continue;
      const ratio = tab[i][vars] / a;
      if (ratio < best - PIVOT || (Math.abs(ratio - best) <= PIVOT && basic[i] < basic[leave])) {
        best = ratio;
        leave = i;
      }
    }
    if (leave < 0) throw new Error('unbounded programme: impossible inside a box');
    const p = tab[leave][enter];
    for (let v = 0; v < width; v++) tab[leave][v] /= p;
    for (let i = 0; i < height; i++) {
      if (i === leave || tab[i][enter] === 0) continue;
      const f = tab[i][enter];
      for (let v = 0; v < width; v++) tab[i][v] -= f * tab[leave][v];
    }
    const f = cost[enter];
    for (let v = 0; v < width; v++) cost[v] -= f * tab[leave][v];
    basic[leave] = enter;
  }
  const value = new Array<number>(vars).fill(0);
  basic.forEach((b, i) => (value[b] = tab[i][vars]));
  const d = c.map((_, r) => value[r] - value[R + r]);
  return { value: d.reduce((sum, x, r) => sum + x * c[r], 0), d };
}

export interface Certificate {
  /** A mixture species (or solute) left at zero that some feasible direction could form, or −1. */
  readonly formable: number;
  /** Most negative first-order change of G/RT along a feasible direction in the unit box (>= 0 at the equilibrium). */
  readonly slope: number;
  readonly direction: readonly number[];
}

/** Searches for a feasible direction that lowers G at the result (see the module comment). */
export function certificate(problem: EquilibriumProblem, result: EquilibriumResult): Certificate {
  const { species, reactions, conditions } = problem;
  const constantP = conditions.kind === 'constant-pressure';
  const gasCount = species.filter((s) => s.phase === 'g').length;
  const liquidCount = species.filter((s) => s.phase === 'l').length;
  const gasPresent = species.some((s, i) => s.phase === 'g' && result.n[i] > 0);
  const liquidPresent = species.some((s, i) => s.phase === 'l' && result.n[i] > 0);
  // ln a per species where it is finite; undefined where an absent species' ln a is −∞.
  const lnA: (number | undefined)[] = species.map((s, i) => {
    if (result.n[i] > 0) return Math.log(result.activities[i]);
    switch (s.phase) {
      case 's':
      case 'solvent':
        return 0;
      case 'l':
        return liquidCount === 1 || !liquidPresent ? 0 : undefined;
      case 'g':
        if (!constantP) return undefined;
        return gasCount === 1 || !gasPresent ? Math.log(conditions.P / 1e5) : undefined;
      default:
        return undefined;
    }
  });
  const inReaction = (i: number): boolean => reactions.some((r) => r.nu[i] !== 0);
  const absent = species.map((_, i) => i).filter((i) => !(result.n[i] > 0) && inReaction(i));
  const columnOf = (i: number): number[] => reactions.map((r) => r.nu[i]);
  const rows = absent.map(columnOf);
  for (const i of absent) {
    if (lnA[i] !== undefined) continue;
    const most = minimiseOverBox(rows, columnOf(i).map((x) => -x));
    if (-most.value > 1e-9) return { formable: i, slope: -Infinity, direction: most.d };
  }
  // Species with ln a = −∞ stay at zero: (ν d)_i <= 0 as well.
  const allRows = [...rows, ...absent.filter((i) => lnA[i] === undefined).map((i) => columnOf(i).map((x) => -x))];
  const g = reactions.map((r) => r.nu.reduce((sum, v, i) => (v === 0 || lnA[i] === undefined ? sum : sum + v * (lnA[i] as number)), -r.lnK));
  const best = minimiseOverBox(allRows, g);
  return { formable: -1, slope: best.value, direction: best.d };
}
