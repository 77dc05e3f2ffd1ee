// Formatting: the layout it produces, and that it never changes meaning. Every
// example and fixture is formatted and re-analysed; the diagnostics (codes and
// messages), balances and batch results must be identical, and formatting
// twice must change nothing more.
import { readdirSync, readFileSync } from 'node:fs';
import { join, relative, resolve } from 'node:path';
import { describe, expect, it } from 'vitest';
import { analyse, type Analysis } from '../../server/src/notebook/ide/analysis';
import { formatting } from '../../server/src/notebook/ide/formatting';

const ROOT = resolve(__dirname, '../..');

function format(text: string, start?: number, end?: number): string {
  let out = text;
  for (const e of [...formatting(analyse(text), start, end)].sort((a, b) => b.start - a.start)) out = out.slice(0, e.start) + e.newText + out.slice(e.end);
  return out;
}

/** What a notebook means: diagnostics, balances and batch results, without positions. */
function meaning(a: Analysis): unknown {
  return {
    diagnostics: a.diagnostics.map((d) => `${d.code}: ${d.message}`),
    reactions: a.model.reactions.map((r) => ({ label: r.label, balanced: r.balance?.balanced, terms: r.terms.map((t) => `${t.side} ${t.coefficient?.toString()} ${t.species?.key}`) })),
    batches: [...a.results.entries()].map(([b, r]) => ({ name: b.name, status: r.status, n: r.equilibrium.map((x) => x.toPrecision(12)) })),
  };
}

function notebooks(dir: string): string[] {
  const out: string[] = [];
  for (const e of readdirSync(dir, { withFileTypes: true })) {
    const p = join(dir, e.name);
    if (e.isDirectory()) out.push(...notebooks(p));
    else if (e.name.endsWith('.eqnb')) out.push(p);
  }
  return out;
}

describe('formatting never changes meaning', () => {
  const files = [...notebooks(join(ROOT, 'examples')), ...notebooks(join(ROOT, 'test/fixtures'))];
  it('has notebooks to format', () => expect(files.length).toBeGreaterThan(20));
  for (const f of files) {
    it(relative(ROOT, f), () => {
      const text = readFileSync(f, 'utf8').replace('$0', '');
      const formatted = format(text);
      expect(meaning(analyse(formatted))).toEqual(meaning(analyse(text)));
      expect(format(formatted)).toBe(formatted); // idempotent
      expect(formatted.split('\n').length).toBe(text.split('\n').length); // lines are never added or removed
    });
  }
});

describe('the layout', () => {
  const messy = [
    'species  acid=C6H12O2(l)   # hexanoic acid',
    'species EtOH = C2H5OH (l)',
    'esterify:acid + EtOH<=>C8H16O2(l) +  H2O(l)',
    '  K=4.0 at 60 °C',
    '    ΔH° = -4.5 kJ/mol # illustrative',
    '2H2(g) +  O2(g)  ->  2H2O(l)',
    'batch t at 60 °C,1 atm',
    '  acid 1.0 mol',
    '  EtOH   3 equiv',
    '  uses esterify',
    '',
  ].join('\n');

  it('puts single spaces around =, + and arrows, and after a coefficient; aligns property values and amounts', () => {
    expect(format(messy)).toBe(
      [
        'species acid = C6H12O2(l)  # hexanoic acid',
        'species EtOH = C2H5OH (l)',
        'esterify: acid + EtOH <=> C8H16O2(l) + H2O(l)',
        '  K   = 4.0 at 60 °C',
        '  ΔH° = -4.5 kJ/mol  # illustrative',
        '2 H2(g) + O2(g) -> 2 H2O(l)',
        'batch t at 60 °C, 1 atm',
        '  acid 1.0 mol',
        '  EtOH   3 equiv',
        '  uses esterify',
        '',
      ].join('\n'),
    );
  });

  it('leaves a line with a syntax error exactly as written', () => {
    const text = 'A  +  B  C -> D\nH2 +  O2 -> H2O\n';
    expect(format(text)).toBe('A  +  B  C -> D\nH2 + O2 -> H2O\n');
  });

  it('formats only the lines a range touches', () => {
    const lines = messy.split('\n');
    const secondLineStart = lines[0].length + 1;
    const out = format(messy, secondLineStart + lines[1].length + 1, secondLineStart + lines[1].length + 5).split('\n');
    expect(out[0]).toBe(lines[0]);
    expect(out[2]).toBe('esterify: acid + EtOH <=> C8H16O2(l) + H2O(l)');
    expect(out[5]).toBe(lines[5]);
  });
});
