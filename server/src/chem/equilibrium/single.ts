// The exact path for one independent reaction: a bracketed root find on the
// extent, written in the distance δ from the nearer bound set by n >= 0 so
// the limiting species' amount |ν|·δ keeps full relative precision.
import { accurateDifferenceOfProducts } from './linalg';
import { PURE, type Prepared } from './problem';

/** Root-find stopping rule: a Newton or bisection step in u = ln δ below this times max(1, |u|). */
const U_TOLERANCE = 4 * Number.EPSILON;
/** ln of the smallest positive normal double: δ below e^U_MIN would lose precision (subnormal). */
const U_MIN = Math.log(2.2250738585072014e-308);
/** Net coefficient of ln δ at a bound below which the ln δ terms cancel (a whole phase vanishing in step). */
const LN_DELTA_CANCELLATION = 1e-12;
/** Iteration cap of the safeguarded Newton/bisection (bisection alone needs about 60 steps). */
const MAX_ITERATIONS = 200;

export interface SingleOutcome {
  readonly ok: boolean;
  readonly message?: string;
  /** Extent of the reaction from n0, mol. */
  readonly extent: number;
  readonly iterations: number;
}

/** The reaction's species and the scratch space of one solve. */
interface Work {
  count: number;
  idx: Int32Array;
  nu: Float64Array;
  mixture: Uint8Array;
  group: Int8Array;
  offset: Float64Array;
  /** Amounts at the chosen bound (the limiting species exactly 0). */
  base: Float64Array;
  groupBase: Float64Array;
  groupNu: Float64Array;
  /** Σ over non-participating group members of n0. */
  groupOther: Float64Array;
  constant: number;
}

let scratch: Work | undefined;

function work(count: number): Work {
  if (scratch && scratch.idx.length >= count) {
    scratch.count = count;
    return scratch;
  }
  const size = Math.max(count, 8);
  scratch = {
    count,
    idx: new Int32Array(size),
    nu: new Float64Array(size),
    mixture: new Uint8Array(size),
    group: new Int8Array(size),
    offset: new Float64Array(size),
    base: new Float64Array(size),
    groupBase: new Float64Array(2),
    groupNu: new Float64Array(2),
    groupOther: new Float64Array(2),
    constant: 0,
  };
  return scratch;
}

/**
 * Solves the single independent active reaction `r` (ln Q(ξ) − ln K is increasing in ξ,
 * because the ideal-mixture Gibbs energy is convex). ξ lies in [ξlo, ξhi], the bounds set by
 * n >= 0. At a bound where a solid or solvent (or a whole mole-fraction phase) runs out the
 * quotient stays finite, and when it still has the sign that pushes past the bound the
 * equilibrium is that bound (Q ≠ K). Otherwise the root is bracketed: ln Q − ln K at the
 * midpoint says which bound is nearer, and with δ the distance from that bound,
 * u = ln δ is found by safeguarded Newton/bisection (Newton in u is nearly exact for a
 * trace limiting species, whose ln a is linear in u). Writes all amounts into `n`.
 */
export function solveSingleReaction(p: Prepared, r: number, n: Float64Array): SingleOutcome {
  const S = p.speciesCount;
  const n0 = p.n0;
  let count = 0;
  for (let i = 0; i < S; i++) if (p.nu[r * S + i] !== 0) count++;
  const w = work(count);
  w.groupOther[0] = 0;
  w.groupOther[1] = 0;
  w.groupNu[0] = 0;
  w.groupNu[1] = 0;
  let constant = -p.lnK[r];
  let k = 0;
  let hiL = -1;
  let hiRatio = Infinity;
  let loL = -1;
  let loRatio = Infinity;
  for (let i = 0; i < S; i++) {
    n[i] = n0[i];
    const v = p.nu[r * S + i];
    const g = p.group[i];
    if (v === 0) {
      if (g >= 0) w.groupOther[g] += n0[i];
      continue;
    }
    w.idx[k] = i;
    w.nu[k] = v;
    w.group[k] = g;
    w.offset[k] = p.offset[i];
    w.mixture[k] = p.model[i] === PURE ? 0 : 1;
    if (p.model[i] === PURE) constant += v * p.offset[i];
    if (g >= 0) w.groupNu[g] += v;
    const ratio = n0[i] / Math.abs(v);
    if (v < 0 && ratio < hiRatio) {
      hiRatio = ratio;
      hiL = k;
    }
    if (v > 0 && ratio < loRatio) {
      loRatio = ratio;
      loL = k;
    }
    k++;
  }
  w.constant = constant;
  if (hiL < 0 || loL < 0) return { ok: false, message: 'the reaction lacks a side', extent: 0, iterations: 0 };

  // The bounds and ln Q − ln K there (a limit: finite when only pure phases run out).
  const xiHi = setBase(w, n0, hiL);
  const fHi = boundValue(w);
  if (fHi <= 0) return finish(w, n, 0, 1, xiHi, 0);
  const xiLo = setBase(w, n0, loL);
  const fLo = boundValue(w);
  if (fLo >= 0) return finish(w, n, 0, 1, xiLo, 0);

  // Which bound is nearer the root: the sign at the midpoint.
  const xiMid = 0.5 * (xiLo + xiHi);
  let fMid = 0;
  {
    w.groupBase[0] = w.groupOther[0];
    w.groupBase[1] = w.groupOther[1];
    for (let j = 0; j < count; j++) {
      w.base[j] = n0[w.idx[j]] + w.nu[j] * xiMid;
      if (w.group[j] >= 0) w.groupBase[w.group[j]] += w.base[j];
    }
    fMid = valueAt(w, 0, 1, false).f;
  }
  let sigma: number;
  let xiBound: number;
  let deltaMax: number;
  if (fMid >= 0) {
    sigma = 1;
    xiBound = setBase(w, n0, loL);
    deltaMax = xiMid - xiLo;
  } else {
    sigma = -1;
    xiBound = setBase(w, n0, hiL);
    deltaMax = xiHi - xiMid;
  }
  if (fMid === 0 || !(deltaMax > 0)) return finish(w, n, deltaMax > 0 ? deltaMax : 0, sigma, xiBound, 1);

  // Safeguarded Newton/bisection on H(u) = σ·(ln Q − ln K) at ξ = bound + σ·e^u, increasing in u.
  let lo = -Infinity;
  let hi = Math.log(deltaMax);
  let u = hi;
  let iterations = 0;
  for (;;) {
    iterations++;
    if (iterations > MAX_ITERATIONS) return { ok: false, message: 'the root find did not converge', extent: 0, iterations };
    const delta = Math.exp(u);
    const e = valueAt(w, delta, sigma, true);
    const h = sigma * e.f;
    if (h === 0) break;
    if (h > 0) hi = u;
    else lo = u;
    let next = u - h / (delta * e.df);
    const tol = U_TOLERANCE * Math.max(1, Math.abs(u));
    if (Math.abs(next - u) <= tol) {
      if (next > lo && next < hi) u = next;
      break;
    }
    if (!(next > lo && next < hi)) next = lo === -Infinity ? hi - Math.max(1, 2 * (hi - u)) : 0.5 * (lo + hi);
    if (next < U_MIN) {
      if (lo === -Infinity && u === U_MIN) {
        return { ok: false, message: 'the limiting amount at equilibrium is below the smallest normal double (underflow)', extent: 0, iterations };
      }
      next = U_MIN;
    }
    if (hi - lo <= tol) break;
    u = next;
  }
  return finish(w, n, Math.exp(u), sigma, xiBound, iterations);
}

/**
 * Base amounts at the bound where species `L` (a participant position) runs out:
 * m_i = n0_i + ν_i·ξb with ξb = −n0_L/ν_L, formed as (ν_L·n0_i − ν_i·n0_L)/ν_L without
 * cancellation, so a nearly co-limiting species keeps its small remainder exactly. If
 * rounding of the ratios picked the wrong limiting species, the one that would go
 * negative takes its place. Returns ξb.
 */
function setBase(w: Work, n0: Float64Array, L0: number): number {
  let L = L0;
  for (let attempt = 0; attempt <= w.count; attempt++) {
    const vL = w.nu[L];
    const nL = n0[w.idx[L]];
    let wrong = -1;
    for (let j = 0; j < w.count; j++) {
      if (j === L) {
        w.base[j] = 0;
        continue;
      }
      const m = accurateDifferenceOfProducts(vL, n0[w.idx[j]], w.nu[j], nL, vL);
      if (m < 0 && Math.sign(w.nu[j]) === Math.sign(vL)) wrong = j;
      w.base[j] = m < 0 ? 0 : m;
    }
    if (wrong < 0) break;
    L = wrong;
  }
  w.groupBase[0] = w.groupOther[0];
  w.groupBase[1] = w.groupOther[1];
  for (let j = 0; j < w.count; j++) if (w.group[j] >= 0) w.groupBase[w.group[j]] += w.base[j];
  return -n0[w.idx[L]] / w.nu[L];
}

/**
 * lim δ→0+ of ln Q − ln K at distance δ from the bound (base amounts): species at 0 contribute
 * ν·ln(|ν|·δ) and an emptied mole-fraction group −Δν·ln(|Δν|·δ); the total coefficient of
 * ln δ decides an infinite limit, otherwise the finite rest is the limit.
 */
function boundValue(w: Work): number {
  let finite = w.constant;
  let lnDeltaCoefficient = 0;
  for (let j = 0; j < w.count; j++) {
    if (!w.mixture[j]) continue;
    const v = w.nu[j];
    const m = w.base[j];
    if (m > 0) finite += v * (Math.log(m) + w.offset[j]);
    else {
      finite += v * (Math.log(Math.abs(v)) + w.offset[j]);
      lnDeltaCoefficient += v;
    }
  }
  for (let g = 0; g < 2; g++) {
    const dv = w.groupNu[g];
    if (dv === 0) continue;
    const total = w.groupBase[g];
    if (total > 0) finite -= dv * Math.log(total);
    else {
      finite -= dv * Math.log(Math.abs(dv));
      lnDeltaCoefficient -= dv;
    }
  }
  // Exact cancellation of the ln δ terms (a whole phase vanishing together) leaves a finite limit.
  if (Math.abs(lnDeltaCoefficient) > LN_DELTA_CANCELLATION) return lnDeltaCoefficient > 0 ? Number.NEGATIVE_INFINITY : Number.POSITIVE_INFINITY;
  return finite;
}

/** ln Q − ln K and its ξ-derivative at amounts base + σ·ν·δ (derivative only if asked). */
function valueAt(w: Work, delta: number, sigma: number, wantDerivative: boolean): { f: number; df: number } {
  let f = w.constant;
  let df = 0;
  for (let j = 0; j < w.count; j++) {
    if (!w.mixture[j]) continue;
    const v = w.nu[j];
    const amount = w.base[j] + sigma * v * delta;
    f += v * (Math.log(amount) + w.offset[j]);
    if (wantDerivative) df += (v * v) / amount;
  }
  for (let g = 0; g < 2; g++) {
    const dv = w.groupNu[g];
    if (dv === 0) continue;
    const total = w.groupBase[g] + sigma * dv * delta;
    f -= dv * Math.log(total);
    if (wantDerivative) df -= (dv * dv) / total;
  }
  result.f = f;
  result.df = df;
  return result;
}

const result = { f: 0, df: 0 };

function finish(w: Work, n: Float64Array, delta: number, sigma: number, xiBound: number, iterations: number): SingleOutcome {
  for (let j = 0; j < w.count; j++) {
    const amount = w.base[j] + sigma * w.nu[j] * delta;
    n[w.idx[j]] = amount > 0 ? amount : 0;
  }
  return { ok: true, extent: xiBound + sigma * delta, iterations };
}

