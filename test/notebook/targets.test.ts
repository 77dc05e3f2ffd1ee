// Targets (`target` lines): the value found must meet the goal when the batch
// is solved there, follow the closed form where there is one, and an
// unreachable goal must say so with the best value in the range.
import { describe, expect, it } from 'vitest';
import { analyse } from '../../server/src/notebook/ide/analysis';
import { esterNotebook } from '../support/notebooks';
import { batchReport } from '../../server/src/notebook/ide/batch-report';

const rel = (a: number, b: number): number => Math.abs(a - b) / Math.abs(b);

const ESTER = esterNotebook;

describe('targets', () => {
  it('finds the excess for a target conversion: n = x + x²/(K(1 − x)) (closed form for A + B ⇌ C + D)', () => {
    const a = analyse(ESTER(['  target conversion of acid = 95 % by EtOH from 1 to 20 equiv']));
    expect(a.diagnostics).toEqual([]);
    const [t] = a.targets.get(a.model.batches[0])!;
    const x = 0.95;
    const n = x + (x * x) / (4 * (1 - x)); // 5.4625 equiv (closed form)
    expect(t.values).toHaveLength(1);
    expect(rel(t.values[0], n)).toBeLessThan(1e-9);
  });

  it('its value, solved as a batch, meets the target to 1e-6 (property, over several goals)', () => {
    for (const goal of [0.7, 0.8, 0.9, 0.97]) {
      const a = analyse(ESTER([`  target conversion of acid = ${goal * 100} % by EtOH from 1 to 50 equiv`]));
      const [t] = a.targets.get(a.model.batches[0])!;
      const solved = analyse(ESTER([]).replace('  EtOH 1 equiv', `  EtOH ${t.values[0]} equiv`));
      const r = solved.results.get(solved.model.batches[0])!;
      expect(Math.abs(r.conversion! - goal)).toBeLessThan(1e-6);
    }
  });

  it('says when a goal cannot be reached, with the closest value in the range', () => {
    const a = analyse(ESTER(['  target conversion of acid = 99.9 % by EtOH from 1 to 20 equiv']));
    const [t] = a.targets.get(a.model.batches[0])!;
    expect(t.values).toEqual([]);
    expect(t.best?.value).toBe(20); // conversion rises with excess, so the end of the range is closest (Le Chatelier)
    const line = batchReport(a, a.model.batches[0]).targets[0];
    expect(line).toContain('cannot be reached');
  });

  it('finds a temperature for a closed vessel\'s target pressure (CaCO3 ⇌ CaO + CO2 with ΔH°: p(CO2)/bar = K(T), closed form)', () => {
    // K = 0.25 at 800 °C, ΔH° = 178 kJ/mol (illustrative): p = 0.5 bar where ln(0.5/0.25) = −ΔH/R (1/T − 1/T1)
    const text = [
      'calcine: CaCO3(s) <=> CaO(s) + CO2(g)',
      '  K = 0.25 at 800 °C',
      '  ΔH° = 178 kJ/mol',
      'batch kiln at 800 °C',
      '  vessel 10 L',
      '  CaCO3(s) 50 g',
      '  target pressure = 0.5 bar by T from 750 to 900 °C',
      '',
    ].join('\n');
    const a = analyse(text);
    const [t] = a.targets.get(a.model.batches[0])!;
    const R = 8.314462618; // J/(mol K), CODATA 2018 exact
    const T1 = 1073.15;
    const T = 1 / (1 / T1 - (R * Math.log(0.5 / 0.25)) / 178e3); // van 't Hoff, closed form
    expect(t.values).toHaveLength(1);
    expect(Math.abs(t.values[0] + 273.15 - T)).toBeLessThan(1e-6);
  });

  it('reports bad target lines', () => {
    const a = analyse(ESTER(['  target conversion of acid = 150 % by EtOH from 1 to 5 equiv', '  target conversion of acid = 90 % by X from 1 to 5 equiv', '  target pressure = 2 bar by T from 20 to 90 °C']));
    expect(a.diagnostics.map((d) => d.code)).toEqual(['bad-target', 'bad-target', 'bad-target']);
  });
});
