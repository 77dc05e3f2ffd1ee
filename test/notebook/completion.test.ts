// Completion from the line's context, tested as data: each case is a notebook
// with the cursor marked `$0` and the labels that must (and must not) be offered.
import { describe, expect, it } from 'vitest';
import { analyse } from '../../server/src/notebook/ide/analysis';
import { completions } from '../../server/src/notebook/ide/completion';

const HEAD = [
  'species acid = C6H12O2 (l)',
  'species EtOH = C2H5OH (l)',
  'esterify: acid + EtOH <=> C8H16O2(l) + H2O(l)',
  '  K = 4.0 at 60 °C',
].join('\n');

function labelsAt(textWithCursor: string): { labels: string[]; replaced: string; details: Map<string, string> } {
  const offset = textWithCursor.indexOf('$0');
  const text = textWithCursor.replace('$0', '');
  const r = completions(analyse(text), offset);
  return { labels: r.items.map((i) => i.label), replaced: text.slice(r.start, r.end), details: new Map(r.items.map((i) => [i.label, i.detail])) };
}

const CASES: { name: string; text: string; has: string[]; lacks?: string[] }[] = [
  { name: 'statement keywords and species at the start of a line', text: `${HEAD}\n$0`, has: ['species', 'batch', 'acid', 'EtOH'] },
  { name: 'species names in an equation', text: `${HEAD}\nstep2: acid + $0`, has: ['acid', 'EtOH'], lacks: ['species'] },
  { name: 'element symbols inside a formula', text: `${HEAD}\nsalt: Na$0`, has: ['Na', 'Cl', 'Fe'] },
  { name: 'element symbols in a species declaration', text: `${HEAD}\nspecies x = C$0`, has: ['C', 'Cl', 'Cu'] },
  { name: 'reaction properties under a reaction', text: `${HEAD}\n  $0`, has: ['K', 'log K', 'pK', 'Kp', 'Kc', 'ΔH°'], lacks: ['density', 'vessel'] },
  { name: 'species properties under a species', text: `species acid = C6H12O2 (l)\n  $0`, has: ['density', 'purity', 'ΔfG°'], lacks: ['K'] },
  { name: 'temperature units after `at` and a number', text: `${HEAD}\nbatch b at 60 $0`, has: ['°C', 'K'], lacks: ['mol'] },
  { name: 'pressure units after the comma of a batch header', text: `${HEAD}\nbatch b at 60 °C, 2 $0`, has: ['bar', 'atm', 'kPa'], lacks: ['°C'] },
  { name: '`at` after a batch name', text: `${HEAD}\nbatch b $0`, has: ['at'] },
  { name: 'batch keywords and species on a batch line', text: `${HEAD}\nbatch b at 60 °C\n  $0`, has: ['vessel', 'volume', 'basis', 'uses', 'acid', 'EtOH'] },
  { name: 'amount units after an amount', text: `${HEAD}\nbatch b at 60 °C\n  acid 1.0 $0`, has: ['mol', 'g', 'mL', 'equiv', 'mol/L'], lacks: ['°C'] },
  { name: 'reaction labels after `uses`', text: `${HEAD}\nbatch b at 60 °C\n  uses $0`, has: ['esterify'], lacks: ['acid'] },
  { name: 'species after `basis`', text: `${HEAD}\nbatch b at 60 °C\n  basis $0`, has: ['acid', 'EtOH'] },
  { name: 'volume units after `vessel` and a number', text: `${HEAD}\nbatch b at 60 °C\n  vessel 2 $0`, has: ['mL', 'L'], lacks: ['mol'] },
  { name: 'units for a property value', text: `species acid = C6H12O2 (l)\n  density 0.93 $0`, has: ['g/mL'] },
  { name: '`at` and `from` after a batch name', text: `${HEAD}\nbatch b $0`, has: ['at', 'from'] },
  { name: 'other batches after `from`', text: `${HEAD}\nbatch first at 60 °C\n  acid 1 mol\nbatch again from $0`, has: ['first'], lacks: ['again', 'acid'] },
  { name: 'operation lines under a follow-on batch', text: `${HEAD}\nbatch first at 60 °C\n  acid 1 mol\nbatch again from first\n  $0`, has: ['add', 'remove', 'vent', 'uses'], lacks: ['acid'] },
  { name: 'species after `remove`', text: `${HEAD}\nbatch first at 60 °C\n  acid 1 mol\nbatch again from first\n  remove $0`, has: ['acid', 'EtOH'] },
  { name: '`%` and amount units after a removed amount', text: `${HEAD}\nbatch first at 60 °C\n  acid 1 mol\nbatch again from first\n  remove acid 50 $0`, has: ['%', 'mol', 'g'] },
  { name: '`to` after `vent`', text: `${HEAD}\nbatch first at 60 °C\n  acid 1 mol\nbatch again from first\n  vent $0`, has: ['to'] },
  { name: 'nothing inside a note', text: `${HEAD}\n# a note $0`, has: [] },
];

describe('completion', () => {
  for (const c of CASES) {
    it(c.name, () => {
      const { labels } = labelsAt(c.text);
      for (const l of c.has) expect(labels).toContain(l);
      for (const l of c.lacks ?? []) expect(labels).not.toContain(l);
      if (c.has.length === 0) expect(labels).toEqual([]);
    });
  }

  it('replaces the partial word before the cursor', () => {
    expect(labelsAt(`${HEAD}\nstep2: ac$0`).replaced).toBe('ac');
    expect(labelsAt(`${HEAD}\nbatch b at 60 °C\n  acid 1.0 mm$0`).replaced).toBe('mm');
  });

  it('gives a species its formula and molar mass as detail', () => {
    // C6H12O2: 6 × 12.011 + 12 × 1.008 + 2 × 15.999 = 116.160 g/mol (IUPAC 2021 atomic weights)
    expect(labelsAt(`${HEAD}\n$0`).details.get('acid')).toBe('C6H12O2 (l), 116.160 g/mol');
  });

  it('gives an element its name and standard atomic weight as detail', () => {
    expect(labelsAt(`${HEAD}\nsalt: Na$0`).details.get('Cl')).toBe('chlorine, 35.45 g/mol'); // IUPAC 2021 conventional value
  });
});
