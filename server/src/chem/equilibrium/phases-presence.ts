// Changing which mole-fraction phases are present: holding a phase that dwindled
// to its phantom absent (its members removed along the reactions and held at
// zero), and forming an absent phase that failed the tangent-plane test
// (phases.ts) by the amount that minimises G along its formation direction.
import { groupTotals, logActivities, PHANTOM_FRACTION, type Compact } from './compact';
import { VANISH_FRACTION } from './newton';
import { buildDirections, FREE, holdAtZero, RANK_TOLERANCE, release, type Directions } from './newton-active-set';
import { AMOUNT_FLOOR } from './newton-kernels';
import { NUCLEATION_FRACTION, type ExtentState } from './newton-state';
import { FORMATION_NOISE, membersOf, reducedRowEchelonOnColumns, type PhaseTest } from './phases';

/**
 * Forming an unstable phase: the search for the best amount along its formation direction
 * runs in ln ε from this fraction of the largest feasible amount (where G certainly still
 * falls: the rate there is the tangent-plane rate) ...
 */
const FORMATION_START = 1e-30;
/** ... up to this fraction of the largest feasible amount (strictly inside, so mixture species stay positive) ... */
const FORMATION_LIMIT = 1 - 1e-9;
/** ... by this many bisections of ln ε (60 halve a range of ~70 in ln ε to below 1e-16). */
const FORMATION_BISECTIONS = 60;
/** Removing a dwindled phase along the reactions must take its members to zero within this fraction of their largest amount. */
const REMOVAL_TOLERANCE = 1e-9;
/** A mixture species of another phase that rounding would take to zero keeps this fraction of its amount. */
const POSITIVE_FRACTION = 2 ** -40;

/**
 * Holds absent every mole-fraction phase that still carries its phantom (so it could vanish)
 * and whose real amount has dwindled to at most NUCLEATION_FRACTION of the total: its members
 * are brought to exactly 0 and held (like a used-up solid; the reactions are then restricted
 * to directions that keep them at 0), and its phantom is removed. The members are removed
 * along the reactions (a combination that keeps the held pure phases at zero), so the
 * conservation laws still hold; a pure phase that goes with them, or is left at most
 * VANISH_FRACTION of the total, is set to 0. The held set is rebuilt with the absent members
 * first, so their constraints are the independent ones and a pure phase whose zero they
 * imply is marked as implied.
 * Not done (returns false, nothing changed) when the absence would force a dilute species
 * (solute, gas at constant volume, member of the other phase) to zero, i.e. one that no
 * remaining direction can change and that goes with the members: such a species exists only
 * together with the phase, and forming a trace of both always lowers G (its ln n → −∞), so
 * the phase cannot be absent at equilibrium. Returns whether any phase was made absent.
 */
export function holdDwindledPhasesAbsent(c: Compact, st: ExtentState): boolean {
  const { m } = c;
  const gone = [false, false];
  for (let g = 0; g < 2; g++) {
    if (!(c.phantom[g] > 0)) continue;
    let real = 0;
    for (let j = 0; j < m; j++) if (c.group[j] === g) real += st.n[j];
    gone[g] = real <= NUCLEATION_FRACTION * c.total;
  }
  if (!gone[0] && !gone[1]) return false;
  const isMember = (j: number): boolean => c.group[j] >= 0 && gone[c.group[j]];
  const isAbsent = (j: number): boolean => c.group[j] >= 0 && (gone[c.group[j]] || st.absent[c.group[j]] === 1);
  const n = st.n.slice();
  const xi = st.xi.slice();
  removeAlongReactions(c, st.held, n, xi, isMember);
  for (let j = 0; j < m; j++) if (isMember(j) || (!c.mixture[j] && n[j] <= VANISH_FRACTION * c.total)) n[j] = 0;
  const held = new Uint8Array(m);
  for (let j = 0; j < m; j++) if (isAbsent(j)) holdAtZero(c, held, j);
  for (let j = 0; j < m; j++) if (held[j] === FREE && !c.mixture[j] && (st.held[j] !== FREE || n[j] === 0)) holdAtZero(c, held, j);
  const dirs = buildDirections(c, held);
  for (let j = 0; j < m; j++) {
    if (held[j] !== FREE || !c.mixture[j] || n[j] > VANISH_FRACTION * c.total) continue;
    if (!movable(dirs, m, j)) return false; // a dilute species that exists only with the phase
    if (!(n[j] > 0)) n[j] = st.n[j] * POSITIVE_FRACTION; // rounding took it to zero: it must stay positive
  }
  st.n.set(n);
  st.xi.set(xi);
  st.held.set(held);
  for (let g = 0; g < 2; g++) {
    if (!gone[g]) continue;
    c.groupInert[g] -= c.phantom[g];
    c.phantom[g] = 0;
    st.absent[g] = 1;
  }
  st.iterationBase = st.iterations;
  return true;
}

/** Whether some direction changes species j (an entry above RANK_TOLERANCE of its direction's largest). */
function movable(dirs: Directions, m: number, j: number): boolean {
  for (let a = 0; a < dirs.k; a++) {
    let largest = 0;
    for (let i = 0; i < m; i++) largest = Math.max(largest, Math.abs(dirs.s[a * m + i]));
    if (Math.abs(dirs.s[a * m + j]) > RANK_TOLERANCE * largest) return true;
  }
  return false;
}

/**
 * Moves the amounts `n` (and extents `xi`) along the directions of the held set `held` by the
 * combination that takes the members (isMember) to zero, when one exists (least squares on
 * the members' columns, accepted if it removes them to REMOVAL_TOLERANCE of their amount).
 * Other species follow; one that would go below zero (it went with the members) is set to zero.
 */
function removeAlongReactions(c: Compact, held: Uint8Array, n: Float64Array, xi: Float64Array, isMember: (j: number) => boolean): void {
  const { m, rho } = c;
  const members: number[] = [];
  for (let j = 0; j < m; j++) if (isMember(j)) members.push(j);
  const q = members.length;
  let amount = 0;
  for (const j of members) amount = Math.max(amount, n[j]);
  if (q === 0 || !(amount > 0)) return;
  const dirs = buildDirections(c, held);
  const k = dirs.k;
  const aug = new Float64Array(q * (k + 1));
  for (let u = 0; u < q; u++) {
    for (let a = 0; a < k; a++) aug[u * (k + 1) + a] = dirs.s[a * m + members[u]];
    aug[u * (k + 1) + k] = -n[members[u]];
  }
  const e = reducedRowEchelonOnColumns(aug, q, k + 1, k);
  for (let r = e.rank; r < q; r++) if (Math.abs(e.reduced[r * (k + 1) + k]) > REMOVAL_TOLERANCE * amount) return;
  const alpha = new Float64Array(k);
  for (let r = 0; r < e.rank; r++) alpha[e.pivotColumns[r]] = e.reduced[r * (k + 1) + k];
  for (let a = 0; a < k; a++) {
    const x = alpha[a];
    if (x === 0) continue;
    for (let j = 0; j < m; j++) {
      const v = dirs.s[a * m + j];
      if (v !== 0 && !isMember(j)) n[j] += x * v;
    }
    for (let r = 0; r < rho; r++) xi[r] += x * dirs.z[a * rho + r];
  }
  for (let j = 0; j < m; j++) if (!isMember(j) && n[j] < 0) n[j] = 0;
}

/**
 * Forms an absent phase that failed the tangent-plane test: moves along its formation
 * direction (test.dn, one mole of the new phase per unit) by the amount ε that minimises G
 * on that line. G is convex along it and falls at first (at the tangent-plane rate), so ε is
 * found by bisection on the sign of dG/dε = Σ dn_j ln a_j(n + ε·dn) − κ in ln ε, between
 * FORMATION_START and FORMATION_LIMIT of the largest amount that keeps every species
 * non-negative; G is then strictly below its value at the absent-phase optimum, so the
 * iteration cannot come back to it. The phase is then present again: its members are
 * released and its phantom restored, as is a pure phase at zero that the direction forms
 * along with it. A member whose amount rounds to zero (an implied mole fraction below the
 * double range) is given AMOUNT_FLOOR of the total, which the polish, referenced to n0,
 * removes from the conservation laws again. Returns false (and changes no amount) when no
 * formation direction is known or none can move.
 */
export function formAbsentPhase(c: Compact, st: ExtentState, g: number, test: PhaseTest): boolean {
  const { dn, dxi, kappa } = test;
  if (dn === undefined || dxi === undefined || kappa === undefined) return false;
  const { m } = c;
  const n = st.n;
  const members = membersOf(c, g);
  let scale = 0;
  for (let j = 0; j < m; j++) scale = Math.max(scale, Math.abs(dn[j]));
  // Rounding residue of the combination on a species at zero is no change at all.
  for (let j = 0; j < m; j++) if (n[j] === 0 && Math.abs(dn[j]) <= FORMATION_NOISE * scale) dn[j] = 0;
  let limit = Infinity;
  for (let j = 0; j < m; j++) if (dn[j] < 0) limit = Math.min(limit, n[j] / -dn[j]);
  if (!Number.isFinite(limit)) limit = c.total;
  if (!(limit > 0)) return false;
  const trial = new Float64Array(m);
  const totals = new Float64Array(2);
  const logA = new Float64Array(m);
  // Totals as with the phase present (no phantom yet: the members' own amounts define it).
  const slope = (eps: number): number => {
    for (let j = 0; j < m; j++) trial[j] = Math.max(n[j] + eps * dn[j], 0);
    groupTotals(c, trial, totals);
    logActivities(c, trial, totals, logA);
    let sum = -kappa;
    for (let j = 0; j < m; j++) if (dn[j] !== 0) sum += dn[j] * logA[j];
    return sum;
  };
  let lo = Math.log(FORMATION_START * limit);
  let hi = Math.log(FORMATION_LIMIT * limit);
  let eps: number;
  if (slope(Math.exp(hi)) < 0) eps = Math.exp(hi);
  else {
    for (let b = 0; b < FORMATION_BISECTIONS; b++) {
      const mid = 0.5 * (lo + hi);
      if (slope(Math.exp(mid)) < 0) lo = mid;
      else hi = mid; // a NaN slope (not expected) also shrinks the range
    }
    eps = Math.exp(lo);
  }
  for (let j = 0; j < m; j++) {
    if (dn[j] === 0) continue;
    const after = n[j] + eps * dn[j];
    if (c.group[j] === g) n[j] = after > 0 ? after : AMOUNT_FLOOR * c.total;
    else if (c.mixture[j]) n[j] = after > 0 ? after : Math.max(n[j] * POSITIVE_FRACTION, AMOUNT_FLOOR * c.total);
    else n[j] = after > 0 ? after : 0;
  }
  for (const j of members) if (!(n[j] > 0)) n[j] = AMOUNT_FLOOR * c.total;
  for (let r = 0; r < c.rho; r++) st.xi[r] += eps * dxi[r];
  st.absent[g] = 0;
  st.iterationBase = st.iterations;
  c.phantom[g] = PHANTOM_FRACTION * c.total;
  c.groupInert[g] += c.phantom[g];
  for (let j = 0; j < m; j++) if (st.held[j] !== FREE && (c.group[j] === g || n[j] > 0)) release(c, st.held, j);
  return true;
}
