// Sweeps (`vary` lines): each point must equal the batch solved at that value,
// the esterification excess sweep must follow its closed form, and bad lines
// must be reported on their text.
import { describe, expect, it } from 'vitest';
import { analyse } from '../../server/src/notebook/ide/analysis';
import { esterNotebook } from '../support/notebooks';
import { batchReport } from '../../server/src/notebook/ide/batch-report';
import { runCli } from '../../server/src/cli/commands';
import { mkdtempSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { tmpdir } from 'node:os';

const rel = (a: number, b: number): number => Math.abs(a - b) / Math.abs(b);

// Esterification acid + EtOH ⇌ ester + water, all (l), K = 4: with n equivalents of alcohol the
// conversion x solves x² = 4 (1 − x)(n − x), i.e. 3x² − 4(1 + n)x + 4n = 0 (closed form, the
// classic textbook esterification example).
const conversion = (n: number): number => (4 * (1 + n) - Math.sqrt(16 * (1 + n) ** 2 - 48 * n)) / 6;

const ESTER = esterNotebook;

describe('sweeps', () => {
  it('an excess sweep follows the closed form at every point', () => {
    const a = analyse(ESTER(['  vary EtOH from 1 to 6 equiv step 0.5']));
    expect(a.diagnostics).toEqual([]);
    const [s] = a.sweeps.get(a.model.batches[0])!;
    expect(s.points.map((p) => p.written)).toEqual([1, 1.5, 2, 2.5, 3, 3.5, 4, 4.5, 5, 5.5, 6]);
    for (const p of s.points) expect(rel(p.result!.conversion!, conversion(p.written))).toBeLessThan(1e-9);
  });

  it('each point equals the batch solved at that value (property, over a temperature list)', () => {
    const a = analyse(ESTER(['  vary T in 40, 75, 110 °C']));
    const [s] = a.sweeps.get(a.model.batches[0])!;
    for (const p of s.points) {
      const single = analyse(ESTER([]).replace('batch b at 60 °C', `batch b at ${p.written} °C`));
      const r = single.results.get(single.model.batches[0])!;
      expect(p.result!.equilibrium).toEqual(r.equilibrium);
    }
    // and K falls with temperature for an exothermic step (van 't Hoff, common practice)
    const ks = s.points.map((p) => p.result!.inputs.reversible[0].lnK);
    expect(ks[0]).toBeGreaterThan(ks[1]);
    expect(ks[1]).toBeGreaterThan(ks[2]);
  });

  it('each point equals the batch solved at that value for pressure, vessel and an amount in mol too (property)', () => {
    // N2O4(g) ⇌ 2 NO2(g), the standard textbook gas dissociation; K illustrative
    const gas = (header: string, lines: string[]): string =>
      ['split: N2O4(g) <=> 2 NO2(g)', '  K = 0.15 at 25 °C', header, '  N2O4(g) 1 mol', '  NO2(g) 0.1 mol', ...lines, ''].join('\n');
    const cases: { header: string; vary: string; at: (v: number) => { header: string; lines: string[] }; extra?: string[] }[] = [
      { header: 'batch g at 25 °C, 1 bar', vary: '  vary P in 0.5, 2, 8 bar', at: (v) => ({ header: `batch g at 25 °C, ${v} bar`, lines: [] }) },
      { header: 'batch g at 25 °C', vary: '  vary vessel in 5, 20, 80 L', at: (v) => ({ header: 'batch g at 25 °C', lines: [`  vessel ${v} L`] }), extra: ['  vessel 10 L'] },
      { header: 'batch g at 25 °C, 1 bar', vary: '  vary NO2 in 0, 0.5, 2 mol', at: (v) => ({ header: 'batch g at 25 °C, 1 bar', lines: [] }) },
    ];
    for (const c of cases) {
      const a = analyse(gas(c.header, [...(c.extra ?? []), c.vary]));
      const [s] = a.sweeps.get(a.model.batches[0])!;
      for (const p of s.points) {
        const at = c.at(p.written);
        let text = gas(at.header, at.lines);
        if (c.vary.includes('NO2')) text = text.replace('  NO2(g) 0.1 mol', `  NO2(g) ${p.written} mol`);
        const single = analyse(text);
        const r = single.results.get(single.model.batches[0])!;
        for (let i = 0; i < r.equilibrium.length; i++) expect(rel(p.result!.equilibrium[i], r.equilibrium[i])).toBeLessThan(1e-12);
      }
    }
  });

  it('shows a table per sweep in the report', () => {
    const a = analyse(ESTER(['  vary EtOH in 1, 3 equiv']));
    const report = batchReport(a, a.model.batches[0]);
    expect(report.sweeps).toHaveLength(1);
    expect(report.sweeps[0].table.header.slice(0, 2)).toEqual(['EtOH / equiv', 'Conversion of acid']);
    expect(report.sweeps[0].table.rows.map((r) => r[1])).toEqual(['66.7 %', '90.3 %']); // x(1) = 2/3, x(3) = 0.9028 (closed form above)
  });

  it('reports bad sweep lines on their text', () => {
    const a = analyse(ESTER(['  vary X from 1 to 2 mol step 1', '  vary T from 1 to 5000 K step 1', '  vary EtOH in 1, -2 equiv', '  vary T from 40 to 80 kg step 10']));
    const found = a.diagnostics.map((d) => `${d.code} ${a.text.slice(d.start, d.end)}`);
    expect(found).toEqual(['bad-sweep X', 'bad-sweep 1', 'bad-sweep -2', 'bad-sweep kg']);
  });

  it('solve --json lists the sweep points', () => {
    const dir = mkdtempSync(join(tmpdir(), 'stillpoint-sweep-'));
    const file = join(dir, 'a.eqnb');
    writeFileSync(file, ESTER(['  vary EtOH in 1, 2 equiv']));
    const out: string[] = [];
    expect(runCli(['solve', file, '--json'], { out: (t) => out.push(t), err: () => undefined })).toBe(0);
    const b = (JSON.parse(out.join('\n')) as { batches: { sweeps: { variable: string; unit: string; points: { value: number; conversion: number; K: number; pressure_bar: number; species: Record<string, number> }[] }[] }[] }).batches[0];
    expect(b.sweeps[0].variable).toBe('EtOH');
    expect(b.sweeps[0].unit).toBe('equiv');
    expect(b.sweeps[0].points.map((p) => p.value)).toEqual([1, 2]);
    expect(rel(b.sweeps[0].points[1].conversion, conversion(2))).toBeLessThan(1e-9);
    expect(Object.keys(b.sweeps[0].points[0].species).sort()).toEqual(['C8H16O2', 'EtOH', 'H2O', 'acid']);
  });
});
