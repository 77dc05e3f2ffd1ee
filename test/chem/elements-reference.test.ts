// Cross-checks of every row of the element table (server/src/chem/elements-data.ts) against
// two references that `npm install` alone provides:
// - test/fixtures/reference/iupac-2021-atomic-weights.tsv: the IUPAC 2021 table (CIAAW),
//   typed in by hand independently of elements-data.ts; its header says how and from what;
// - the npm package chemical-elements (devDependency, pinned exactly), an independent
//   element-data library whose weights come from the NIST isotopic-composition compilation.
// The optional third reference, python3-periodictable, is in elements.test.ts.
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { elements as pkgElements, elementsAndIsotopes as pkgElementsAndIsotopes } from 'chemical-elements';
import { describe, it, expect } from 'vitest';
import { ELEMENTS, elementBySymbol, type ElementInfo } from '../../server/src/chem/elements';
import { FIXTURES_DIR } from '../support/fixtures';

function el(symbol: string): ElementInfo {
  const e = elementBySymbol(symbol);
  if (!e) throw new Error(`element ${symbol} missing from the table`);
  return e;
}

// ---- the IUPAC 2021 fixture ----------------------------------------------------------------

/** A standard atomic weight as published: a value with its expanded uncertainty, or an interval. */
type Standard =
  | { kind: 'value'; value: number; uncertainty: number; low: number; high: number }
  | { kind: 'interval'; low: number; high: number };

interface FixtureRow {
  line: number;
  z: number;
  symbol: string;
  name: string;
  standard: Standard | undefined;
  abridged: { value: number; uncertainty: number } | undefined;
  source: string;
}

const FIXTURE_PATH = join(FIXTURES_DIR, 'reference', 'iupac-2021-atomic-weights.tsv');

/** Digits after the decimal point of a decimal numeral. */
function decimals(numeral: string): number {
  return numeral.split('.')[1]?.length ?? 0;
}

function parseStandard(text: string, where: string): Standard | undefined {
  if (text === '-') return undefined;
  const interval = /^\[(\d+\.\d+), (\d+\.\d+)\]$/.exec(text);
  if (interval) return { kind: 'interval', low: Number(interval[1]), high: Number(interval[2]) };
  const value = /^(\d+\.\d+)\((\d+)\)$/.exec(text);
  if (value) {
    const v = Number(value[1]);
    // The parenthesised digits are the uncertainty in the last digits: 55.845(2) is ±0.002.
    const u = Number(value[2]) / 10 ** decimals(value[1]);
    return { kind: 'value', value: v, uncertainty: u, low: v - u, high: v + u };
  }
  throw new Error(`${where}: unreadable standard atomic weight '${text}'`);
}

function parseAbridged(text: string, where: string): FixtureRow['abridged'] {
  if (text === '-') return undefined;
  const m = /^(\d+(?:\.\d+)?)±(\d+\.\d+)$/.exec(text);
  if (!m) throw new Error(`${where}: unreadable abridged value '${text}'`);
  return { value: Number(m[1]), uncertainty: Number(m[2]) };
}

function readFixture(): FixtureRow[] {
  const lines = readFileSync(FIXTURE_PATH, 'utf8').split('\n');
  const rows: FixtureRow[] = [];
  let header: string | undefined;
  lines.forEach((line, i) => {
    if (line === '' || line.startsWith('#')) return;
    if (header === undefined) {
      header = line;
      return;
    }
    const where = `${FIXTURE_PATH}:${i + 1}`;
    const cells = line.split('\t');
    if (cells.length !== 6) throw new Error(`${where}: ${cells.length} columns, expected 6`);
    const [z, symbol, name, standard, abridged, source] = cells;
    rows.push({
      line: i + 1,
      z: Number(z),
      symbol,
      name,
      standard: parseStandard(standard, where),
      abridged: parseAbridged(abridged, where),
      source,
    });
  });
  expect(header).toBe('z\tsymbol\tname\tstandard\tabridged\tsource');
  return rows;
}

const FIXTURE = readFixture();

function fixtureRow(symbol: string): FixtureRow {
  const row = FIXTURE.find((r) => r.symbol === symbol);
  if (!row) throw new Error(`the IUPAC 2021 fixture has no row for ${symbol}`);
  return row;
}

/** Floating-point slack for comparing decimals that were parsed separately. */
const FLOAT_SLACK = 1e-12;

describe('the IUPAC 2021 fixture itself', () => {
  it('has the 118 elements in order of Z, each with a named source', () => {
    expect(FIXTURE.map((r) => r.z)).toEqual(Array.from({ length: 118 }, (_, i) => i + 1));
    for (const r of FIXTURE) expect(['CIAAW-2021-table', 'from-memory'], `line ${r.line}`).toContain(r.source);
  });

  it('gives 84 standard atomic weights, 14 of them intervals, and an abridged value exactly where there is one', () => {
    // IUPAC 2021 (CIAAW): 84 elements have a standard atomic weight, 14 of them as an interval
    expect(FIXTURE.filter((r) => r.standard).length).toBe(84);
    expect(FIXTURE.filter((r) => r.standard?.kind === 'interval').length).toBe(14);
    for (const r of FIXTURE) expect(r.abridged === undefined, `line ${r.line}`).toBe(r.standard === undefined);
  });

  it('has each standard value or interval inside its abridged value ± uncertainty', () => {
    // The abridged table's ranges cover the full table's (CIAAW, abridged table notes). The two
    // columns were typed separately, so this catches a slip in either.
    const problems: string[] = [];
    for (const r of FIXTURE) {
      if (!r.standard || !r.abridged) continue;
      const lo = r.abridged.value - r.abridged.uncertainty - FLOAT_SLACK;
      const hi = r.abridged.value + r.abridged.uncertainty + FLOAT_SLACK;
      if (r.standard.low < lo || r.standard.high > hi) {
        problems.push(`${r.symbol} (line ${r.line}): [${r.standard.low}, ${r.standard.high}] not inside ${lo}..${hi}`);
      }
    }
    expect(problems).toEqual([]);
  });

  it('gives abridged values to at most five significant figures', () => {
    for (const r of FIXTURE) {
      if (!r.abridged) continue;
      const digits = r.abridged.value.toString().replace('.', '').replace(/^0+/, '');
      expect(digits.length, `${r.symbol} ${r.abridged.value}`).toBeLessThanOrEqual(5);
    }
  });
});

describe('element table: cross-check against the IUPAC 2021 fixture', () => {
  it('every element row has the fixture\'s Z, symbol and name', () => {
    const ours = ELEMENTS.filter((e) => e.weightKind !== 'isotope');
    expect(ours.map((e) => [e.z, e.symbol, e.name])).toEqual(FIXTURE.map((r) => [r.z, r.symbol, r.name]));
  });

  it('uses a mass number exactly where IUPAC 2021 gives no standard atomic weight', () => {
    for (const r of FIXTURE) {
      expect(el(r.symbol).weightKind === 'mass-number', r.symbol).toBe(r.standard === undefined);
    }
  });

  it('has each single-valued standard atomic weight exactly as published', () => {
    const problems: string[] = [];
    for (const r of FIXTURE) {
      if (r.standard?.kind !== 'value') continue;
      const e = el(r.symbol);
      if (e.weightKind !== 'standard') problems.push(`${r.symbol}: weightKind ${e.weightKind}, expected standard`);
      if (e.atomicWeight !== r.standard.value) {
        problems.push(`${r.symbol}: ours ${e.atomicWeight}, IUPAC 2021 ${r.standard.value} (fixture line ${r.line})`);
      }
    }
    expect(problems).toEqual([]);
  });

  it('has the abridged (conventional) value for each interval element', () => {
    // IUPAC 2021 (CIAAW): for an interval the table gives a conventional value for calculations;
    // it equals the abridged value, and need not lie inside the interval (O 15.999 and
    // Tl 204.38 are just below theirs), only inside the abridged range.
    const problems: string[] = [];
    for (const r of FIXTURE) {
      if (r.standard?.kind !== 'interval' || !r.abridged) continue;
      const e = el(r.symbol);
      if (e.weightKind !== 'conventional') problems.push(`${r.symbol}: weightKind ${e.weightKind}, expected conventional`);
      if (e.atomicWeight !== r.abridged.value) {
        problems.push(`${r.symbol}: ours ${e.atomicWeight}, abridged ${r.abridged.value} (fixture line ${r.line})`);
      }
    }
    expect(problems).toEqual([]);
  });
});

// ---- the npm package chemical-elements --------------------------------------------------------
//
// What it carries (checked for version 2.3.3, the pinned one): for each element, the isotopes
// with their relative atomic masses and representative isotopic compositions from the NIST
// "Atomic Weights and Isotopic Compositions" compilation, and a `mass` that the package
// computes as the abundance-weighted mean of those isotopes (null for the 34 elements with no
// stable isotope and no characteristic composition). So its `mass` is the atomic weight of one
// representative material, not a tabulated standard atomic weight: it differs from the IUPAC
// 2021 value in the 5th or 6th figure for many elements (e.g. Cl 35.4529 vs 35.45).
//
// Tolerance: a representative material's atomic weight lies within the range IUPAC 2021 gives
// for normal materials. So ours and the package's must agree within that range's half-width:
// the expanded uncertainty of a single value (Fe 55.845(2): 0.002), or for an interval element
// (where ours is the conventional value) the abridged uncertainty (Cl 35.45±0.01: 0.01). This
// catches a typo in any figure that IUPAC 2021 itself claims. The exceptions are listed below,
// each with its own bound and the reason.

/** Elements where the package's composition predates the IUPAC 2021 value; `bound` is absolute. */
const PACKAGE_WEIGHT_EXCEPTIONS: Record<string, { bound: number; reason: string }> = {
  Se: {
    bound: 0.015,
    reason:
      'package 78.9594 from a representative composition older than the CIAAW 2013 revision ' +
      '78.96(3) -> 78.971(8) (IUPAC 2013 report); it lies within the old 78.96(3)',
  },
  Hg: {
    bound: 0.008,
    reason:
      'package 200.5992 from a representative composition older than the CIAAW revision ' +
      '200.59(2) -> 200.592(3) (from memory: 2011); it lies within the old 200.59(2)',
  },
  Y: {
    bound: 5e-6,
    reason:
      'monoisotopic: package 88.9058403 is the 89Y mass of an older atomic mass evaluation; ' +
      'IUPAC 2021 updated it to 88.905838(2) from AME2020 (IUPAC 2021 report: Y changed in 2017 and 2021)',
  },
};

/** Relative tolerance for D and T: ours are AME2020 masses rounded to 10 figures (elements-data.ts). */
const ISOTOPE_RELATIVE_TOLERANCE = 1e-8;

function pkgElement(symbol: string): (typeof pkgElements)[number] {
  const e = pkgElements.find((x) => x.symbol === symbol);
  if (!e) throw new Error(`chemical-elements has no element ${symbol}`);
  return e;
}

/** The IUPAC 2021 half-width the two may differ by (see the tolerance note above). */
function iupacHalfWidth(r: FixtureRow): number {
  if (!r.standard || !r.abridged) throw new Error(`${r.symbol} has no standard atomic weight`);
  return r.standard.kind === 'value' ? r.standard.uncertainty : r.abridged.uncertainty;
}

describe('element table: cross-check against the npm package chemical-elements', () => {
  it('gives all 118 elements with our Z and symbols', () => {
    expect(pkgElements.map((e) => [e.number, e.symbol])).toEqual(
      ELEMENTS.filter((e) => e.weightKind !== 'isotope').map((e) => [e.z, e.symbol]),
    );
  });

  it('every name matches, apart from the package\'s capital first letter', () => {
    // chemical-elements capitalises names ('Aluminium') and uses the IUPAC spellings
    // (aluminium, caesium, sulfur), so there are no spelling differences to list.
    const mismatches = pkgElements
      .filter((p) => p.name.toLowerCase() !== el(p.symbol).name)
      .map((p) => `${p.symbol}: ours '${el(p.symbol).name}', package '${p.name}'`);
    expect(mismatches).toEqual([]);
  });

  it('has no weight exactly for our 34 mass-number elements', () => {
    for (const p of pkgElements) {
      expect(p.mass === null, p.symbol).toBe(el(p.symbol).weightKind === 'mass-number');
    }
  });

  it('every atomic weight agrees within the IUPAC 2021 range, or within its listed bound', () => {
    const problems: string[] = [];
    for (const p of pkgElements) {
      if (p.mass === null) continue;
      const e = el(p.symbol);
      const diff = Math.abs(e.atomicWeight - p.mass);
      const exception = PACKAGE_WEIGHT_EXCEPTIONS[p.symbol];
      const halfWidth = iupacHalfWidth(fixtureRow(p.symbol));
      if (exception) {
        if (diff > exception.bound) {
          problems.push(`${p.symbol}: ours ${e.atomicWeight}, package ${p.mass}: |difference| ${diff} > listed ${exception.bound} (${exception.reason})`);
        }
        if (diff <= halfWidth + FLOAT_SLACK) {
          problems.push(`${p.symbol}: listed as an exception but agrees within ${halfWidth}; remove it from the list`);
        }
      } else if (diff > halfWidth + FLOAT_SLACK) {
        problems.push(`${p.symbol}: ours ${e.atomicWeight}, package ${p.mass}: |difference| ${diff.toExponential(2)} > ${halfWidth}`);
      }
    }
    expect(problems).toEqual([]);
  });

  it('D and T match the package\'s 2H and 3H masses', () => {
    const hydrogen = pkgElementsAndIsotopes.find((x) => x.symbol === 'H');
    for (const [symbol, nominal] of [['D', 2], ['T', 3]] as const) {
      const isotope = hydrogen?.isotopes.find((i) => i.nominal === nominal);
      if (!isotope) throw new Error(`chemical-elements has no hydrogen-${nominal}`);
      const ours = el(symbol).atomicWeight;
      expect(Math.abs(ours - isotope.mass) / isotope.mass, symbol).toBeLessThan(ISOTOPE_RELATIVE_TOLERANCE);
    }
  });

  it('every listed exception names a known symbol with a weight and a reason', () => {
    for (const [symbol, { reason }] of Object.entries(PACKAGE_WEIGHT_EXCEPTIONS)) {
      expect(pkgElement(symbol).mass, symbol).not.toBeNull();
      expect(reason.length).toBeGreaterThan(10);
    }
  });
});
