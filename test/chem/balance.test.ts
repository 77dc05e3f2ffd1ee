// Tests for balance checking and the minimal balance (server/src/chem/balance.ts):
// textbook reactions with known coefficients, the 'none' and 'several' cases,
// and seeded property tests on randomly built balanced reactions.
import { describe, it, expect } from 'vitest';
import { solveBalance, tallyBalance, type BalanceTerm } from '../../server/src/chem/balance';
import { parseFormula } from '../../server/src/chem/formula';
import { gcd, Rational } from '../../server/src/chem/rational';
import { Random } from '../support/random';

/** Terms of `A + B -> C + D` (formulas only, no coefficients), parsed with parseFormula. */
function terms(reaction: string): BalanceTerm[] {
  const [left, right] = reaction.split(' -> ');
  const side = (text: string, which: 'left' | 'right'): BalanceTerm[] =>
    text.split(' + ').map((formulaText) => {
      const result = parseFormula(formulaText);
      if (!result.ok) throw new Error(`${formulaText}: ${result.problems[0].message}`);
      return { composition: result.formula.composition, charge: result.formula.charge, side: which };
    });
  return [...side(left, 'left'), ...side(right, 'right')];
}

const rationals = (values: readonly (number | bigint)[]): Rational[] => values.map((v) => Rational.of(v));

describe('solveBalance: textbook reactions', () => {
  it.each([
    // combustion of propane, standard general-chemistry textbook example: C3H8 + 5 O2 -> 3 CO2 + 4 H2O
    ['C3H8 + O2 -> CO2 + H2O', [1, 5, 3, 4]],
    // synthesis of water, standard general-chemistry textbook example: 2 H2 + O2 -> 2 H2O
    ['H2 + O2 -> H2O', [2, 1, 2]],
    // Haber process (ammonia synthesis), standard general-chemistry textbook example: N2 + 3 H2 -> 2 NH3
    ['N2 + H2 -> NH3', [1, 3, 2]],
    // combustion of octane, standard general-chemistry textbook example: 2 C8H18 + 25 O2 -> 16 CO2 + 18 H2O
    ['C8H18 + O2 -> CO2 + H2O', [2, 25, 16, 18]],
    // combustion of glucose (cellular respiration), standard general-chemistry textbook example:
    // C6H12O6 + 6 O2 -> 6 CO2 + 6 H2O
    ['C6H12O6 + O2 -> CO2 + H2O', [1, 6, 6, 6]],
    // thermite reaction, standard general-chemistry textbook example: 2 Al + Fe2O3 -> Al2O3 + 2 Fe
    ['Al + Fe2O3 -> Al2O3 + Fe', [2, 1, 1, 2]],
    // thermal decomposition of potassium chlorate, standard general-chemistry textbook example:
    // 2 KClO3 -> 2 KCl + 3 O2
    ['KClO3 -> KCl + O2', [2, 2, 3]],
    // precipitation of lead(II) iodide, standard general-chemistry textbook example:
    // Pb(NO3)2 + 2 KI -> PbI2 + 2 KNO3
    ['Pb(NO3)2 + KI -> PbI2 + KNO3', [1, 2, 1, 2]],
    // neutralisation of phosphoric acid, standard general-chemistry textbook example:
    // H3PO4 + 3 NaOH -> Na3PO4 + 3 H2O
    ['H3PO4 + NaOH -> Na3PO4 + H2O', [1, 3, 1, 3]],
    // catalytic oxidation of ammonia (Ostwald process), standard general-chemistry textbook example:
    // 4 NH3 + 5 O2 -> 4 NO + 6 H2O
    ['NH3 + O2 -> NO + H2O', [4, 5, 4, 6]],
    // copper in dilute nitric acid, standard general-chemistry textbook example:
    // 3 Cu + 8 HNO3 -> 3 Cu(NO3)2 + 2 NO + 4 H2O
    ['Cu + HNO3 -> Cu(NO3)2 + NO + H2O', [3, 8, 3, 2, 4]],
    // permanganate-iron(II) titration in acid, standard general-chemistry textbook redox example:
    // MnO4^- + 5 Fe^2+ + 8 H^+ -> Mn^2+ + 5 Fe^3+ + 4 H2O
    ['MnO4^- + Fe^2+ + H^+ -> Mn^2+ + Fe^3+ + H2O', [1, 5, 8, 1, 5, 4]],
    // permanganate-oxalate titration in acid, standard general-chemistry textbook redox example:
    // 2 MnO4^- + 5 C2O4^2- + 16 H^+ -> 2 Mn^2+ + 10 CO2 + 8 H2O
    ['MnO4^- + C2O4^2- + H^+ -> Mn^2+ + CO2 + H2O', [2, 5, 16, 2, 10, 8]],
    // dichromate reduction half-reaction in acid, standard general-chemistry textbook example:
    // Cr2O7^2- + 14 H^+ + 6 e- -> 2 Cr^3+ + 7 H2O
    ['Cr2O7^2- + H^+ + e- -> Cr^3+ + H2O', [1, 14, 6, 2, 7]],
    // iron(III)/iron(II) half-reaction, standard general-chemistry textbook example: Fe^3+ + e- -> Fe^2+
    ['Fe³⁺ + e⁻ -> Fe²⁺', [1, 1, 1]],
    // dehydration of copper(II) sulfate pentahydrate, standard general-chemistry textbook example:
    // CuSO4·5H2O -> CuSO4 + 5 H2O
    ['CuSO4·5H2O -> CuSO4 + H2O', [1, 1, 5]],
    // setting of plaster of Paris, standard general-chemistry textbook example:
    // 2 CaSO4·1/2H2O + 3 H2O -> 2 CaSO4·2H2O (fractional hydrate counts)
    ['CaSO4·1/2H2O + H2O -> CaSO4·2H2O', [2, 3, 2]],
  ] as const)('balances %s', (reaction, expected) => {
    const t = terms(reaction);
    const solution = solveBalance(t);
    expect(solution).toEqual({ kind: 'unique', coefficients: expected.map((c) => BigInt(c)) });
    expect(tallyBalance(t, rationals(expected)).balanced).toBe(true);
  });
});

describe('solveBalance: no balance or several', () => {
  it("reports 'none' when only the zero solution exists (H2 -> O2)", () => {
    const solution = solveBalance(terms('H2 -> O2'));
    expect(solution.kind).toBe('none');
    if (solution.kind !== 'none') return;
    expect(solution.offendingTerms).toEqual([]); // common practice: no term can be blamed
    expect(solution.reason).toMatch(/only the zero solution/);
    expect(solution.reason).toMatch(/H appears only on the left side/);
  });

  it("reports 'none' naming a term that belongs on the other side", () => {
    // 2 H2O -> 2 H2 + O2 written with H2 on the wrong side (from memory: electrolysis of water)
    const solution = solveBalance(terms('H2 + H2O -> O2'));
    expect(solution.kind).toBe('none');
    if (solution.kind !== 'none') return;
    expect(solution.offendingTerms).toEqual([0]); // H2 (index 0) belongs with the products (from memory: electrolysis of water)
    expect(solution.reason).toMatch(/term 1 \(left side\) would need a negative coefficient: it belongs on the right side/);
  });

  it("reports 'none' naming a term that takes no part", () => {
    // He cannot be balanced by anything else, so it would need coefficient 0 (common practice)
    const solution = solveBalance(terms('H2 + O2 + He -> H2O'));
    expect(solution.kind).toBe('none');
    if (solution.kind !== 'none') return;
    expect(solution.offendingTerms).toEqual([2]); // He (index 2)
    expect(solution.reason).toMatch(/term 3 \(left side\) would need coefficient 0/);
  });

  it("reports 'several' for independent balances (H2 + O2 -> H2O + H2O2)", () => {
    // 2 H2 + O2 -> 2 H2O and H2 + O2 -> H2O2 are independent (from memory)
    const solution = solveBalance(terms('H2 + O2 -> H2O + H2O2'));
    expect(solution.kind).toBe('several');
    if (solution.kind !== 'several') return;
    expect(solution.dimension).toBe(2); // 4 terms, 2 independent element rows (H, O): 4 - 2 = 2
  });

  it("reports 'none' for no terms", () => {
    expect(solveBalance([]).kind).toBe('none');
  });

  it('treats a charge imbalance as unbalanced: Fe^3+ -> Fe^2+ has no balance', () => {
    // iron is conserved but the charge is not: needs an electron (standard textbook half-reaction)
    const solution = solveBalance(terms('Fe^3+ -> Fe^2+'));
    expect(solution.kind).toBe('none');
  });
});

describe('tallyBalance', () => {
  it('sums coefficient × count per element and side, charge last', () => {
    // permanganate-iron(II) in acid, standard general-chemistry textbook redox example
    const t = terms('MnO4^- + Fe^2+ + H^+ -> Mn^2+ + Fe^3+ + H2O');
    const { tallies, balanced } = tallyBalance(t, rationals([1, 5, 8, 1, 5, 4]));
    expect(balanced).toBe(true);
    expect(tallies.map((x) => [x.element, x.left.toString(), x.right.toString()])).toEqual([
      ['Mn', '1', '1'],
      ['O', '4', '4'],
      ['Fe', '5', '5'],
      ['H', '8', '8'],
      ['charge', '17', '17'], // -1 + 5·2 + 8·1 = 17; 2 + 5·3 = 17 (arithmetic on the textbook coefficients)
    ]);
  });

  it('reports an imbalance with the sums that differ', () => {
    const t = terms('H2 + O2 -> H2O');
    const { tallies, balanced } = tallyBalance(t, rationals([1, 1, 1]));
    expect(balanced).toBe(false);
    expect(tallies.map((x) => [x.element, x.left.toString(), x.right.toString()])).toEqual([
      ['H', '2', '2'],
      ['O', '2', '1'], // one O2 gives 2 O, one H2O holds 1 O (common practice)
    ]);
  });

  it('omits the charge row when nothing is charged, and counts a missing coefficient as 1', () => {
    const t = terms('N2 + H2 -> NH3');
    const { tallies, balanced } = tallyBalance(t, rationals([1, 3])); // NH3 has no coefficient given
    expect(tallies.map((x) => x.element)).toEqual(['N', 'H']);
    expect(balanced).toBe(false); // N: 2 vs 1 (Haber process needs 2 NH3, standard textbook example)
    expect(tallyBalance(t, rationals([1, 3, 2])).balanced).toBe(true);
  });

  it('works with fractional coefficients', () => {
    // H2 + 1/2 O2 -> H2O, the per-mole-of-water form (common practice)
    const t = terms('H2 + O2 -> H2O');
    expect(tallyBalance(t, [Rational.ONE, Rational.of(1, 2), Rational.ONE]).balanced).toBe(true);
  });
});

// ---------------------------------------------------------------------------
// Property tests

/** A large prime (2^61 - 1) for an independent rank check by elimination modulo p. */
const PRIME = 2305843009213693951n;

function mod(a: bigint): bigint {
  const r = a % PRIME;
  return r < 0n ? r + PRIME : r;
}

function modInverse(a: bigint): bigint {
  // Fermat: a^(p-2) mod p
  let result = 1n;
  let base = mod(a);
  let exponent = PRIME - 2n;
  while (exponent > 0n) {
    if (exponent & 1n) result = (result * base) % PRIME;
    base = (base * base) % PRIME;
    exponent >>= 1n;
  }
  return result;
}

/**
 * Rank of an integer matrix modulo PRIME. It differs from the rational rank only
 * if PRIME divides every nonzero maximal minor, which is out of reach for the
 * small entries used here; it shares no code with solveBalance.
 */
function rankModPrime(rows: bigint[][]): number {
  const m = rows.map((r) => r.map(mod));
  const columns = m[0]?.length ?? 0;
  let rank = 0;
  for (let c = 0; c < columns && rank < m.length; c++) {
    const pivot = m.findIndex((r, i) => i >= rank && r[c] !== 0n);
    if (pivot < 0) continue;
    [m[rank], m[pivot]] = [m[pivot], m[rank]];
    const inv = modInverse(m[rank][c]);
    for (let i = 0; i < m.length; i++) {
      if (i === rank || m[i][c] === 0n) continue;
      const f = (m[i][c] * inv) % PRIME;
      m[i] = m[i].map((x, j) => mod(x - f * m[rank][j]));
    }
    rank++;
  }
  return rank;
}

interface Species {
  counts: Map<string, bigint>;
  charge: number;
}

/** A reaction balanced by construction, with the coefficients that balance it. */
function randomBalancedReaction(rng: Random): { species: Species[]; sides: ('left' | 'right')[]; coefficients: bigint[] } {
  const pool = rng.sample(['H', 'C', 'N', 'O', 'S', 'Cl', 'Fe', 'Na'], rng.int(2, 4));
  const reactantCount = rng.int(1, 3);
  const species: Species[] = [];
  const coefficients: bigint[] = [];
  const total = new Map<string, bigint>();
  let totalCharge = 0;
  for (let i = 0; i < reactantCount; i++) {
    const counts = new Map<string, bigint>();
    for (const element of rng.sample(pool, rng.int(1, pool.length))) counts.set(element, BigInt(rng.int(1, 4)));
    const charge = rng.chance(0.3) ? rng.int(-2, 2) : 0;
    const c = BigInt(rng.int(1, 5));
    species.push({ counts, charge });
    coefficients.push(c);
    for (const [e, n] of counts) total.set(e, (total.get(e) ?? 0n) + c * n);
    totalCharge += Number(c) * charge;
  }

  // Products: split every element's total (and the total charge) into random pieces.
  const productCount = rng.int(1, 3);
  const pieces: Map<string, bigint>[] = Array.from({ length: productCount }, () => new Map());
  for (const [element, amount] of total) {
    let left = amount;
    for (let j = 0; j < productCount - 1; j++) {
      const take = BigInt(rng.int(0, Number(left)));
      if (take > 0n) pieces[j].set(element, take);
      left -= take;
    }
    if (left > 0n) pieces[productCount - 1].set(element, left);
  }
  const nonEmpty = pieces.filter((p) => p.size > 0);
  const charges = nonEmpty.map(() => 0);
  let chargeLeft = totalCharge;
  for (let j = 0; j < nonEmpty.length - 1; j++) {
    charges[j] = rng.int(-2, 2);
    chargeLeft -= charges[j];
  }
  charges[nonEmpty.length - 1] = chargeLeft;

  const sides: ('left' | 'right')[] = species.map(() => 'left');
  nonEmpty.forEach((piece, j) => {
    // Use a random divisor of the piece's gcd as the product's coefficient.
    let g = BigInt(Math.abs(charges[j]));
    for (const n of piece.values()) g = gcd(g, n);
    const divisors = Array.from({ length: Number(g) }, (_, k) => BigInt(k + 1)).filter((d) => g % d === 0n);
    const d = rng.pick(divisors);
    species.push({ counts: new Map([...piece].map(([e, n]) => [e, n / d])), charge: charges[j] / Number(d) });
    coefficients.push(d);
    sides.push('right');
  });
  return { species, sides, coefficients };
}

describe('solveBalance property tests', () => {
  // Property test: on random reactions balanced by construction, a 'unique' answer
  // conserves every element and the charge exactly, is positive and has gcd 1; when
  // the null space is one-dimensional (checked independently by a rank computation
  // modulo a prime) the answer is 'unique' and proportional to the constructed
  // coefficients; otherwise it is 'several' with the right dimension.
  it('finds the constructed balance of random balanced reactions', () => {
    const rng = new Random(31337);
    const CASES = 300;
    /** At least this share of cases must exercise the one-dimensional path. */
    const MIN_SHARE_ONE_DIMENSIONAL = 0.3;
    let oneDimensional = 0;
    for (let i = 0; i < CASES; i++) {
      const { species, sides, coefficients } = randomBalancedReaction(rng);
      const t: BalanceTerm[] = species.map((s, k) => ({
        composition: new Map([...s.counts].map(([e, n]) => [e, Rational.of(n)])),
        charge: s.charge,
        side: sides[k],
      }));
      const label = JSON.stringify(species.map((s, k) => [sides[k], [...s.counts].map(([e, n]) => `${e}${n}`).join(''), s.charge]));

      // The construction itself balances.
      expect(tallyBalance(t, coefficients.map((c) => Rational.of(c))).balanced, label).toBe(true);

      const elements = [...new Set(species.flatMap((s) => [...s.counts.keys()]))];
      const matrix = elements.map((e) => species.map((s, k) => (s.counts.get(e) ?? 0n) * (sides[k] === 'right' ? -1n : 1n)));
      matrix.push(species.map((s, k) => BigInt(s.charge) * (sides[k] === 'right' ? -1n : 1n)));
      const nullity = species.length - rankModPrime(matrix);

      const solution = solveBalance(t);
      if (solution.kind === 'unique') {
        const x = solution.coefficients;
        expect(x).toHaveLength(species.length);
        expect(x.every((c) => c > 0n), label).toBe(true);
        expect(x.reduce((a, b) => gcd(a, b), 0n), label).toBe(1n); // smallest whole numbers
        expect(tallyBalance(t, x.map((c) => Rational.of(c))).balanced, label).toBe(true);
      }
      expect(nullity, label).toBeGreaterThanOrEqual(1); // the constructed coefficients are a nonzero solution
      if (nullity === 1) {
        oneDimensional++;
        expect(solution.kind, label).toBe('unique');
        if (solution.kind !== 'unique') continue;
        const divisor = coefficients.reduce((a, b) => gcd(a, b), 0n);
        expect(solution.coefficients, label).toEqual(coefficients.map((c) => c / divisor));
      } else {
        expect(solution, label).toMatchObject({ kind: 'several', dimension: nullity });
      }
    }
    expect(oneDimensional / CASES).toBeGreaterThanOrEqual(MIN_SHARE_ONE_DIMENSIONAL);
  });

  // Property test: terms in any order and on swapped sides give the same answer, permuted.
  it('does not depend on term order or on which side is written first', () => {
    const rng = new Random(2718);
    const CASES = 200;
    for (let i = 0; i < CASES; i++) {
      const { species, sides } = randomBalancedReaction(rng);
      const t: BalanceTerm[] = species.map((s, k) => ({
        composition: new Map([...s.counts].map(([e, n]) => [e, Rational.of(n)])),
        charge: s.charge,
        side: sides[k],
      }));
      const order = rng.sample([...t.keys()], t.length);
      const swapped: BalanceTerm[] = order.map((k) => ({ ...t[k], side: t[k].side === 'left' ? 'right' : 'left' }));
      const a = solveBalance(t);
      const b = solveBalance(swapped);
      expect(b.kind).toBe(a.kind);
      if (a.kind === 'unique' && b.kind === 'unique') {
        expect(order.map((k) => a.coefficients[k])).toEqual(b.coefficients);
      }
    }
  });
});
