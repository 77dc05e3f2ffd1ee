// Element and charge balance of a reaction: tallies for given coefficients,
// and the smallest whole-number balance when the coefficients are left open.
// All arithmetic is exact (Rational); nothing here throws on user input.
import { gcd, lcm, Rational } from './rational';

export interface BalanceTerm {
  composition: ReadonlyMap<string, Rational>;
  /** Whole-number charge, as parseFormula gives it. */
  charge: number;
  side: 'left' | 'right';
}

export interface ElementTally {
  /** Element symbol, or 'charge'. */
  element: string;
  left: Rational;
  right: Rational;
}

export type BalanceSolution =
  /** Positive integers, smallest whole numbers (gcd 1), one per term in input order. */
  | { kind: 'unique'; coefficients: bigint[] }
  /**
   * No positive balance exists. `offendingTerms` (0-based term indices) are the
   * terms that would need a negative coefficient (move to the other side) or a
   * zero one (take no part); it is empty when only the zero solution exists.
   */
  | { kind: 'none'; reason: string; offendingTerms: number[] }
  /** The null space has dimension > 1: several independent balances. */
  | { kind: 'several'; dimension: number; reason: string };

/** Name of the charge row in tallies. */
export const CHARGE_ROW = 'charge';

/**
 * Per-element sums of coefficient × count on each side (elements in order of
 * first appearance over the terms, charge last, and charge only when some term
 * is charged), and whether every element and the charge balance.
 * coefficients[i] belongs to terms[i]; a missing coefficient counts as 1, as
 * a term written without a coefficient does in a reaction.
 */
export function tallyBalance(
  terms: readonly BalanceTerm[],
  coefficients: readonly Rational[],
): { tallies: ElementTally[]; balanced: boolean } {
  const rows = new Map<string, { left: Rational; right: Rational }>();
  const add = (key: string, side: 'left' | 'right', amount: Rational): void => {
    const row = rows.get(key) ?? { left: Rational.ZERO, right: Rational.ZERO };
    row[side] = row[side].add(amount);
    rows.set(key, row);
  };
  terms.forEach((term, i) => {
    const coefficient = coefficients[i] ?? Rational.ONE;
    for (const [element, count] of term.composition) add(element, term.side, coefficient.mul(count));
  });
  if (terms.some((t) => t.charge !== 0)) {
    terms.forEach((term, i) => {
      add(CHARGE_ROW, term.side, (coefficients[i] ?? Rational.ONE).mul(Rational.of(term.charge)));
    });
  }
  const tallies = [...rows].map(([element, { left, right }]) => ({ element, left, right }));
  return { tallies, balanced: tallies.every((t) => t.left.equals(t.right)) };
}

/**
 * Finds the balance of a reaction whose coefficients are unknown.
 *
 * Method: build the composition matrix with one row per element plus one row
 * for charge and one column per term (right-side terms negated), so a balance
 * is a vector x with A·x = 0. Reduce A to reduced row echelon form with exact
 * Rational Gaussian elimination; the non-pivot (free) columns give a basis of
 * the null space.
 * - dimension 0: only x = 0 -> 'none'.
 * - dimension 1: scale the basis vector to the smallest integers (clear the
 *   denominators, divide by the gcd) and fix the overall sign so that most
 *   components are positive. All components strictly positive -> 'unique';
 *   otherwise 'none', naming the terms that would need a negative coefficient
 *   (belong on the other side) or a zero one (take no part).
 * - dimension > 1 -> 'several'.
 * Electrons (`e-`) are ordinary terms with charge -1 and no elements.
 */
export function solveBalance(terms: readonly BalanceTerm[]): BalanceSolution {
  if (terms.length === 0) return { kind: 'none', reason: 'the reaction has no terms', offendingTerms: [] };

  const matrix = compositionMatrix(terms);
  const pivotColumns = reduceToEchelonForm(matrix, terms.length);
  const freeColumns = [...terms.keys()].filter((c) => !pivotColumns.includes(c));

  if (freeColumns.length === 0) {
    return { kind: 'none', reason: onlyZeroReason(terms), offendingTerms: [] };
  }
  if (freeColumns.length > 1) {
    return {
      kind: 'several',
      dimension: freeColumns.length,
      reason:
        `element and charge balance leave ${freeColumns.length} independent ways to balance these terms, ` +
        'so the coefficients are not fixed; write the coefficients, or split it into separate reactions',
    };
  }

  // One free column f: x_f = 1, and each pivot row r gives x_pivot(r) = -A[r][f].
  const free = freeColumns[0];
  const basis = terms.map(() => Rational.ZERO);
  basis[free] = Rational.ONE;
  pivotColumns.forEach((column, row) => {
    basis[column] = matrix[row][free].neg();
  });

  let integers = toSmallestIntegers(basis);
  const positives = integers.filter((x) => x > 0n).length;
  const negatives = integers.filter((x) => x < 0n).length;
  if (negatives > positives) integers = integers.map((x) => -x);

  const negative = indicesWhere(integers, (x) => x < 0n);
  const zero = indicesWhere(integers, (x) => x === 0n);
  if (negative.length === 0 && zero.length === 0) return { kind: 'unique', coefficients: integers };

  const reasons: string[] = [];
  for (const i of negative) {
    const other = terms[i].side === 'left' ? 'right' : 'left';
    reasons.push(`${describeTerm(terms, i)} would need a negative coefficient: it belongs on the ${other} side`);
  }
  for (const i of zero) reasons.push(`${describeTerm(terms, i)} would need coefficient 0: it takes no part`);
  return {
    kind: 'none',
    reason: `no balance with all coefficients positive: ${reasons.join('; ')}`,
    offendingTerms: [...negative, ...zero].sort((a, b) => a - b),
  };
}

/** Rows: elements in first-appearance order, then charge; columns: terms, right side negated. */
function compositionMatrix(terms: readonly BalanceTerm[]): Rational[][] {
  const elements: string[] = [];
  for (const term of terms) {
    for (const element of term.composition.keys()) if (!elements.includes(element)) elements.push(element);
  }
  const signed = (term: BalanceTerm, value: Rational): Rational => (term.side === 'right' ? value.neg() : value);
  const rows = elements.map((element) =>
    terms.map((term) => signed(term, term.composition.get(element) ?? Rational.ZERO)),
  );
  if (terms.some((t) => t.charge !== 0)) rows.push(terms.map((term) => signed(term, Rational.of(term.charge))));
  return rows;
}

/**
 * Gauss-Jordan elimination in place to reduced row echelon form. Returns the
 * pivot column of each leading row (row r's pivot is the r-th entry).
 */
function reduceToEchelonForm(matrix: Rational[][], columns: number): number[] {
  const pivots: number[] = [];
  let row = 0;
  for (let column = 0; column < columns && row < matrix.length; column++) {
    const found = matrix.findIndex((r, i) => i >= row && !r[column].isZero());
    if (found < 0) continue;
    [matrix[row], matrix[found]] = [matrix[found], matrix[row]];
    const pivot = matrix[row][column];
    matrix[row] = matrix[row].map((x) => x.div(pivot));
    for (let other = 0; other < matrix.length; other++) {
      const factor = matrix[other][column];
      if (other === row || factor.isZero()) continue;
      matrix[other] = matrix[other].map((x, c) => x.sub(factor.mul(matrix[row][c])));
    }
    pivots.push(column);
    row++;
  }
  return pivots;
}

/** Multiplies by the lcm of the denominators, then divides by the gcd of the numerators. */
function toSmallestIntegers(vector: readonly Rational[]): bigint[] {
  const scale = vector.reduce((acc, x) => lcm(acc, x.denominator), 1n);
  const whole = vector.map((x) => (x.numerator * scale) / x.denominator);
  const divisor = whole.reduce((acc, x) => gcd(acc, x), 0n);
  return divisor === 0n ? whole : whole.map((x) => x / divisor);
}

/** Why only the zero solution exists; names an element found on one side only, if any. */
function onlyZeroReason(terms: readonly BalanceTerm[]): string {
  const base = 'only the zero solution exists: no choice of coefficients conserves every element and the charge';
  const sides = new Map<string, Set<'left' | 'right'>>();
  for (const term of terms) {
    for (const [element, count] of term.composition) {
      if (count.isZero()) continue;
      const set = sides.get(element) ?? new Set();
      set.add(term.side);
      sides.set(element, set);
    }
  }
  for (const [element, set] of sides) {
    if (set.size === 1) {
      const [side] = [...set];
      return `${base} (${element} appears only on the ${side} side)`;
    }
  }
  return base;
}

/** `term 3 (right side)`: 1-based for people reading the message. */
function describeTerm(terms: readonly BalanceTerm[], index: number): string {
  return `term ${index + 1} (${terms[index].side} side)`;
}

function indicesWhere(values: readonly bigint[], test: (x: bigint) => boolean): number[] {
  const out: number[] = [];
  values.forEach((x, i) => {
    if (test(x)) out.push(i);
  });
  return out;
}
