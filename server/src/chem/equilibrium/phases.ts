// The tangent-plane test for a mole-fraction phase (the gas at constant
// pressure, the liquid) that is absent at a held optimum: whether it stays
// absent, and if not, its incipient composition and the direction that forms
// it. Also the helpers the phase changes in phases-presence.ts share with it.
import type { Compact } from './compact';
import { luFactor, luSolve, nullSpaceBasis, reducedRowEchelon } from './linalg';
import { buildDirections, FREE, HELD, holdAtZero, RANK_TOLERANCE } from './newton-active-set';
import type { ExtentState } from './newton-state';

/** An absent mixture phase is stable if ln Σ (implied mole fractions) is at most this. */
const STABILITY_TOLERANCE = 1e-9;
/** Newton iterations, gradient tolerance and diagonal regularisation of the tangent-plane minimisation. */
const STABILITY_ITERATIONS = 50;
const STABILITY_GRADIENT = 1e-12;
const STABILITY_REGULARISATION = 1e-14;
/** Largest change (ln units) of any exponent of the log-sum-exp in one Newton step of the tangent-plane minimisation. */
const STABILITY_MAX_STEP = 30;
/** Step halvings of the backtracking line search of the tangent-plane minimisation. */
const STABILITY_HALVINGS = 40;
/** Directions that do not form the absent phase must have |g⁰| below this (ln units) at the held optimum. */
const ABSENT_OPTIMUM_TOLERANCE = 1e-8;
/** Entries of a formation direction below this fraction of its largest are rounding residue. */
export const FORMATION_NOISE = 1e-12;

/** Members of mole-fraction group g (compact indices). */
export function membersOf(c: Compact, g: number): number[] {
  const members: number[] = [];
  for (let j = 0; j < c.m; j++) if (c.group[j] === g) members.push(j);
  return members;
}

/** What the tangent-plane test found for an absent phase. */
export interface PhaseTest {
  readonly stable: boolean;
  /**
   * For an unstable phase whose incipient composition was found: the change of every species
   * (compact order) per mole of the new phase formed with that composition, along directions
   * that keep the other held phases at zero; the matching change of the basis-reaction extents;
   * and Σ (direction coefficient × Σ z·ln K) for the slope of G along it.
   */
  readonly dn?: Float64Array;
  readonly dxi?: Float64Array;
  readonly kappa?: number;
}

/**
 * Tangent-plane test for an absent mole-fraction phase g (all its species held at zero), at
 * a held optimum of the rest (`logA`: ln a of the free species). The formation of the phase
 * may go together with changes of the other species: free ones either way, a pure phase at
 * zero only upwards, the members of another absent phase not at all (they stay at zero; its
 * own test decides about it). The pure phases whose zero is an independent constraint of
 * the optimum (HELD, non-negative multipliers) stay at zero: forming one as well cannot
 * lower G faster. The others at zero (their zero implied by the absent members, or left
 * free at zero) start free; when the best formation direction would take one of them below
 * zero it is held too and the test repeated (an active set on those sign constraints).
 */
export function absentPhaseTest(c: Compact, st: ExtentState, g: number, logA: Float64Array): PhaseTest {
  const { m } = c;
  const members = membersOf(c, g);
  const others = new Uint8Array(m);
  // Members of another absent phase first (equality constraints), then the independent pure zeros.
  for (let j = 0; j < m; j++) if (st.held[j] !== FREE && c.mixture[j] && c.group[j] !== g) holdAtZero(c, others, j);
  for (let j = 0; j < m; j++) if (st.held[j] === HELD && !c.mixture[j]) holdAtZero(c, others, j);
  for (let round = 0; round <= m; round++) {
    const test = tangentPlane(c, g, members, others, logA);
    if (test.stable || test.dn === undefined) return test;
    // A species at zero (not a member) that the formation direction would take below zero.
    const dn = test.dn;
    let scale = 0;
    for (let j = 0; j < m; j++) scale = Math.max(scale, Math.abs(dn[j]));
    let blocking = -1;
    for (let j = 0; j < m; j++) {
      if (c.group[j] === g || others[j] !== FREE || st.n[j] > 0) continue;
      if (dn[j] < -FORMATION_NOISE * scale && (blocking < 0 || dn[j] < dn[blocking])) blocking = j;
    }
    if (blocking < 0) return test;
    holdAtZero(c, others, blocking);
  }
  return { stable: false };
}

/**
 * The test proper, for the directions that keep the species held in `others` at zero. They
 * have gradient g⁰ (ln a of the absent species taken at their pure-phase values); at the
 * held optimum g⁰ = Ñλ with Ñ the absent species' columns of the directions, and forming the
 * phase with composition y changes G at the rate Σ y_j (λ_j + ln y_j) over achievable
 * compositions (y in the row space of Ñ). By convex duality the least such rate is −min over
 * u in the null space of Ñ of ln Σ_j exp(−λ_j − u_j), so the phase stays absent iff that
 * minimum is <= STABILITY_TOLERANCE. The minimum is found by Newton's method on the (convex)
 * log-sum-exp in the null-space coordinates. With all the columns independent this is the
 * familiar Σ_j exp(−λ_j) <= 1 (implied mole fractions sum to at most one). When the phase is
 * unstable, the softmax weights at the minimum are its incipient composition y (the
 * stationarity condition puts y in the row space of Ñ), and solving Ñᵀα = y gives the
 * direction that forms it.
 */
function tangentPlane(c: Compact, g: number, members: readonly number[], others: Uint8Array, logA: Float64Array): PhaseTest {
  const { m, rho } = c;
  const dirs = buildDirections(c, others);
  const k = dirs.k;
  const q = members.length;
  // g⁰ per direction, and Ñ (directions × members).
  const g0 = new Float64Array(k);
  const nt = new Float64Array(k * q);
  for (let a = 0; a < k; a++) {
    let sum = -dirs.kappa[a];
    for (let j = 0; j < m; j++) {
      const v = dirs.s[a * m + j];
      if (v !== 0) sum += v * (c.group[j] === g ? c.offset[j] : logA[j]);
    }
    g0[a] = sum;
    for (let u = 0; u < q; u++) nt[a * q + u] = dirs.s[a * m + members[u]];
  }
  // A particular λ: Gauss–Jordan on [Ñ | g⁰]; rows without members must have g⁰ ≈ 0 (held optimum).
  const e = reducedRowEchelon(nt, k, q, RANK_TOLERANCE);
  const lambda = new Float64Array(q);
  {
    const aug = new Float64Array(k * (q + 1));
    for (let a = 0; a < k; a++) {
      for (let u = 0; u < q; u++) aug[a * (q + 1) + u] = nt[a * q + u];
      aug[a * (q + 1) + q] = g0[a];
    }
    const ea = reducedRowEchelonOnColumns(aug, k, q + 1, q);
    for (let r = 0; r < ea.rank; r++) lambda[ea.pivotColumns[r]] = ea.reduced[r * (q + 1) + q];
    for (let r = ea.rank; r < k; r++) if (Math.abs(ea.reduced[r * (q + 1) + q]) > ABSENT_OPTIMUM_TOLERANCE) return { stable: false };
  }
  const { count, basis: nullBasis } = nullSpaceBasis(e, q);
  // Minimise L(t) = ln Σ_j exp(−λ_j − (Uᵀt)_j) over t (convex), Newton with backtracking.
  const t = new Float64Array(count);
  const w = new Float64Array(q);
  const value = (tt: Float64Array): number => {
    let top = -Infinity;
    for (let u = 0; u < q; u++) {
      let x = -lambda[u];
      for (let b = 0; b < count; b++) x -= nullBasis[b * q + u] * tt[b];
      w[u] = x;
      top = Math.max(top, x);
    }
    let sum = 0;
    for (let u = 0; u < q; u++) sum += Math.exp(w[u] - top);
    for (let u = 0; u < q; u++) w[u] = Math.exp(w[u] - top) / sum; // softmax weights
    return top + Math.log(sum);
  };
  let current = value(t);
  const grad = new Float64Array(count);
  const hess = new Float64Array(count * count);
  const perm = new Int32Array(count);
  for (let it = 0; it < STABILITY_ITERATIONS && current > STABILITY_TOLERANCE; it++) {
    if (count === 0) break;
    // ∇ = −U w, ∇² = U (diag w − w wᵀ) Uᵀ, the w-weighted covariance of the rows of U: formed
    // as Σ w (U − Uw)(U − Uw)ᵀ, without the cancellation of Σ w U Uᵀ − (Uw)(Uw)ᵀ when w is
    // nearly concentrated on one member.
    for (let b = 0; b < count; b++) {
      let sum = 0;
      for (let u = 0; u < q; u++) sum -= nullBasis[b * q + u] * w[u];
      grad[b] = sum;
    }
    for (let b = 0; b < count; b++) {
      for (let d = 0; d < count; d++) {
        let sum = 0;
        for (let u = 0; u < q; u++) sum += w[u] * (nullBasis[b * q + u] + grad[b]) * (nullBasis[d * q + u] + grad[d]);
        hess[b * count + d] = sum + (b === d ? STABILITY_REGULARISATION : 0);
      }
    }
    let norm = 0;
    for (let b = 0; b < count; b++) norm = Math.max(norm, Math.abs(grad[b]));
    if (norm < STABILITY_GRADIENT) break;
    const step = Float64Array.from(grad, (x) => -x);
    if (!luFactor(hess, count, perm)) break;
    luSolve(hess, count, perm, step);
    // Nearly flat directions give huge Newton steps: cap the change of any exponent.
    let reach = 0;
    for (let u = 0; u < q; u++) {
      let change = 0;
      for (let b = 0; b < count; b++) change += nullBasis[b * q + u] * step[b];
      reach = Math.max(reach, Math.abs(change));
    }
    let size = reach > STABILITY_MAX_STEP ? STABILITY_MAX_STEP / reach : 1;
    const trial = new Float64Array(count);
    let next = current;
    for (let h = 0; h < STABILITY_HALVINGS; h++) {
      for (let b = 0; b < count; b++) trial[b] = t[b] + size * step[b];
      next = value(trial);
      if (next < current) break;
      size *= 0.5;
    }
    if (!(next < current)) break;
    t.set(trial);
    current = next;
  }
  value(t); // leaves the softmax weights of the point reached in w
  if (current <= STABILITY_TOLERANCE) return { stable: true };

  // Unstable: the direction that forms the phase with composition w, from Ñᵀα = w.
  const aug = new Float64Array(q * (k + 1));
  for (let u = 0; u < q; u++) {
    for (let a = 0; a < k; a++) aug[u * (k + 1) + a] = nt[a * q + u];
    aug[u * (k + 1) + k] = w[u];
  }
  const ew = reducedRowEchelonOnColumns(aug, q, k + 1, k);
  const alpha = new Float64Array(k);
  for (let r = 0; r < ew.rank; r++) alpha[ew.pivotColumns[r]] = ew.reduced[r * (k + 1) + k];
  const dn = new Float64Array(m);
  const dxi = new Float64Array(rho);
  let kappa = 0;
  for (let a = 0; a < k; a++) {
    const x = alpha[a];
    if (x === 0) continue;
    kappa += x * dirs.kappa[a];
    for (let j = 0; j < m; j++) dn[j] += x * dirs.s[a * m + j];
    for (let r = 0; r < rho; r++) dxi[r] += x * dirs.z[a * rho + r];
  }
  // The members' changes are the composition itself: exact, where Ñᵀα is only exact to rounding
  // of its largest entries (a member with a tiny mole fraction keeps its relative precision).
  for (let u = 0; u < q; u++) dn[members[u]] = w[u];
  return { stable: false, dn, dxi, kappa };
}

/** Gauss–Jordan on the first `columns` columns of a (rows × width) matrix, carrying the rest along. */
export function reducedRowEchelonOnColumns(a: Float64Array, rows: number, width: number, columns: number): { rank: number; pivotColumns: Int32Array; reduced: Float64Array } {
  const m = a.slice();
  let scale = 0;
  for (let i = 0; i < rows; i++) for (let j = 0; j < columns; j++) scale = Math.max(scale, Math.abs(m[i * width + j]));
  const tol = RANK_TOLERANCE * scale;
  const used = new Uint8Array(columns);
  const pivots = new Int32Array(Math.min(rows, columns));
  let rank = 0;
  while (rank < rows && rank < columns) {
    let bi = -1;
    let bj = -1;
    let best = tol;
    for (let i = rank; i < rows; i++) {
      for (let j = 0; j < columns; j++) {
        if (used[j]) continue;
        const v = Math.abs(m[i * width + j]);
        if (v > best) {
          best = v;
          bi = i;
          bj = j;
        }
      }
    }
    if (bi < 0) break;
    for (let j = 0; j < width; j++) {
      const tmp = m[rank * width + j];
      m[rank * width + j] = m[bi * width + j];
      m[bi * width + j] = tmp;
    }
    const inv = 1 / m[rank * width + bj];
    for (let j = 0; j < width; j++) m[rank * width + j] *= inv;
    for (let i = 0; i < rows; i++) {
      if (i === rank) continue;
      const f = m[i * width + bj];
      if (f === 0) continue;
      for (let j = 0; j < width; j++) m[i * width + j] -= f * m[rank * width + j];
    }
    used[bj] = 1;
    pivots[rank] = bj;
    rank++;
  }
  return { rank, pivotColumns: pivots.subarray(0, rank), reduced: m };
}
