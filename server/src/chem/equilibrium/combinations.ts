// Species that no single reaction can start from what is present but a
// combination of reactions can: a small linear programme (dense simplex with
// Bland's rule) over the extents, used by problem.ts to complete formability.

/** Entries (stoichiometric, so of order one) below this are zero in the simplex tableau. */
const PIVOT_TOLERANCE = 1e-9;
/** A species counts as formed by the combination when its change is above this (the programme caps each at 1). */
const FORMED_THRESHOLD = 1e-6;
/** Simplex pivots before giving up (Bland's rule cannot cycle; this only guards against a defect). */
const MAX_PIVOTS = 10000;

/** A combination of reactions that forms species none of them can start alone. */
export interface Combination {
  /** Extent of each reaction (length R; 0 outside the combination). */
  readonly extents: Float64Array;
  /** Species of `zero` that the combination forms (its change is positive). */
  readonly formed: readonly number[];
}

/**
 * Among the species `zero` (none present, none formable by the single-reaction fixed point),
 * the most that one combination ξ of the reactions can form while taking none of `zero`
 * below zero: with every other species present, (νᵀξ)_i >= 0 for i in `zero` is all that
 * a small step along ξ needs, so those species can then exist (G falls without bound in
 * −ln n as a mixture species appears, so they must form at equilibrium whenever they can).
 * Solved as max Σ t_i subject to (νᵀξ)_i >= t_i, 0 <= t_i <= 1, ξ free, whose optimum has
 * t_i = 1 exactly on the largest set of species that can be formed together (a sum of
 * combinations forms the union). Returns undefined when no species of `zero` can form.
 */
export function formingCombination(nu: Float64Array, S: number, R: number, zero: readonly number[]): Combination | undefined {
  const q = zero.length;
  if (q === 0) return undefined;
  const columns: number[] = [];
  for (let r = 0; r < R; r++) if (zero.some((i) => nu[r * S + i] !== 0)) columns.push(r);
  const c = columns.length;
  if (c === 0) return undefined;
  // Variables: ξ⁺ (c), ξ⁻ (c), t (q), s (q), u (q). Rows i < q: −Aξ⁺ + Aξ⁻ + t_i + s_i = 0;
  // rows q + i: t_i + u_i = 1. Starting basis s, u (feasible: ξ = 0, t = 0).
  const vars = 2 * c + 3 * q;
  const width = vars + 1;
  const rows = 2 * q;
  const tab = new Float64Array((rows + 1) * width);
  const basic = new Int32Array(rows);
  for (let i = 0; i < q; i++) {
    for (let k = 0; k < c; k++) {
      const a = nu[columns[k] * S + zero[i]];
      tab[i * width + k] = -a;
      tab[i * width + c + k] = a;
    }
    tab[i * width + 2 * c + i] = 1;
    tab[i * width + 2 * c + q + i] = 1;
    basic[i] = 2 * c + q + i;
    const u = (q + i) * width;
    tab[u + 2 * c + i] = 1;
    tab[u + 2 * c + 2 * q + i] = 1;
    tab[u + vars] = 1;
    basic[q + i] = 2 * c + 2 * q + i;
  }
  // Objective row holds reduced costs of the minimisation of −Σ t: −1 on each t, minus the basic rows' (zero) costs.
  const obj = rows * width;
  for (let i = 0; i < q; i++) tab[obj + 2 * c + i] = -1;
  for (let pivots = 0; ; pivots++) {
    if (pivots > MAX_PIVOTS) return undefined;
    // Bland's rule: the lowest-index column with a negative reduced cost enters.
    let enter = -1;
    for (let v = 0; v < vars; v++) {
      if (tab[obj + v] < -PIVOT_TOLERANCE) {
        enter = v;
        break;
      }
    }
    if (enter < 0) break;
    // Ratio test; ties broken by the lowest basic index (Bland).
    let leave = -1;
    let best = Infinity;
    for (let i = 0; i < rows; i++) {
      const a = tab[i * width + enter];
      if (a <= PIVOT_TOLERANCE) continue;
      const ratio = tab[i * width + vars] / a;
      if (ratio < best - PIVOT_TOLERANCE || (Math.abs(ratio - best) <= PIVOT_TOLERANCE && basic[i] < basic[leave])) {
        best = ratio;
        leave = i;
      }
    }
    if (leave < 0) return undefined; // unbounded: impossible (Σ t <= q); a defect, so claim nothing
    const inv = 1 / tab[leave * width + enter];
    for (let v = 0; v < width; v++) tab[leave * width + v] *= inv;
    tab[leave * width + enter] = 1;
    for (let i = 0; i <= rows; i++) {
      if (i === leave) continue;
      const f = tab[i * width + enter];
      if (f === 0) continue;
      for (let v = 0; v < width; v++) tab[i * width + v] -= f * tab[leave * width + v];
      tab[i * width + enter] = 0;
    }
    basic[leave] = enter;
  }
  const value = new Float64Array(vars);
  for (let i = 0; i < rows; i++) value[basic[i]] = tab[i * width + vars];
  const extents = new Float64Array(R);
  for (let k = 0; k < c; k++) extents[columns[k]] = value[k] - value[c + k];
  const formed: number[] = [];
  for (const i of zero) {
    let change = 0;
    for (let r = 0; r < R; r++) change += nu[r * S + i] * extents[r];
    if (change > FORMED_THRESHOLD) formed.push(i);
  }
  return formed.length > 0 ? { extents, formed } : undefined;
}
