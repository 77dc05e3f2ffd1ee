// Heat and gas of a batch: heat released from ΔH° and the extents, the
// adiabatic temperature rise, gas given off (as off-gas at 1 atm and 25 °C),
// and the cautions that go with them. Checked against closed forms.
import { describe, expect, it } from 'vitest';
import { enthalpyAt } from '../../server/src/chem/thermo';
import { analyse } from '../../server/src/notebook/ide/analysis';
import { batchReport } from '../../server/src/notebook/ide/batch-report';
import { runCli } from '../../server/src/cli/commands';
import { mkdtempSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { tmpdir } from 'node:os';

const R = 8.314462618; // J/(mol K), exact in the 2019 SI (CODATA 2018)
const rel = (a: number, b: number): number => Math.abs(a - b) / Math.abs(b);

// Esterification with K = 4 from a 1:1 start converts 2/3 (closed form, classic textbook example).
const ESTER = (extra: string[] = [], batchExtra: string[] = []): string =>
  [
    'species acid = C6H12O2 (l)',
    'species EtOH = C2H5OH (l)',
    ...extra,
    'esterify: acid + EtOH <=> C8H16O2(l) + H2O(l)',
    '  K = 4.0 at 60 °C',
    '  ΔH° = -4.5 kJ/mol',
    'batch b at 60 °C',
    '  acid 1.0 mol',
    '  EtOH 1.0 mol',
    ...batchExtra,
    '',
  ].join('\n');

function only(text: string) {
  const a = analyse(text);
  const batch = a.model.batches[0];
  return { a, batch, result: a.results.get(batch)!, report: batchReport(a, batch) };
}

describe('heat released', () => {
  it('is −ΔH° × extent: 4.5 kJ/mol × 2/3 mol = 3.0 kJ (closed form)', () => {
    const { result, report } = only(ESTER());
    expect(rel(result.heat.released!, 4500 * (2 / 3))).toBeLessThan(1e-9);
    expect(report.summary.some((s) => s.startsWith('Heat released at equilibrium: **3 kJ**'))).toBe(true);
  });

  it('is not claimed when a used reaction has no ΔH°, and the report says which', () => {
    const { result, report } = only(ESTER().replace('  ΔH° = -4.5 kJ/mol\n', ''));
    expect(result.heat.released).toBeUndefined();
    expect(result.heat.unknown).toEqual(['esterify']);
    expect(report.summary).toContain('Heat: not known; give ΔH° to `esterify`');
  });

  it('moves ΔH° with ΔCp° from the temperature of the nearest K (Kirchhoff, closed form)', () => {
    expect(enthalpyAt({ points: [{ lnK: 0, T: 333.15, written: 'K' }], dH: -4500, dCp: -20 }, 353.15)).toBeCloseTo(-4500 + -20 * 20, 9);
    expect(enthalpyAt({ points: [], dH: -4500, dCp: -20 }, 308.15)).toBeCloseTo(-4500 + -20 * 10, 9); // from 298.15 K
    expect(enthalpyAt({ points: [], dS: 10 }, 300)).toBeUndefined();
  });
});

describe('adiabatic temperature rise', () => {
  it('is heat ÷ the batch heat capacity: 3.0 kJ ÷ 0.05 kJ/K = 60 K, over 50 K: heat-caution (closed form)', () => {
    const { a, result, report } = only(ESTER([], ['  heat capacity 0.05 kJ/K']));
    expect(rel(result.adiabaticRise!, 3000 / 50)).toBeLessThan(1e-9);
    expect(a.diagnostics.map((d) => d.code)).toEqual(['heat-caution']);
    expect(report.cautions.some((c) => c.includes('calorimetry'))).toBe(true);
  });

  it('uses Σ n·Cp° of what is charged when every species has Cp° (closed form: 2 mol × 150 J/(mol K) = 300 J/K)', () => {
    const text = ESTER().replace('species acid = C6H12O2 (l)', 'species acid = C6H12O2 (l)\n  Cp° = 150 J/(mol K)').replace('species EtOH = C2H5OH (l)', 'species EtOH = C2H5OH (l)\n  Cp° = 150 J/(mol K)');
    const { a, result } = only(text);
    expect(rel(result.adiabaticRise!, 3000 / 300)).toBeLessThan(1e-9); // 10 K: under 50 K, no caution
    expect(a.diagnostics).toEqual([]);
  });

  it('is left out, with the reason, when no heat capacity is known', () => {
    const { result, report } = only(ESTER());
    expect(result.adiabaticRise).toBeUndefined();
    expect(report.summary.some((s) => s.startsWith('Adiabatic temperature rise: not known'))).toBe(true);
  });
});

describe('gas given off', () => {
  // CaCO3(s) ⇌ CaO(s) + CO2(g) in an open batch at 1 bar with K = 2 > 1: the solid decomposes
  // completely (the gas is pure CO2 at 1 bar, so Q = 1 < K). Standard textbook decomposition, K illustrative.
  const OPEN = ['calcine: CaCO3(s) <=> CaO(s) + CO2(g)', '  K = 2 at 900 °C', 'batch open at 900 °C, 1 bar', '  CaCO3(s) 0.5 mol', ''].join('\n');
  it('in an open batch: as off-gas volume at 1 atm and 25 °C, n R T / P (closed form: 0.5 mol → 12.23 L)', () => {
    const { a, result, report } = only(OPEN);
    expect(rel(result.gasFormed, 0.5)).toBeLessThan(1e-9);
    const litres = (0.5 * R * 298.15) / 101325 * 1000; // 12.233 L
    expect(report.summary).toContain(`Gas given off: 0.5 mol, ${Number(litres.toPrecision(4))} L at 1 atm and 25 °C (off-gas)`);
    expect(a.diagnostics).toEqual([]); // an open batch vents: the caution is in the report, not a warning
    expect(report.cautions.some((c) => c.includes('vent it safely'))).toBe(true);
  });

  it('in a closed vessel: gas-caution on the vessel line, even under 1.5 bar', () => {
    const closed = OPEN.replace('batch open at 900 °C, 1 bar', 'batch shut at 900 °C\n  vessel 100 L');
    const { a } = only(closed);
    expect(a.diagnostics.map((d) => d.code)).toEqual(['gas-caution']);
    expect(a.text.slice(a.diagnostics[0].start, a.diagnostics[0].end)).toBe('100 L');
  });
});

describe('solve --json', () => {
  it('gives heat_kJ and adiabatic_rise_K (null when unknown)', () => {
    const dir = mkdtempSync(join(tmpdir(), 'stillpoint-heat-'));
    const file = join(dir, 'a.eqnb');
    writeFileSync(file, ESTER([], ['  heat capacity 0.5 kJ/K']));
    const out: string[] = [];
    const code = runCli(['solve', file, '--json'], { out: (t) => out.push(t), err: () => undefined });
    expect(code).toBe(0);
    const b = (JSON.parse(out.join('\n')) as { batches: { heat_kJ: number; adiabatic_rise_K: number }[] }).batches[0];
    expect(rel(b.heat_kJ, 3)).toBeLessThan(1e-9); // closed form, as above
    expect(rel(b.adiabatic_rise_K, 6)).toBeLessThan(1e-9); // 3 kJ ÷ 0.5 kJ/K (closed form)
    writeFileSync(file, ESTER().replace('  ΔH° = -4.5 kJ/mol\n', ''));
    out.length = 0;
    runCli(['solve', file, '--json'], { out: (t) => out.push(t), err: () => undefined });
    const c = (JSON.parse(out.join('\n')) as { batches: { heat_kJ: number | null; adiabatic_rise_K: number | null }[] }).batches[0];
    expect(c.heat_kJ).toBeNull();
    expect(c.adiabatic_rise_K).toBeNull();
  });
});
