// Hover snapshots: each test/fixtures/hover/NAME.eqnb holds a `$0` cursor (removed
// before analysis) and NAME.md beside it holds the expected Markdown, compared
// exactly (UPDATE_SNAPSHOTS=1 rewrites the .md files). The numbers in the snapshots
// were checked by hand; the checks below repeat the key ones with their sources.
// Molar masses are computed from IUPAC 2021 standard atomic weights (conventional
// values for interval elements): H 1.008, C 12.011, N 14.007, O 15.999,
// Na 22.98976928, S 32.06, Cu 63.546.
import { readdirSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { analyse } from '../../server/src/notebook/ide/analysis';
import { hover, type Hover } from '../../server/src/notebook/ide/hover';
import { FIXTURES_DIR, extractCursor, snapshotFor } from '../support/fixtures';

const HOVER_DIR = join(FIXTURES_DIR, 'hover');
const names = readdirSync(HOVER_DIR)
  .filter((f) => f.endsWith('.eqnb'))
  .map((f) => f.slice(0, -'.eqnb'.length))
  .sort();

function hoverOf(name: string): { text: string; offset: number; result: Hover | undefined } {
  const raw = readFileSync(join(HOVER_DIR, `${name}.eqnb`), 'utf8');
  const { text, offset } = extractCursor(raw, name);
  return { text, offset, result: hover(analyse(text), offset) };
}

describe('hover snapshots', () => {
  it('has the fixtures this file checks', () => {
    for (const n of ['species-declaration', 'bare-formula-term', 'reaction-arrow', 'electron', 'batch-name', 'phase', 'unit']) {
      expect(names).toContain(n);
    }
  });

  for (const name of names) {
    it(`${name}: the hover matches ${name}.md`, () => {
      const { offset, result } = hoverOf(name);
      expect(result, `${name}: no hover at the cursor`).toBeDefined();
      const markdown = `${result!.markdown}\n`;
      expect(markdown).toBe(snapshotFor(join(HOVER_DIR, `${name}.md`), markdown));
      // The hover's range contains the cursor.
      expect(result!.start).toBeLessThanOrEqual(offset);
      expect(result!.end).toBeGreaterThanOrEqual(offset);
    });
  }
});

describe('hover: ranges and numbers checked by hand', () => {
  const span = (name: string): string => {
    const { text, result } = hoverOf(name);
    return text.slice(result!.start, result!.end);
  };

  it('covers the token or equation it describes', () => {
    expect(span('species-declaration')).toBe('ester');
    expect(span('bare-formula-term')).toBe('NaHCO3');
    expect(span('reaction-arrow')).toBe('1/2 N2(g) + 3/2 H2(g) ⇌ NH3(g)');
    expect(span('electron')).toBe('e-');
    expect(span('batch-name')).toBe('trial-2');
    expect(span('phase')).toBe('(aq)');
    expect(span('unit')).toBe('atm');
  });

  it('species: molar mass and mass fractions of C8H16O2', () => {
    const md = hoverOf('species-declaration').result!.markdown;
    // computed from IUPAC 2021 atomic weights: 8 × 12.011 + 16 × 1.008 + 2 × 15.999 = 144.214 g/mol
    expect(md).toContain('Molar mass: **144.214 g/mol**');
    // computed from IUPAC 2021 atomic weights: C 96.088 / 144.214 = 66.63 %; H 16.128 / 144.214 = 11.18 %; O 31.998 / 144.214 = 22.19 %
    expect(md).toContain('| C (carbon) | 8 | 96.088 | 66.63 |');
    expect(md).toContain('| H (hydrogen) | 16 | 16.128 | 11.18 |');
    expect(md).toContain('| O (oxygen) | 2 | 31.998 | 22.19 |');
    expect(md).toContain('Density: 0.87 g/mL');
    expect(md).toContain('Purity: 98 %');
  });

  it('bare formula: NaHCO3', () => {
    const md = hoverOf('bare-formula-term').result!.markdown;
    // computed from IUPAC 2021 atomic weights: 22.98976928 + 1.008 + 12.011 + 3 × 15.999 = 84.006 g/mol
    expect(md).toContain('Molar mass: **84.006 g/mol**');
    // computed from IUPAC 2021 atomic weights: Na 22.990 / 84.006 = 27.37 %
    expect(md).toContain('| Na (sodium) | 1 | 22.990 | 27.37 |');
  });

  it('hydrate: CuSO4·5H2O', () => {
    const md = hoverOf('hydrate-declaration').result!.markdown;
    // computed from IUPAC 2021 atomic weights: 63.546 + 32.06 + 9 × 15.999 + 10 × 1.008 = 249.677 g/mol
    expect(md).toContain('Molar mass: **249.677 g/mol**');
    expect(md).toContain('| O (oxygen) | 9 | 143.991 |');
    expect(md).toContain('| H (hydrogen) | 10 | 10.080 |');
  });

  it('reaction arrow: balance table and Δn(gas)', () => {
    const md = hoverOf('reaction-arrow').result!.markdown;
    // ammonia synthesis, standard general-chemistry textbook example: 1/2 N2 + 3/2 H2 -> NH3 has N 1 = 1, H 3 = 3
    expect(md).toContain('| N | 1 | 1 | ✓ |');
    expect(md).toContain('| H | 3 | 3 | ✓ |');
    // Δn(gas) = 1 − (1/2 + 3/2) = −1 (counted by hand)
    expect(md).toContain('Δn(gas) = -1 mol per mole of reaction');
    // ΔG° = −R T ln K (closed form): at 400 °C = 673.15 K, −8.314462618 × 673.15 × ln 0.45 = +4.469 kJ/mol;
    // at 25 °C = 298.15 K, −8.314462618 × 298.15 × ln 6e5 = −32.98 kJ/mol
    expect(md).toContain('| 400 °C | 0.45 | 4.469 kJ/mol | given (K) |');
    expect(md).toContain('| 25 °C | 600000 | -32.98 kJ/mol | given (K) |');
    // Δn(gas) = −1: more pressure favours the right (Le Chatelier, common practice)
    expect(md).toContain('Higher pressure pushes it to the right');
  });

  it('unbalanced reaction arrow: the charge row is marked, and the term without a phase is named', () => {
    const md = hoverOf('reaction-arrow-unbalanced').result!.markdown;
    // Cu^2+ + e- -> Cu: charge +2 − 1 = 1 on the left, 0 on the right (counted by hand)
    expect(md).toContain('| charge | 1 | 0 | ✗ |');
    expect(md).toContain('| Cu | 1 | 1 | ✓ |');
    expect(md).toContain('Not balanced');
    expect(md).toContain('`Cu`');
  });

  it('electron', () => {
    const md = hoverOf('electron').result!.markdown;
    // CODATA 2018 electron molar mass 5.48579909065e-4 g/mol (from memory), shown to 7 significant figures
    expect(md).toContain('5.485799e-4 g/mol');
    expect(md).toContain('charge −1');
  });

  it('batch: conditions and inputs', () => {
    const md = hoverOf('batch-name').result!.markdown;
    // 75 °C = 348.15 K (0 °C = 273.15 K, from memory)
    expect(md).toContain('Temperature: 75 °C (348.15 K)');
    expect(md).toContain('Closed vessel: 1 L, of which 300 mL liquid (constant volume)');
    // computed from IUPAC 2021 atomic weights: C6H12O2 6 × 12.011 + 12 × 1.008 + 2 × 15.999 = 116.160 g/mol;
    // C2H5OH 2 × 12.011 + 6 × 1.008 + 15.999 = 46.069 g/mol
    expect(md).toContain('acid: 116 g ÷ 116.160 g/mol');
    expect(md).toContain('EtOH: 175 mL × 0.789 g/mL ÷ 46.069 g/mol');
    // 116 g ÷ 116.160 g/mol = 0.9986 mol of acid (closed form)
    expect(md).toContain('| acid | l | 0.9986 |');
  });

  it('batch with no pressure written: 1 atm by default', () => {
    const md = hoverOf('batch-default-pressure').result!.markdown;
    // the default pressure is the standard atmosphere, 1 atm = 101325 Pa (common practice)
    expect(md).toContain('Pressure: 1 atm (default: none written)');
  });

  it('unit: 1 atm in bar', () => {
    // 1 atm = 101325 Pa exactly = 1.01325 bar (common practice: definition of the standard atmosphere)
    expect(hoverOf('unit').result!.markdown).toContain('1 atm = 1.01325 bar');
  });

  it('phase: the standard state', () => {
    expect(hoverOf('phase').result!.markdown).toContain('aqueous solution');
  });
});

describe('hover: where there is nothing to say', () => {
  it('gives nothing on a note, on blank space, or past the end of the text', () => {
    const text = 'H2 + O2 -> H2O   # note\n\n';
    const a = analyse(text);
    expect(hover(a, text.indexOf('note'))).toBeUndefined();
    expect(hover(a, text.length)).toBeUndefined();
    expect(hover(a, text.indexOf('#') - 1)).toBeUndefined();
  });
});
