// Unit and property tests for the formula parser (server/src/chem/formula.ts):
// compositions, charges and molar masses of every accepted form, and each
// problem kind with its exact offsets.
//
// Molar masses are computed by hand from the IUPAC 2021 atomic weights
// (conventional values for interval elements): H 1.008, C 12.011, N 14.007,
// O 15.999, Na 22.98976928, P 30.973761998, S 32.06, Cl 35.45, K 39.0983,
// Ca 40.078, Fe 55.845, Cu 63.546; D 2.014101778 (AME2020 atomic mass).
import { describe, it, expect } from 'vitest';
import {
  ELECTRON_MOLAR_MASS,
  formatFormulaCharge,
  parseFormula,
  type Formula,
  type FormulaProblem,
} from '../../server/src/chem/formula';
import { ELEMENTS } from '../../server/src/chem/elements';
import { Rational } from '../../server/src/chem/rational';
import { Random } from '../support/random';

/** Decimal places a molar mass must match (|difference| < 5e-7 g/mol). */
const MOLAR_MASS_DIGITS = 6;

function parsed(text: string): Formula {
  const result = parseFormula(text);
  if (!result.ok) throw new Error(`expected ${text} to parse: ${result.problems.map((p) => p.message).join('; ')}`);
  expect(result.problems).toEqual([]);
  return result.formula;
}

/** Composition as [symbol, count text] pairs, in map order. */
function entries(formula: Formula): [string, string][] {
  return [...formula.composition].map(([symbol, count]) => [symbol, count.toString()]);
}

function onlyProblem(text: string): FormulaProblem {
  const result = parseFormula(text);
  expect(result.ok).toBe(false);
  expect(result.problems).toHaveLength(1);
  return result.problems[0];
}

describe('parseFormula: compositions, charges, molar masses', () => {
  it('parses water', () => {
    const f = parsed('H2O');
    expect(entries(f)).toEqual([['H', '2'], ['O', '1']]); // common practice: counted from the formula
    expect(f.charge).toBe(0); // common practice: neutral
    expect(f.isElectron).toBe(false);
    expect(f.text).toBe('H2O');
    expect(f.molarMass).toBeCloseTo(18.015, MOLAR_MASS_DIGITS); // IUPAC 2021: 2 × 1.008 + 15.999
  });

  it('parses sodium chloride', () => {
    const f = parsed('NaCl');
    expect(entries(f)).toEqual([['Na', '1'], ['Cl', '1']]); // common practice: counted from the formula
    expect(f.molarMass).toBeCloseTo(58.43976928, MOLAR_MASS_DIGITS); // IUPAC 2021: 22.98976928 + 35.45 ≈ 58.44
  });

  it('reads symbols case-sensitively: Co is cobalt, CO is carbon + oxygen', () => {
    expect(entries(parsed('Co'))).toEqual([['Co', '1']]); // common practice: counted from the formula (Co = cobalt)
    expect(entries(parsed('CO'))).toEqual([['C', '1'], ['O', '1']]); // common practice: counted from the formula (C, O)
    expect(entries(parsed('CO2'))).toEqual([['C', '1'], ['O', '2']]); // common practice: counted from the formula
  });

  it('keeps elements in order of first appearance and sums repeats', () => {
    expect(entries(parsed('CH3COOH'))).toEqual([['C', '2'], ['H', '4'], ['O', '2']]); // common practice: counted from the formula (C2H4O2)
  });

  it('multiplies nested groups: Ca3(PO4)2', () => {
    const f = parsed('Ca3(PO4)2');
    expect(entries(f)).toEqual([['Ca', '3'], ['P', '2'], ['O', '8']]); // common practice: counted from the formula (3 Ca, 2 × 1 P, 2 × 4 O)
    // IUPAC 2021: 3 × 40.078 + 2 × 30.973761998 + 8 × 15.999 = 310.173523996 (310.17 to 2 places)
    expect(f.molarMass).toBeCloseTo(310.173523996, MOLAR_MASS_DIGITS); // IUPAC 2021, see the sum above
  });

  it('parses square-bracket groups: K4[Fe(CN)6]', () => {
    const f = parsed('K4[Fe(CN)6]');
    expect(entries(f)).toEqual([['K', '4'], ['Fe', '1'], ['C', '6'], ['N', '6']]); // common practice: counted from the formula
    // IUPAC 2021: 4 × 39.0983 + 55.845 + 6 × 12.011 + 6 × 14.007 = 368.3462 (368.35 to 2 places)
    expect(f.molarMass).toBeCloseTo(368.3462, MOLAR_MASS_DIGITS); // IUPAC 2021, see the sum above
  });

  it('parses a charged complex: [Fe(CN)6]^4-', () => {
    const f = parsed('[Fe(CN)6]^4-');
    expect(entries(f)).toEqual([['Fe', '1'], ['C', '6'], ['N', '6']]); // common practice: counted from the formula
    expect(f.charge).toBe(-4); // common practice: ^4- is 4-
    // IUPAC 2021: 55.845 + 6 × 12.011 + 6 × 14.007 = 211.953; no electron mass added (common practice)
    expect(f.molarMass).toBeCloseTo(211.953, MOLAR_MASS_DIGITS); // IUPAC 2021, see the sum above
  });

  it('parses Unicode subscripts', () => {
    expect(entries(parsed('H₂O'))).toEqual([['H', '2'], ['O', '1']]); // common practice: counted from the formula
    expect(entries(parsed('C₁₂H₂₂O₁₁'))).toEqual([['C', '12'], ['H', '22'], ['O', '11']]); // common practice: counted from the formula (sucrose)
  });

  it('keeps D and T as their own keys', () => {
    const f = parsed('D2O');
    expect(entries(f)).toEqual([['D', '2'], ['O', '1']]); // common practice: counted from the formula
    expect(f.molarMass).toBeCloseTo(20.027203556, MOLAR_MASS_DIGITS); // AME2020 D 2.014101778 × 2 + IUPAC 2021 O 15.999
    expect(entries(parsed('HTO'))).toEqual([['H', '1'], ['T', '1'], ['O', '1']]); // common practice: counted from the formula
  });

  describe('hydrates and adducts', () => {
    // IUPAC 2021: 63.546 + 32.06 + 9 × 15.999 + 10 × 1.008 = 249.677 (249.68 to 2 places)
    const PENTAHYDRATE_MASS = 249.677;
    it.each(['CuSO4·5H2O', 'CuSO4.5H2O', 'CuSO4•5H2O', 'CuSO4*5H2O', 'CuSO₄·5H₂O'])('parses %s as the pentahydrate', (text) => {
      const f = parsed(text);
      expect(entries(f)).toEqual([['Cu', '1'], ['S', '1'], ['O', '9'], ['H', '10']]); // common practice: counted from the formula (4 + 5 O, 5 × 2 H)
      expect(f.molarMass).toBeCloseTo(PENTAHYDRATE_MASS, MOLAR_MASS_DIGITS); // IUPAC 2021, see the sum above
    });

    it.each(['CaSO4·1/2H2O', 'CaSO4·0.5H2O', 'CaSO4.0.5H2O'])('parses the fractional multiplier in %s', (text) => {
      const f = parsed(text);
      expect(entries(f)).toEqual([['Ca', '1'], ['S', '1'], ['O', '9/2'], ['H', '1']]); // common practice: counted from the formula (4 + 1/2 O, 1/2 × 2 H)
      // IUPAC 2021: 40.078 + 32.06 + 4.5 × 15.999 + 1.008 = 145.1415
      expect(f.molarMass).toBeCloseTo(145.1415, MOLAR_MASS_DIGITS); // IUPAC 2021, see the sum above
    });

    it('accepts several parts and a part without a multiplier', () => {
      expect(entries(parsed('CaCl2·NH3·2H2O'))).toEqual([['Ca', '1'], ['Cl', '2'], ['N', '1'], ['H', '7'], ['O', '2']]); // common practice: counted from the formula
    });
  });

  describe('charges', () => {
    // Expected compositions and charges: common practice, read off each formula.
    it.each([
      ['Fe^3+', [['Fe', '1']], 3],
      ['SO4^2-', [['S', '1'], ['O', '4']], -2],
      ['SO4^2−', [['S', '1'], ['O', '4']], -2], // U+2212 minus after the caret
      ['H^+', [['H', '1']], 1],
      ['OH^-', [['O', '1'], ['H', '1']], -1],
      ['Na+', [['Na', '1']], 1],
      ['Cl-', [['Cl', '1']], -1],
      ['Fe++', [['Fe', '1']], 2],
      ['Hg2++', [['Hg', '2']], 2],
      ['PO4---', [['P', '1'], ['O', '4']], -3],
      ['Fe³⁺', [['Fe', '1']], 3],
      ['SO₄²⁻', [['S', '1'], ['O', '4']], -2],
      ['Na⁺', [['Na', '1']], 1],
      ['Cl⁻', [['Cl', '1']], -1],
      ['NH₄⁺', [['N', '1'], ['H', '4']], 1],
      ['SO₄-', [['S', '1'], ['O', '4']], -1], // subscript digits are never a charge
      ['Fe^12+', [['Fe', '1']], 12],
      ['[Cu(H2O)6]^2+', [['Cu', '1'], ['H', '12'], ['O', '6']], 2],
    ] as const)('parses %s', (text, composition, charge) => {
      const f = parsed(text);
      expect(entries(f)).toEqual(composition);
      expect(f.charge).toBe(charge);
    });

    it('does not change the molar mass for an ion charge (common practice)', () => {
      expect(parsed('Fe^3+').molarMass).toBeCloseTo(55.845, MOLAR_MASS_DIGITS); // IUPAC 2021 Fe 55.845
      expect(parsed('SO4^2-').molarMass).toBeCloseTo(96.056, MOLAR_MASS_DIGITS); // IUPAC 2021: 32.06 + 4 × 15.999
    });

    it.each(['e-', 'e^-', 'e⁻', 'e−'])('parses the electron %s', (text) => {
      const f = parsed(text);
      expect(f.isElectron).toBe(true);
      expect(f.composition.size).toBe(0); // common practice: an electron holds no element
      expect(f.charge).toBe(-1); // common practice: electron charge
      expect(f.molarMass).toBe(5.48579909065e-4); // CODATA 2018 electron molar mass, g/mol
      expect(f.molarMass).toBe(ELECTRON_MOLAR_MASS);
    });
  });
});

describe('formatFormulaCharge', () => {
  // Expected texts: the caret notation this parser reads (common practice for plain-text charges).
  it.each([
    [3, '^3+'],
    [-1, '^-'],
    [1, '^+'],
    [-2, '^2-'],
    [0, ''],
  ])('formats %d as %j', (charge, text) => {
    expect(formatFormulaCharge(charge)).toBe(text);
  });
});

describe('parseFormula: ambiguous charges', () => {
  // [text, offset where the digits start, reading 1, reading 2]: offsets counted in the text,
  // readings as the parser specification defines them (one trailing digit as charge / all digits subscript).
  it.each([
    ['Fe3+', 2, 'Fe^3+', 'Fe3^+', 'Fe with charge 3+', 'Fe3 with charge 1+'],
    ['SO42-', 2, 'SO4^2-', 'SO42^-', 'SO4 with charge 2-', 'SO42 with charge 1-'],
    ['NH4+', 2, 'NH^4+', 'NH4^+', 'NH with charge 4+', 'NH4 with charge 1+'],
    ['Cu2+', 2, 'Cu^2+', 'Cu2^+', 'Cu with charge 2+', 'Cu2 with charge 1+'],
    ['Fe10+', 2, 'Fe^10+', 'Fe10^+', 'Fe with charge 10+', 'Fe10 with charge 1+'], // a charge of 0 is no reading
  ])('reports %s with both readings', (text, start, fixA, fixB, readingA, readingB) => {
    const p = onlyProblem(text);
    expect(p.code).toBe('ambiguous-charge');
    expect(p.severity).toBe('warning');
    expect(p.start).toBe(start);
    expect(p.end).toBe(text.length);
    expect(p.message).toBe(`\`${text}\` is ambiguous: ${readingA} (write \`${fixA}\`) or ${readingB} (write \`${fixB}\`)`);
    expect(p.fixes?.map((f) => f.replacement)).toEqual([fixA, fixB]);
    // Each rewrite is itself unambiguous.
    for (const fix of [fixA, fixB]) expect(parseFormula(fix).ok).toBe(true);
  });

  it('reports a broken body before the ambiguity', () => {
    const p = onlyProblem('Xx3+');
    expect(p.code).toBe('unknown-element');
    expect([p.start, p.end]).toEqual([0, 2]); // `Xx` in `Xx3+`
  });
});

describe('parseFormula: problems with exact offsets', () => {
  it('rejects empty text', () => {
    const p = onlyProblem('');
    expect([p.code, p.severity, p.start, p.end]).toEqual(['syntax', 'error', 0, 0]); // empty text: [0, 0)
    expect(p.message).toMatch(/empty formula/);
  });

  it('reports an unknown element with a did-you-mean', () => {
    const p = onlyProblem('Xx2');
    expect([p.code, p.severity, p.start, p.end]).toEqual(['unknown-element', 'error', 0, 2]); // `Xx` in `Xx2`
    expect(p.message).toBe('unknown element symbol `Xx`; did you mean `Xe`?');
    expect(p.fixes?.[0].replacement).toBe('Xe2');
  });

  it('suggests the two-letter symbol for a wrongly capitalised one: CL', () => {
    const p = onlyProblem('NaCL');
    expect([p.code, p.start, p.end]).toEqual(['unknown-element', 3, 4]); // `L` in `NaCL`
    // `Cl` comes from the context; the rest from suggestSymbols, at most three in all.
    expect(p.message).toMatch(/^unknown element symbol `L`; did you mean `Cl`[,?]/);
    expect(p.fixes?.length).toBeLessThanOrEqual(3);
    expect(p.fixes?.[0].replacement).toBe('NaCl');
  });

  it('reports an unknown single capital', () => {
    const p = onlyProblem('H2QO');
    expect([p.code, p.start, p.end]).toEqual(['unknown-element', 2, 3]); // `Q` in `H2QO`
  });

  it('reports a lowercase letter where a symbol must start', () => {
    const p = onlyProblem('h2o');
    expect([p.code, p.start, p.end]).toEqual(['syntax', 0, 1]); // `h` in `h2o`
    expect(p.message).toBe('element symbols start with a capital letter; did you mean `H`?');
    expect(p.fixes?.[0].replacement).toBe('H2o');
    const q = onlyProblem('H2o');
    expect([q.start, q.end]).toEqual([2, 3]); // `o` in `H2o`
    expect(q.message).toBe('element symbols start with a capital letter; did you mean `O`?');
    const co = onlyProblem('co');
    expect(co.message).toBe('element symbols start with a capital letter; did you mean `Co` or `CO`?');
    expect([co.start, co.end]).toEqual([0, 2]); // `co`
  });

  it('points at an unclosed opening bracket', () => {
    const p = onlyProblem('Ca3(PO4');
    expect([p.code, p.start, p.end]).toEqual(['syntax', 3, 4]); // `(` in `Ca3(PO4`
    expect(p.message).toBe('`(` is never closed: expected `)`');
    const q = onlyProblem('K4[Fe(CN)6');
    expect([q.start, q.end]).toEqual([2, 3]); // `[` in `K4[Fe(CN)6`
  });

  it('points at a stray closing bracket', () => {
    const p = onlyProblem('H2O)');
    expect([p.start, p.end]).toEqual([3, 4]); // `)` in `H2O)`
    expect(p.message).toBe('stray `)` with no matching `(`');
  });

  it('points at a closer of the wrong kind', () => {
    const p = onlyProblem('Ca3(PO4]2');
    expect([p.start, p.end]).toEqual([7, 8]); // `]` in `Ca3(PO4]2`
    expect(p.message).toBe('`]` does not match the `(` at offset 3: expected `)`');
    expect(p.fixes?.[0].replacement).toBe('Ca3(PO4)2');
  });

  it('reports a stray number inside a formula', () => {
    const p = onlyProblem('H(2)O');
    expect([p.code, p.start, p.end]).toEqual(['syntax', 2, 3]); // `2` in `H(2)O`
    expect(p.message).toMatch(/^stray number `2`/);
    const q = onlyProblem('H2₂O');
    expect([q.start, q.end]).toEqual([2, 3]); // `₂` in `H2₂O`
  });

  it('reports a coefficient at the start of a formula as a stray number', () => {
    const p = onlyProblem('2H2O');
    expect([p.start, p.end]).toEqual([0, 1]); // `2` in `2H2O`
    expect(p.message).toMatch(/^stray number `2` at the start of the formula: a coefficient belongs to the reaction/);
    const q = onlyProblem('1/2O2');
    expect([q.start, q.end]).toEqual([0, 3]); // `1/2` in `1/2O2`
  });

  it('rejects a zero subscript and a zero multiplier', () => {
    const p = onlyProblem('H0');
    expect([p.start, p.end]).toEqual([1, 2]); // `0` in `H0`
    expect(p.message).toMatch(/^zero subscript `0`/);
    const q = onlyProblem('(OH)00');
    expect([q.start, q.end]).toEqual([4, 6]); // `00` in `(OH)00`
    const r = onlyProblem('CuSO4·0H2O');
    expect([r.start, r.end]).toEqual([6, 7]); // `0` in `CuSO4·0H2O`
    expect(r.message).toMatch(/^zero multiplier `0`/);
    const s = onlyProblem('CaSO4·0.0H2O');
    expect([s.start, s.end]).toEqual([6, 9]); // `0.0` in `CaSO4·0.0H2O`
  });

  it('rejects a zero denominator in a multiplier', () => {
    const p = onlyProblem('CaSO4·1/0H2O');
    expect([p.start, p.end]).toEqual([6, 9]); // `1/0` in `CaSO4·1/0H2O`
  });

  it('rejects an empty group', () => {
    const p = onlyProblem('Ca()2');
    expect([p.start, p.end]).toEqual([2, 4]); // `()` in `Ca()2`
    expect(p.message).toBe('empty group `()`');
    const q = onlyProblem('[]');
    expect([q.start, q.end]).toEqual([0, 2]); // `[]`
  });

  it('rejects a charge in the middle', () => {
    const p = onlyProblem('Fe^3+Cl');
    expect([p.start, p.end]).toEqual([2, 5]); // `^3+` in `Fe^3+Cl`
    expect(p.message).toBe('a charge can only come at the very end of the formula');
    const q = onlyProblem('Na+Cl');
    expect([q.start, q.end]).toEqual([2, 3]); // `+` in `Na+Cl`
    const r = onlyProblem('Fe^2+^3+');
    expect([r.start, r.end]).toEqual([2, 5]); // the first `^2+` in `Fe^2+^3+`
  });

  it('offers the fix for a sign written before the size', () => {
    for (const text of ['Fe+3', 'Fe^+3']) {
      const p = onlyProblem(text);
      expect([p.start, p.end]).toEqual([2, text.length]); // `+3` / `^+3` after `Fe`
      expect(p.fixes?.[0].replacement).toBe('Fe^3+');
    }
  });

  it('rejects malformed charges', () => {
    const caret = onlyProblem('Fe^3');
    expect([caret.start, caret.end]).toEqual([2, 4]); // `^3` in `Fe^3`
    expect(caret.message).toMatch(/^malformed charge after `\^`/);
    const zero = onlyProblem('Fe^0+');
    expect([zero.start, zero.end]).toEqual([2, 5]); // `^0+` in `Fe^0+`
    const mixed = onlyProblem('Fe+-');
    expect([mixed.start, mixed.end]).toEqual([2, 4]); // `+-` in `Fe+-`
    const superscript = onlyProblem('Fe³');
    expect([superscript.start, superscript.end]).toEqual([2, 3]); // `³` in `Fe³`
    expect(superscript.message).toMatch(/^superscript digits are only used for a charge at the end/);
    const superscriptMiddle = onlyProblem('Fe³⁺Cl');
    expect([superscriptMiddle.start, superscriptMiddle.end]).toEqual([2, 4]); // `³⁺` in `Fe³⁺Cl`
    expect(superscriptMiddle.message).toBe('a charge can only come at the very end of the formula');
    const alone = onlyProblem('+');
    expect([alone.start, alone.end]).toEqual([0, 1]); // `+`
    expect(alone.message).toMatch(/^a charge needs a formula/);
  });

  it('rejects misplaced or dangling separators', () => {
    const end = onlyProblem('CuSO4·');
    expect([end.start, end.end]).toEqual([5, 6]); // the final `·` in `CuSO4·`
    const start = onlyProblem('·H2O');
    expect([start.start, start.end]).toEqual([0, 1]); // `·` in `·H2O`
    const doubled = onlyProblem('CuSO4··H2O');
    expect([doubled.start, doubled.end]).toEqual([6, 7]); // the second `·` in `CuSO4··H2O`
    const onlyMultiplier = onlyProblem('CuSO4·5');
    expect([onlyMultiplier.start, onlyMultiplier.end]).toEqual([6, 7]); // `5` in `CuSO4·5`
    const inGroup = onlyProblem('(CuSO4·5H2O)');
    expect([inGroup.start, inGroup.end]).toEqual([6, 7]); // `·` in `(CuSO4·5H2O)`
    expect(inGroup.message).toMatch(/cannot appear inside a group/);
  });

  it('names any other unexpected character', () => {
    const p = onlyProblem('H2O%');
    expect([p.start, p.end]).toEqual([3, 4]); // `%` in `H2O%`
    expect(p.message).toMatch(/^unexpected character `%`: expected /);
    const space = onlyProblem('H2 O');
    expect([space.start, space.end]).toEqual([2, 3]); // the space in `H2 O`
    expect(space.message).toBe('unexpected space inside the formula');
    const emoji = onlyProblem('H2O😀'); // one code point, two UTF-16 units
    expect([emoji.start, emoji.end]).toEqual([3, 5]); // `😀` in `H2O😀`
    expect(emoji.message).toMatch(/`😀`/);
  });

  it('rejects absurd numbers without producing NaN or Infinity', () => {
    const sub = onlyProblem('H1000001');
    expect([sub.start, sub.end]).toEqual([1, 8]); // `1000001` in `H1000001`
    expect(sub.message).toMatch(/too large/);
    expect(parseFormula('H1000000').ok).toBe(true); // the limit itself is accepted
    const mult = onlyProblem('CuSO4·2000000H2O');
    expect([mult.start, mult.end]).toEqual([6, 13]); // `2000000` in `CuSO4·2000000H2O`
    const charge = onlyProblem('Fe^99999999999999999999999+');
    expect(charge.message).toMatch(/too large/);
    const digits = onlyProblem(`H${'9'.repeat(400)}`);
    expect(digits.message).toMatch(/too large/);
  });

  it('rejects very deep nesting instead of overflowing the stack', () => {
    const deep = `${'('.repeat(5000)}H${')'.repeat(5000)}`;
    const p = onlyProblem(deep);
    expect(p.message).toMatch(/nested too deeply/);
    // The deepest accepted nesting still gives a finite molar mass.
    const allowed = `${'('.repeat(12)}H${')999999'.repeat(12)}`;
    const f = parsed(allowed);
    expect(Number.isFinite(f.molarMass)).toBe(true);
  });
});

describe('parseFormula property tests', () => {
  const SYMBOLS = ELEMENTS.map((e) => e.symbol);
  const SEPARATORS = ['·', '•', '*', '.'];
  const MULTIPLIERS = ['2', '5', '10', '0.5', '1.5', '0.25', '1/2', '3/2', '2/3'];
  const SUBSCRIPT_DIGITS = '₀₁₂₃₄₅₆₇₈₉';
  const SUPERSCRIPT_DIGITS = '⁰¹²³⁴⁵⁶⁷⁸⁹';
  const MAX_DEPTH = 3;

  /** Builds random formula text while keeping the composition it stands for. */
  class Generator {
    text = '';
    readonly composition = new Map<string, Rational>();
    constructor(private readonly rng: Random) {}

    units(depth: number, factor: Rational): void {
      const count = this.rng.int(1, 3);
      for (let i = 0; i < count; i++) this.unit(depth, factor);
    }

    unit(depth: number, factor: Rational): void {
      const subscript = this.rng.chance(0.4) ? 1 : this.rng.int(1, 15);
      const written = subscript === 1 && this.rng.chance(0.8) ? '' : this.subscriptText(subscript);
      const inner = factor.mul(Rational.of(subscript));
      if (depth < MAX_DEPTH && this.rng.chance(0.25)) {
        const [open, close] = this.rng.pick([['(', ')'], ['[', ']']]);
        // The subscript is written after the group but applies to everything in it.
        this.text += open;
        this.units(depth + 1, inner);
        this.text += close + written;
      } else {
        const symbol = this.rng.pick(SYMBOLS);
        this.text += symbol + written;
        this.composition.set(symbol, (this.composition.get(symbol) ?? Rational.ZERO).add(inner));
      }
    }

    subscriptText(n: number): string {
      const ascii = String(n);
      return this.rng.chance(0.3) ? [...ascii].map((d) => SUBSCRIPT_DIGITS[Number(d)]).join('') : ascii;
    }

    chargeText(charge: number): string {
      if (charge === 0 || this.rng.chance(0.7)) return formatFormulaCharge(charge);
      const size = Math.abs(charge);
      const digits = size === 1 ? '' : [...String(size)].map((d) => SUPERSCRIPT_DIGITS[Number(d)]).join('');
      return digits + (charge > 0 ? '⁺' : '⁻');
    }
  }

  // Property test: random formulas built from known compositions (random elements,
  // nested groups, hydrate parts with integer/decimal/fraction multipliers, caret or
  // superscript charges) parse back to exactly that composition, order and charge.
  it('parses generated formulas back to their composition and charge', () => {
    const rng = new Random(1789);
    const CASES = 400;
    for (let i = 0; i < CASES; i++) {
      const gen = new Generator(rng);
      gen.units(0, Rational.ONE);
      const parts = rng.int(0, 2);
      for (let p = 0; p < parts; p++) {
        gen.text += rng.pick(SEPARATORS);
        const multiplierText = rng.chance(0.3) ? '' : rng.pick(MULTIPLIERS);
        gen.text += multiplierText;
        gen.units(0, multiplierText === '' ? Rational.ONE : (Rational.parse(multiplierText) ?? Rational.ZERO));
      }
      const charge = rng.int(-4, 4);
      gen.text += gen.chargeText(charge);

      const result = parseFormula(gen.text);
      if (!result.ok) throw new Error(`${gen.text}: ${result.problems[0].message}`);
      const expected = [...gen.composition].map(([s, c]) => [s, c.toString()]);
      expect(entries(result.formula), gen.text).toEqual(expected);
      expect(result.formula.charge, gen.text).toBe(charge);
      expect(Number.isFinite(result.formula.molarMass)).toBe(true);
    }
  });

  // Property test: arbitrary junk never throws, and every problem has a sane range.
  it('never throws and keeps problem offsets inside the text', () => {
    const rng = new Random(4242);
    const ALPHABET = ['H', 'O', 'C', 'l', 'a', 'X', '2', '0', '₂', '³', '⁺', '⁻', '(', ')', '[', ']', '^', '+', '-', '·', '.', '/', ' ', 'e', '%'];
    const CASES = 500;
    for (let i = 0; i < CASES; i++) {
      const text = Array.from({ length: rng.int(0, 12) }, () => rng.pick(ALPHABET)).join('');
      const result = parseFormula(text);
      for (const p of result.problems) {
        expect(p.start, text).toBeGreaterThanOrEqual(0);
        expect(p.end, text).toBeGreaterThanOrEqual(p.start);
        expect(p.end, text).toBeLessThanOrEqual(text.length);
        expect(p.message.length).toBeGreaterThan(0);
      }
      if (result.ok) {
        expect(result.problems).toEqual([]);
        expect(Number.isFinite(result.formula.molarMass)).toBe(true);
      } else {
        expect(result.problems).toHaveLength(1);
      }
    }
  });
});
