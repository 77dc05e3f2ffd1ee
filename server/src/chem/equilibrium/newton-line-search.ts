// The line search of the extent Newton: the step length along a species
// direction from the directional derivative of G (expansion, then a
// safeguarded Newton/bisection root find), evaluated without the cancellation
// that G itself would suffer.
import type { Compact } from './compact';
import { AMOUNT_FLOOR, CLAMPABLE_AMOUNT, type Workspace } from './newton-kernels';

/** Line search accepts a step t when the directional derivative satisfies φ'(t) <= this × |φ'(0)| (a decrease for convex φ). */
export const LINE_SEARCH_SLOPE = 0.5;
/** Step growth per expansion of the line search, and the most expansions (4^30 ≈ 1e18). */
const EXPANSION_FACTOR = 4;
const MAX_EXPANSIONS = 30;
/** Iteration cap of the one-dimensional root find of φ' in the line search. */
const LINE_SEARCH_ITERATIONS = 60;

/**
 * Step length along species direction d: φ(t) = G(n + t·d) is convex with
 * φ'(t) = Σ d_j ln a_j(n + t·d) − Σ p·κ and φ'' = dᵀ·D·d. Accepts t where
 * |φ'(t)| <= LINE_SEARCH_SLOPE·|φ'(0)|, or the step to the first pure phase running out if
 * φ' is still negative there. Starts at the full Newton step; expands while φ' is still
 * steeply negative (a trace species whose Newton step underestimates its growth);
 * otherwise a safeguarded Newton/bisection on φ' (→ +∞ at the mixture boundary, where a
 * species would reach zero) finds t.
 */
export function lineSearch(c: Compact, ws: Workspace, n: Float64Array, d: Float64Array, pk: number, decrement: number, tPure: number, tMix: number): number {
  const target = LINE_SEARCH_SLOPE * decrement;
  let lo = 0;
  let hi = Math.min(tPure, tMix);
  let t = Math.min(1, tPure);
  if (t >= tMix) t = 0.5 * tMix;
  let value = slope(c, ws, n, d, pk, t);
  // Still steeply downhill: expand (a trace species that must grow by orders of magnitude).
  for (let e = 0; e < MAX_EXPANSIONS && value < -target && t < hi; e++) {
    lo = t;
    if (t === tPure) return t;
    let next = EXPANSION_FACTOR * t;
    if (next >= tPure) next = tPure;
    if (next >= tMix) next = t + 0.5 * (tMix - t);
    if (!(next > t)) break;
    t = next;
    value = slope(c, ws, n, d, pk, t);
  }
  if (value <= target && (value >= -target || t === tPure)) return t;
  if (!(value > 0) && !Number.isNaN(value)) lo = t;
  else hi = t;
  // Safeguarded Newton/bisection for |φ'(t)| <= target inside (lo, hi).
  t = 0.5 * (lo + hi);
  value = slope(c, ws, n, d, pk, t);
  for (let it = 0; it < LINE_SEARCH_ITERATIONS; it++) {
    if (Number.isNaN(value) || value > 0) hi = t;
    else lo = t;
    if (!Number.isNaN(value) && Math.abs(value) <= target) return t;
    let next = Number.NaN;
    if (!Number.isNaN(value)) next = t - value / ws.trialCurvature;
    if (!(next > lo && next < hi)) next = 0.5 * (lo + hi);
    if (hi - lo <= 1e-15 * hi) break;
    t = next;
    value = slope(c, ws, n, d, pk, t);
  }
  return lo;
}

/**
 * φ'(t) at n + t·d (NaN if a mixture amount would fall below AMOUNT_FLOOR of the total, unless
 * it is clamped there); leaves φ''(t) in ws.trialCurvature. The group totals and ln a are
 * formed as groupTotals and logActivities would (same terms, same order), but in the same
 * passes, and ln a only for the species the direction moves (the only ones φ' needs).
 */
function slope(c: Compact, ws: Workspace, n: Float64Array, d: Float64Array, pk: number, t: number): number {
  const m = c.m;
  const x = ws.trial;
  const floor = AMOUNT_FLOOR * c.total;
  const clampable = CLAMPABLE_AMOUNT * c.total;
  let total0 = c.groupInert[0];
  let total1 = c.groupInert[1];
  for (let j = 0; j < m; j++) {
    let v = n[j] + t * d[j];
    if (c.mixture[j] && d[j] < 0 && !(v >= floor)) {
      if (n[j] <= clampable) v = floor;
      else return Number.NaN;
    }
    x[j] = v;
    const g = c.group[j];
    if (g === 0) total0 += v;
    else if (g === 1) total1 += v;
  }
  const lg0 = c.hasGasGroup ? Math.log(total0) : 0;
  const lg1 = c.hasLiquidGroup ? Math.log(total1) : 0;
  let value = -pk;
  let curvature = 0;
  let dg0 = 0;
  let dg1 = 0;
  for (let j = 0; j < m; j++) {
    const dj = d[j];
    if (dj === 0) continue;
    if (!c.mixture[j]) {
      value += dj * c.offset[j];
      continue;
    }
    const g = c.group[j];
    value += dj * (Math.log(x[j]) + c.offset[j] - (g === 0 ? lg0 : g === 1 ? lg1 : 0));
    curvature += (dj * dj) / x[j];
    if (g === 0) dg0 += dj;
    else if (g === 1) dg1 += dj;
  }
  if (total0 > 0) curvature -= (dg0 * dg0) / total0;
  if (total1 > 0) curvature -= (dg1 * dg1) / total1;
  ws.trialCurvature = curvature;
  return value;
}
