// The general path, stage 2: Newton's method in log-amount variables from the
// extent solution, so that trace species come out with full relative
// precision and conservation holds to rounding.
// The conservation laws and extent updates it needs from ν are in polish-stoichiometry.ts.
import { groupTotals, type Compact } from './compact';
import { dot2Difference, luFactor, luSolve } from './linalg';
import { buildDirections, FREE, HELD, type Directions } from './newton-active-set';
import type { ExtentState, StageOutcome } from './newton-state';
import { conservationRows, updateExtents, type LawWorkspace } from './polish-stoichiometry';

/** Iteration cap of the polish. */
export const POLISH_MAX_ITERATIONS = 40;
/** Converged when every ln n moves by less than this (relative error of n) and every pure amount by this fraction. */
export const POLISH_STEP_TOLERANCE = 1e-12;
/**
 * A pure phase's polish step is measured relative to its own amount, down to this fraction
 * of the total (about what compensated conservation residuals resolve).
 */
const PURE_AMOUNT_FLOOR = 1e-28;
/**
 * A conservation row is scaled by its magnitude, but never by less than this fraction of the
 * total: conservation is required relative to the total amount, and a law among trace
 * species only must not look violated by a residual of 1e-40 mol.
 */
const ROW_SCALE_FLOOR = 1e-25;
/** Residuals (ln units, or conservation relative to its row scale) below this count as rounding noise in the line search. */
const POLISH_NOISE = 1e-13;
/** Sufficient decrease of Σ residual² for a step of length t: a factor (1 − ARMIJO·t) (Armijo rule; the Newton direction halves it to first order). */
const ARMIJO = 1e-4;
/** ln n may not exceed this in a trial step (exp would overflow). */
const MAX_LOG_AMOUNT = 700;
/** ln n below this would make the amount subnormal (precision lost). */
const MIN_LOG_AMOUNT = Math.log(2.2250738585072014e-308);
/** Halvings of a polish step before giving up on a decrease of the residual. */
const MAX_HALVINGS = 30;

/**
 * Unknowns: ln n for each free mixture species, n for each free pure phase (phases held
 * at zero are fixed). Equations: for each direction z of the reduced space (a basis of
 * the reactions that keeps held phases at zero), Σ (ν z)_i ln a_i = z·ln K; and the
 * network's conservation laws c·n = c·n0 (held species contributing zero), an independent
 * subset of them when some zeros are implied by others. This is the brief's "conservation
 * of the reaction invariants", referenced to n0 rather than to the extent solution: the
 * same equations in exact arithmetic, without the extent solution's accumulated rounding.
 * Conservation residuals are formed in twice the working precision (Dot2), which acts as
 * iterative refinement: a small remainder fixed by a conservation difference (an excess
 * reagent, a nearly used-up solid) keeps its relative precision. ln a comes straight
 * from ln n, so trace amounts never underflow in the equations. The Jacobian (mass-action
 * rows 1 − n_j/N_phase on the diagonal blocks, conservation rows c_j·n_j, scaled by their
 * magnitude) is solved by LU with partial pivoting; steps are halved until Σ residual²
 * decreases enough (Armijo). A free pure phase that comes out negative is held at zero
 * and the polish restarts.
 */
export function polish(c: Compact, st: ExtentState, start: Directions): StageOutcome & { iterations: number } {
  let dirs = start;
  let iterations = 0;
  const heldBefore = workspaceFor(c).heldBefore;
  heldBefore.set(st.held);
  for (let round = 0; round <= c.m; round++) {
    const outcome = polishOnce(c, st, dirs);
    iterations += outcome.iterations;
    if (outcome.negative < 0) {
      if (outcome.ok) return { ok: true, iterations };
      st.held.set(heldBefore);
      return { ok: false, message: outcome.message, iterations, underflow: outcome.underflow };
    }
    st.held[outcome.negative] = HELD;
    dirs = buildDirections(c, st.held);
  }
  st.held.set(heldBefore);
  return { ok: false, message: 'the polish did not settle which phases are present', iterations };
}

interface PolishOnce {
  readonly ok: boolean;
  readonly message?: string;
  readonly underflow?: number;
  readonly iterations: number;
  /** A free pure phase that came out negative (or -1). */
  readonly negative: number;
}

/** The last polish workspace, reused by the next solve of the same size (solves are not re-entrant). */
let pooled: PolishWorkspace | undefined;

function workspaceFor(c: Compact): PolishWorkspace {
  if (!pooled || pooled.m !== c.m || pooled.rho !== c.rho) pooled = new PolishWorkspace(c.m, c.rho);
  return pooled;
}

/**
 * Scratch arrays of the polish, sized for the largest case (every variable species free:
 * q <= m unknowns and equations, at most m conservation laws, at most rho directions); a
 * polish uses the leading part of each. Nothing in them outlives one polishOnce, except
 * `heldBefore`, which belongs to `polish` around it.
 */
class PolishWorkspace implements LawWorkspace {
  readonly heldBefore: Uint8Array;
  /** Compact index of each unknown. */
  readonly unknown: Int32Array;
  /** The conservation laws as rewritten by conservationRows (laws × m). */
  readonly laws: Float64Array;
  readonly lawPivotUsed: Uint8Array;
  /** conservationRows: each column's largest entry among the remaining laws, and its first law. */
  readonly columnLargest: Float64Array;
  readonly columnRow: Int32Array;
  readonly rowScale: Float64Array;
  readonly x: Float64Array;
  readonly amounts: Float64Array;
  readonly totals = new Float64Array(2);
  readonly logA: Float64Array;
  readonly residual: Float64Array;
  /** q × q, row-major, in the leading q² entries. */
  readonly jac: Float64Array;
  readonly perm: Int32Array;
  readonly step: Float64Array;
  readonly trialX: Float64Array;
  readonly groupSums: Float64Array;
  constructor(
    readonly m: number,
    readonly rho: number,
  ) {
    this.heldBefore = new Uint8Array(m);
    this.unknown = new Int32Array(m);
    this.laws = new Float64Array(m * m);
    this.lawPivotUsed = new Uint8Array(m);
    this.columnLargest = new Float64Array(m);
    this.columnRow = new Int32Array(m);
    this.rowScale = new Float64Array(m);
    this.x = new Float64Array(m);
    this.amounts = new Float64Array(m);
    this.logA = new Float64Array(m);
    this.residual = new Float64Array(m);
    this.jac = new Float64Array(m * m);
    this.perm = new Int32Array(m);
    this.step = new Float64Array(m);
    this.trialX = new Float64Array(m);
    this.groupSums = new Float64Array(2 * rho);
  }
}

function polishFailure(message: string, iterations: number): PolishOnce {
  return { ok: false, message, iterations, negative: -1 };
}

/**
 * The Jacobian of the polish equations (q × q, into ws.jac) at the point whose amounts and
 * group totals are in ws.amounts and ws.totals: mass-action rows over ln n (the mole-fraction
 * term 1 − n_j/N_phase folded in through the directions' group sums), then the `count`
 * conservation rows c_j·n_j (c_j for a pure phase) over their row scales.
 */
function polishJacobian(c: Compact, ws: PolishWorkspace, dirs: Directions, q: number, count: number): void {
  const { m } = c;
  const k = dirs.k;
  const { unknown, amounts, totals, groupSums, laws, rowScale, jac } = ws;
  for (let a = 0; a < k; a++) {
    for (let u = 0; u < q; u++) {
      const j = unknown[u];
      let v = 0;
      if (c.mixture[j]) {
        v = dirs.s[a * m + j];
        const g = c.group[j];
        if (g >= 0) v -= (groupSums[2 * a + g] * amounts[j]) / totals[g];
      }
      jac[a * q + u] = v;
    }
  }
  for (let l = 0; l < count; l++) {
    for (let u = 0; u < q; u++) {
      const j = unknown[u];
      const cl = laws[l * m + j];
      jac[(k + l) * q + u] = c.mixture[j] ? (cl * amounts[j]) / rowScale[l] : cl / rowScale[l];
    }
  }
}

function polishOnce(c: Compact, st: ExtentState, dirs: Directions): PolishOnce {
  const { m } = c;
  const n = st.n;
  const held = st.held;
  const ws = workspaceFor(c);
  const unknown = ws.unknown;
  let q = 0;
  for (let j = 0; j < m; j++) if (held[j] === FREE) unknown[q++] = j;
  const k = dirs.k;

  const count = conservationRows(c, held, n, ws);
  if (count + k !== q) return polishFailure('the conservation laws and the reduced reactions do not determine the present species', 0);
  const invariants = ws.laws;
  const rowScale = ws.rowScale;
  for (let l = 0; l < count; l++) {
    let sc = 0;
    for (let j = 0; j < m; j++) sc += Math.abs(invariants[l * m + j]) * Math.max(n[j], c.n0[j]);
    rowScale[l] = Math.max(sc, ROW_SCALE_FLOOR * c.total);
  }
  const x = ws.x;
  for (let u = 0; u < q; u++) {
    const j = unknown[u];
    x[u] = c.mixture[j] ? Math.log(n[j]) : n[j];
    if (c.mixture[j] && !Number.isFinite(x[u])) return polishFailure('a mixture species has no positive amount to start the polish from', 0);
  }
  const amounts = ws.amounts;
  for (let j = 0; j < m; j++) amounts[j] = held[j] !== FREE ? 0 : n[j];
  const totals = ws.totals;
  const logA = ws.logA;
  for (let j = 0; j < m; j++) logA[j] = c.mixture[j] ? 0 : c.offset[j];
  const residual = ws.residual;
  const jac = ws.jac;
  const perm = ws.perm;
  const step = ws.step;
  const trialX = ws.trialX;
  const groupSums = ws.groupSums;
  for (let a = 0; a < k; a++) {
    groupSums[2 * a] = 0;
    groupSums[2 * a + 1] = 0;
    for (let j = 0; j < m; j++) {
      const g = c.group[j];
      if (g >= 0) groupSums[2 * a + g] += dirs.s[a * m + j];
    }
  }

  /** Residuals at `xs` into `residual`; returns Σ residual² (NaN if not finite). */
  const evaluate = (xs: Float64Array): number => {
    for (let u = 0; u < q; u++) {
      const j = unknown[u];
      amounts[j] = c.mixture[j] ? Math.exp(xs[u]) : xs[u];
    }
    groupTotals(c, amounts, totals);
    // ln a from ln n directly, so an amount too small for a double still has an exact ln a.
    const lg0 = c.hasGasGroup ? Math.log(totals[0]) : 0;
    const lg1 = c.hasLiquidGroup ? Math.log(totals[1]) : 0;
    for (let u = 0; u < q; u++) {
      const j = unknown[u];
      if (!c.mixture[j]) continue;
      const g = c.group[j];
      logA[j] = xs[u] + c.offset[j] - (g === 0 ? lg0 : g === 1 ? lg1 : 0);
    }
    let worst = 0;
    for (let a = 0; a < k; a++) {
      let sum = -dirs.kappa[a];
      for (let j = 0; j < m; j++) {
        const v = dirs.s[a * m + j];
        if (v !== 0) sum += v * logA[j];
      }
      residual[a] = sum;
      worst += sum * sum;
    }
    for (let l = 0; l < count; l++) {
      const r = dot2Difference(invariants, l * m, amounts, c.n0, m) / rowScale[l];
      residual[k + l] = r;
      worst += r * r;
    }
    return Number.isFinite(worst) ? worst : Number.NaN;
  };

  let merit = evaluate(x);
  if (Number.isNaN(merit)) return polishFailure('the polish started from a non-finite point', 0);
  let iterations = 0;
  let converged = false;
  while (iterations < POLISH_MAX_ITERATIONS) {
    iterations++;
    polishJacobian(c, ws, dirs, q, count);
    for (let i = 0; i < q; i++) step[i] = -residual[i];
    if (!luFactor(jac, q, perm)) return polishFailure('the polish Jacobian is singular', iterations);
    luSolve(jac, q, perm, step);
    let t = 1;
    for (let u = 0; u < q; u++) {
      if (!Number.isFinite(step[u])) return polishFailure('the polish step is not finite', iterations);
      if (c.mixture[unknown[u]] && x[u] + step[u] > MAX_LOG_AMOUNT) t = Math.min(t, (MAX_LOG_AMOUNT - x[u]) / step[u]);
    }
    let accepted = false;
    let trialMerit = merit;
    for (let halving = 0; halving <= MAX_HALVINGS; halving++) {
      for (let u = 0; u < q; u++) trialX[u] = x[u] + t * step[u];
      trialMerit = evaluate(trialX);
      if (!Number.isNaN(trialMerit) && (trialMerit <= (1 - ARMIJO * t) * merit || trialMerit <= POLISH_NOISE * POLISH_NOISE * q)) {
        accepted = true;
        break;
      }
      t *= 0.5;
    }
    if (!accepted) {
      evaluate(x);
      if (merit <= POLISH_NOISE * POLISH_NOISE * q) converged = true;
      break;
    }
    let largest = 0;
    for (let u = 0; u < q; u++) {
      const j = unknown[u];
      const change = Math.abs(t * step[u]);
      largest = Math.max(largest, c.mixture[j] ? change : change / Math.max(Math.abs(trialX[u]), c.total * PURE_AMOUNT_FLOOR));
      x[u] = trialX[u];
    }
    merit = trialMerit;
    if (t === 1 && largest <= POLISH_STEP_TOLERANCE) {
      converged = true;
      break;
    }
  }
  if (!converged) return polishFailure('the log-amount polish did not converge', iterations);
  evaluate(x);
  for (let u = 0; u < q; u++) {
    const j = unknown[u];
    if (c.mixture[j] && x[u] < MIN_LOG_AMOUNT && !(c.group[j] >= 0 && c.phantom[c.group[j]] > 0)) {
      return { ok: false, message: 'an equilibrium amount is below the smallest normal double (underflow)', iterations, negative: -1, underflow: j };
    }
  }
  // Move the extents by the polish's change of the amounts, then keep the new amounts.
  let negative = -1;
  for (let j = 0; j < m; j++) {
    if (held[j] === FREE && !c.mixture[j] && amounts[j] < 0) negative = negative < 0 || amounts[j] < amounts[negative] ? j : negative;
  }
  if (negative >= 0) return { ok: false, iterations, negative };
  updateExtents(c, st, amounts);
  for (let j = 0; j < m; j++) n[j] = held[j] === FREE ? amounts[j] : 0;
  return { ok: true, iterations, negative: -1 };
}
