// Quick fixes (server/src/notebook/ide/actions.ts): applying the balance fix and
// both readings of an ambiguous charge to the text, then re-analysing; and a
// seeded property test that balances random equations with the preferred fix.
import { describe, expect, it } from 'vitest';
import { codeActions, type CodeAction } from '../../server/src/notebook/ide/actions';
import { analyse, type Analysis } from '../../server/src/notebook/ide/analysis';
import type { Fix } from '../../server/src/notebook/semantic/codes';
import { gcd } from '../../server/src/chem/rational';
import { toCrlf } from '../support/fixtures';
import { Random } from '../support/random';

/** The text with the fix's edits applied (edits do not overlap; applied from the end). */
function applyFix(text: string, fix: Fix): string {
  let out = text;
  for (const e of [...fix.edits].sort((a, b) => b.start - a.start)) out = out.slice(0, e.start) + e.newText + out.slice(e.end);
  return out;
}

function codes(a: Analysis): string[] {
  return a.diagnostics.map((d) => d.code);
}

/** The quick fixes offered at the start of the given 0-based line (an empty range there). */
function actionsOnLine(a: Analysis, line: number): CodeAction[] {
  const at = a.lines.lineStart(line);
  const end = line + 1 < a.lines.lineCount ? a.lines.lineStart(line + 1) - 1 : a.text.length;
  return codeActions(a, at, end);
}

function lineOf(text: string, line: number): string {
  return text.split(/\r?\n/)[line];
}

const UNBALANCED = ['unbalanced-elements', 'unbalanced-charge'];

describe('the balance quick fix', () => {
  it.each([
    {
      what: 'combustion of propane, standard general-chemistry textbook example (1, 5, 3, 4); label, phases and note kept',
      before: 'combust: C3H8(g) + O2(g) -> CO2(g) + H2O(g)   # burner',
      after: 'combust: C3H8(g) + 5 O2(g) -> 3 CO2(g) + 4 H2O(g)   # burner',
    },
    {
      what: 'permanganate-iron(II) titration, standard general-chemistry textbook redox example (1, 5, 8, 1, 5, 4)',
      before: 'MnO4^- + Fe^2+ + H^+ -> Mn^2+ + Fe^3+ + H2O',
      after: 'MnO4^- + 5 Fe^2+ + 8 H^+ -> Mn^2+ + 5 Fe^3+ + 4 H2O',
    },
    {
      what: 'copper plating half-reaction, standard general-chemistry textbook example (charge only: Cu^2+ + 2 e- -> Cu)',
      before: 'plate: Cu^2+(aq) + e- -> Cu(s)',
      after: 'plate: Cu^2+(aq) + 2 e- -> Cu(s)',
    },
    {
      what: 'synthesis of water, standard general-chemistry textbook example: 2 H2 + O2 -> 2 H2O (a wrong multiple is reduced)',
      before: '2 H2(g) + 2 O2(g) -> 2 H2O(l)',
      after: '2 H2(g) + O2(g) -> 2 H2O(l)',
    },
    {
      what: 'ammonia synthesis (Haber process), standard general-chemistry textbook example: fractions become N2 + 3 H2 -> 2 NH3',
      before: '1/2 N2(g) + H2(g) ⇌ NH3(g)',
      after: 'N2(g) + 3 H2(g) ⇌ 2 NH3(g)',
    },
    {
      what: 'copper in dilute nitric acid, standard general-chemistry textbook redox example (3, 8, 3, 2, 4); Unicode arrow and detached phase kept',
      before: 'Cu (s) + HNO3(aq) → Cu(NO3)2(aq) + NO(g) + H2O(l)',
      after: '3 Cu (s) + 8 HNO3(aq) → 3 Cu(NO3)2(aq) + 2 NO(g) + 4 H2O(l)',
    },
  ])('$what', ({ before, after }) => {
    for (const crlf of [false, true]) {
      const text = (crlf ? toCrlf : (t: string) => t)(`# invented scenario: "Sedge Farm" notes\n${before}\nbatch x at 25 °C\n`);
      const a = analyse(text);
      const fixes = actionsOnLine(a, 1).filter((f) => UNBALANCED.includes(f.diagnostic.code));
      expect(fixes).toHaveLength(1);
      expect(fixes[0].preferred).toBe(true);
      expect(UNBALANCED).toContain(fixes[0].diagnostic.code);
      const fixed = applyFix(text, fixes[0]);
      expect(lineOf(fixed, 1)).toBe(after);
      // Only the equation changed: the lines around it are untouched.
      expect(lineOf(fixed, 0)).toBe(lineOf(text, 0));
      expect(lineOf(fixed, 2)).toBe(lineOf(text, 2));
      const again = analyse(fixed);
      expect(codes(again)).toEqual([]);
      expect(again.model.reactions[0].balance?.balanced).toBe(true);
    }
  });

  it('keeps declared names as written', () => {
    // esterification with declared species: balanced as 1, 1, 1, 1 (standard general-chemistry textbook example),
    // so write it with a wrong coefficient first.
    const text = 'species acid = C2H4O2 (l)\nspecies EtOH = C2H6O (l)\nesterify: 2 acid + EtOH <=> C4H8O2(l) + H2O(l)\n';
    const a = analyse(text);
    const [fix] = actionsOnLine(a, 2);
    expect(fix.title).toContain('acid + EtOH <=> C4H8O2(l) + H2O(l)');
    expect(lineOf(applyFix(text, fix), 2)).toBe('esterify: acid + EtOH <=> C4H8O2(l) + H2O(l)');
  });

  it('is offered for a range anywhere on the equation, and not for a range on another line', () => {
    const text = 'H2 + O2 -> H2O\nspecies w = H2O (l)\n';
    const a = analyse(text);
    for (let offset = 0; offset <= 14; offset++) expect(codeActions(a, offset, offset).length, `offset ${offset}`).toBe(1);
    expect(codeActions(a, 16, 20)).toEqual([]);
  });

  it('is not offered when no balance or several balances exist', () => {
    // carbon only on the right (no positive balance); water and hydrogen peroxide from the elements (two balances)
    for (const equation of ['H2 + O2 -> H2O + CO2', 'H2 + O2 -> H2O + H2O2', 'Fe^2+ -> Fe^3+']) {
      const a = analyse(`${equation}\n`);
      expect(codes(a).some((c) => c === 'no-balance' || c === 'several-balances'), equation).toBe(true);
      expect(codeActions(a, 0, equation.length), equation).toEqual([]);
    }
  });

  it('is not offered for an equation that is balanced as written (rescaling would change its K)', () => {
    const text = '4 H2(g) + 2 O2(g) -> 4 H2O(g)\n  K = 1e80 at 25 °C\n';
    const a = analyse(text);
    expect(codes(a)).toEqual([]);
    expect(codeActions(a, 0, text.length)).toEqual([]);
  });
});

describe('the ambiguous-charge quick fixes', () => {
  it('offer both readings of a declaration; each removes the warning', () => {
    const text = 'species ion = Fe3+ (aq)   # iron, but which charge?\n';
    const a = analyse(text);
    expect(codes(a)).toEqual(['ambiguous-charge']);
    const fixes = actionsOnLine(a, 0);
    expect(fixes.map((f) => f.preferred)).toEqual([false, false]);
    const results = fixes.map((f) => lineOf(applyFix(text, f), 0));
    expect(results).toEqual(['species ion = Fe^3+ (aq)   # iron, but which charge?', 'species ion = Fe3^+ (aq)   # iron, but which charge?']);
    for (const f of fixes) expect(codes(analyse(applyFix(text, f)))).toEqual([]);
    // The two readings mean different species: Fe with charge 3+, or Fe3 with charge 1+.
    const readings = fixes.map((f) => analyse(applyFix(text, f)).model.speciesList[0].formula);
    expect(readings.map((r) => [r?.composition.get('Fe')?.toString(), r?.charge])).toEqual([
      ['1', 3],
      ['3', 1],
    ]);
  });

  it('in a reaction term: one reading balances, the other is then checked and found unbalanced', () => {
    // iron(III) reduction half-reaction, standard general-chemistry textbook example: Fe^3+ + e- -> Fe^2+
    const text = 'Fe3+(aq) + e- -> Fe^2+(aq)\n';
    const a = analyse(text);
    expect(codes(a)).toEqual(['ambiguous-charge']);
    const [chargeThree, chargeOne] = actionsOnLine(a, 0);
    const first = applyFix(text, chargeThree);
    expect(lineOf(first, 0)).toBe('Fe^3+(aq) + e- -> Fe^2+(aq)');
    expect(codes(analyse(first))).toEqual([]);
    const second = applyFix(text, chargeOne);
    expect(lineOf(second, 0)).toBe('Fe3^+(aq) + e- -> Fe^2+(aq)');
    // Fe3^+ + e- -> Fe^2+ has Fe 3 left, 1 right (counted by hand): the balance is now checked.
    expect(codes(analyse(second))).not.toContain('ambiguous-charge');
    expect(codes(analyse(second))).toContain('unbalanced-elements');
  });

  it('reads the last digit as the charge when several digits precede the sign', () => {
    // sulfate is SO4 with charge 2- (common practice); the other reading is SO42 with charge 1-
    const text = 'species sulfate = SO42- (aq)\n';
    const fixes = actionsOnLine(analyse(text), 0);
    expect(fixes.map((f) => lineOf(applyFix(text, f), 0))).toEqual(['species sulfate = SO4^2- (aq)', 'species sulfate = SO42^- (aq)']);
  });
});

// ---- property test: random balanceable equations ---------------------------------------------

const ELEMENT_POOL = ['H', 'C', 'N', 'O', 'S', 'Cl', 'Na', 'Fe', 'Cu', 'K'] as const;
type Composition = Map<string, number>;

interface GeneratedSpecies {
  readonly composition: Composition;
  readonly charge: number;
}

function formulaText(s: GeneratedSpecies): string {
  let text = '';
  for (const el of ELEMENT_POOL) {
    const n = s.composition.get(el) ?? 0;
    if (n > 0) text += n === 1 ? el : `${el}${n}`;
  }
  if (s.charge !== 0) text += `^${Math.abs(s.charge) === 1 ? '' : Math.abs(s.charge)}${s.charge > 0 ? '+' : '-'}`;
  return text;
}

function divisors(n: number): number[] {
  const out: number[] = [];
  for (let d = 1; d <= n; d++) if (n % d === 0) out.push(d);
  return out;
}

/**
 * A balanced equation: random products with random coefficients, then their total atoms and
 * charge split among random reactants, each reactant's coefficient a divisor of its share.
 */
function generateEquation(random: Random): { left: [number, GeneratedSpecies][]; right: [number, GeneratedSpecies][] } | undefined {
  const right: [number, GeneratedSpecies][] = [];
  const total = new Map<string, number>();
  let totalCharge = 0;
  for (let j = random.int(1, 3); j > 0; j--) {
    const composition: Composition = new Map();
    for (const el of random.sample(ELEMENT_POOL, random.int(1, 3))) composition.set(el, random.int(1, 4));
    const charge = random.chance(0.3) ? random.int(-2, 2) : 0;
    const d = random.int(1, 3);
    right.push([d, { composition, charge }]);
    for (const [el, n] of composition) total.set(el, (total.get(el) ?? 0) + d * n);
    totalCharge += d * charge;
  }
  const m = random.int(1, 3);
  const shares: Composition[] = Array.from({ length: m }, () => new Map());
  const atoms = [...total].flatMap(([el, n]) => Array.from({ length: n }, () => el));
  if (atoms.length < m) return undefined;
  // Every reactant gets at least one atom, the rest go anywhere.
  const order = random.sample(atoms, atoms.length);
  order.forEach((el, k) => {
    const share = shares[k < m ? k : random.int(0, m - 1)];
    share.set(el, (share.get(el) ?? 0) + 1);
  });
  const left: [number, GeneratedSpecies][] = shares.map((share, i) => {
    const charge = i === 0 ? totalCharge : 0;
    const g = [...share.values(), Math.abs(charge)].reduce((a, b) => Number(gcd(BigInt(a), BigInt(b))), 0);
    const c = random.pick(divisors(g));
    const composition: Composition = new Map([...share].map(([el, n]) => [el, n / c]));
    return [c, { composition, charge: charge / c }];
  });
  const texts = [...left, ...right].map(([, s]) => formulaText(s));
  if (new Set(texts).size !== texts.length) return undefined; // the same species twice: not this test's subject
  return { left, right };
}

describe('property: the preferred fix balances random balanceable equations', () => {
  it('for 300 seeded equations: scrambled to coefficient 1, fixed, re-analysed, every element and the charge conserved', () => {
    let fixedCount = 0;
    let severalCount = 0;
    let alreadyBalanced = 0;
    for (let seed = 1; seed <= 300; seed++) {
      const random = new Random(seed);
      const eq = generateEquation(random);
      if (!eq) continue;
      const arrow = random.pick(['->', '<=>', '→', '⇌']);
      const phase = (): string => random.pick(['', '', '(g)', '(aq)', ' (l)']);
      const terms = [...eq.left, ...eq.right].map(([c, s]) => ({ c, body: `${formulaText(s)}${phase()}` }));
      const sideText = (from: number, to: number, withCoefficients: boolean): string =>
        terms
          .slice(from, to)
          .map((t) => (withCoefficients && t.c !== 1 ? `${t.c} ${t.body}` : t.body))
          .join(' + ');
      const n = eq.left.length;
      const scrambled = `${sideText(0, n, false)} ${arrow} ${sideText(n, terms.length, false)}`;
      const text = `gen-${seed}: ${scrambled}\n`;
      const context = `seed ${seed}: ${text}`;
      const a = analyse(text);
      const c = codes(a);
      expect(c, context).not.toContain('no-balance'); // a positive balance exists by construction
      if (c.length === 0) {
        alreadyBalanced++;
        expect(a.model.reactions[0].balance?.balanced, context).toBe(true);
        continue;
      }
      if (c.includes('several-balances')) {
        severalCount++;
        expect(codeActions(a, 0, text.length), context).toEqual([]);
        continue;
      }
      expect(c.every((x) => UNBALANCED.includes(x)), `${context} ${c.join(', ')}`).toBe(true);
      const preferred = codeActions(a, 0, text.length).filter((f) => f.preferred);
      expect(preferred, context).toHaveLength(1);
      const fixed = applyFix(text, preferred[0]);
      const again = analyse(fixed);
      expect(codes(again), `${context} -> ${fixed}`).toEqual([]);
      const reaction = again.model.reactions[0];
      expect(reaction.label).toBe(`gen-${seed}`);
      for (const t of reaction.balance?.tallies ?? []) {
        expect(t.left.equals(t.right), `${context}: ${t.element} ${t.left} vs ${t.right}`).toBe(true);
      }
      expect(reaction.balance?.tallies.length, context).toBeGreaterThan(0);
      // The balance is unique, so it is the generating coefficients divided by their gcd.
      const generated = terms.map((t) => t.c);
      const g = generated.reduce((x, y) => Number(gcd(BigInt(x), BigInt(y))), 0);
      const minimal = generated.map((x) => x / g);
      const expectedLine = `gen-${seed}: ${terms
        .slice(0, n)
        .map((t, i) => (minimal[i] === 1 ? t.body : `${minimal[i]} ${t.body}`))
        .join(' + ')} ${arrow} ${terms
        .slice(n)
        .map((t, i) => (minimal[n + i] === 1 ? t.body : `${minimal[n + i]} ${t.body}`))
        .join(' + ')}`;
      expect(lineOf(fixed, 0), context).toBe(expectedLine);
      fixedCount++;
    }
    // Test-strength thresholds (not chemistry): the test has teeth only if most of the 300 cases went through the fix.
    expect(fixedCount).toBeGreaterThan(150);
    expect(fixedCount + severalCount + alreadyBalanced).toBeGreaterThan(250);
  });
});
