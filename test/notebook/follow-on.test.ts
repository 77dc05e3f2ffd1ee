// Follow-on batches (`batch B from A` with add, remove and vent): each result against a
// closed form worked by hand from the law of mass action or the ideal-gas law, chains
// against the same amounts charged directly, the report, and the seeded property
// "removing a product never lowers the conversion".
import { describe, expect, it } from 'vitest';
import { analyse, type Analysis } from '../../server/src/notebook/ide/analysis';
import { batchReport } from '../../server/src/notebook/ide/batch-report';
import { hover } from '../../server/src/notebook/ide/hover';
import type { BatchResult } from '../../server/src/notebook/semantic/batch-results';
import { Random } from '../support/random';

/** J/(mol K), exact in the 2019 SI (CODATA 2018). */
const R = 8.314462618;
/** Pa: 1 atm (definition) and 1 bar. */
const ATM = 101325;
const BAR = 1e5;
/** Closed forms are met to far better than the solver's 1e-9 (common practice: a margin over rounding). */
const REL = 1e-9;

function resultOf(analysis: Analysis, name: string): BatchResult {
  const batch = analysis.model.batches.find((b) => b.name === name);
  const result = batch ? analysis.results.get(batch) : undefined;
  if (!result) throw new Error(`batch ${name} has no result; diagnostics: ${analysis.diagnostics.map((d) => d.message).join(' | ')}`);
  expect(result.status, result.message).toBe('converged');
  return result;
}

function expectClose(actual: number, expected: number, what: string, rel = REL): void {
  expect(Math.abs(actual - expected), `${what}: ${actual} vs ${expected}`).toBeLessThanOrEqual(rel * Math.abs(expected));
}

const mol = (r: BatchResult, label: string): number => r.equilibrium[r.inputs.species.findIndex((s) => s.label === label)];

/** Invented esterification with K = 4 (A + B ⇌ C + D, the textbook ideal-liquid case). */
const ESTER = `species acid = C6H12O2 (l)
species EtOH = C2H5OH (l)
species ester = C8H16O2 (l)
species water = H2O (l)

esterify: acid + EtOH <=> ester + water
  K = 4 at 60 °C
  ΔH° = -4.5 kJ/mol

batch first at 60 °C
  acid 1 mol
  EtOH 1 mol
  uses esterify
`;

describe('water taken off an esterification and the mixture left to re-equilibrate', () => {
  it('1:1 with K = 4 goes to 2/3; removing 90 % of the water takes it to 4/5 (worked by hand)', () => {
    // Step 1: x²/(1 − x)² = 4 gives x = 2/3. Then water 2/3 → 1/15, and the second step y has
    // (2/3 + y)(1/15 + y) = 4 (1/3 − y)²; y = 2/15 satisfies it exactly: (12/15)(3/15) = 36/225
    // = 4 (3/15)². So the ester is 2/3 + 2/15 = 4/5 and the acid's conversion 80 % (worked by hand).
    const a = analyse(`${ESTER}
batch dried from first
  remove water 90 %
`);
    expect(a.diagnostics.filter((d) => d.severity === 'error')).toEqual([]);
    const first = resultOf(a, 'first');
    const dried = resultOf(a, 'dried');
    expectClose(first.conversion!, 2 / 3, 'first conversion');
    expectClose(mol(dried, 'ester'), 4 / 5, 'ester after the second step');
    expectClose(mol(dried, 'water'), 1 / 15 + 2 / 15, 'water after the second step');
    expectClose(dried.conversion!, 4 / 5, 'conversion over the chain');
    // Before and after the change, and Q right after it: (2/3)(1/15)/(1/3)² = 0.4 (worked by hand).
    const from = dried.inputs.from!;
    expect(from.source).toBe('first');
    expectClose(from.before[3], 2 / 3, 'water before the change');
    expectClose(dried.charged[3], 1 / 15, 'water after the change');
    expectClose(Math.exp(dried.reactions[0].lnQ0), 0.4, 'Q right after the change');
    expectClose(dried.reactions[0].extent, 2 / 15, 'size of the shift');
  });

  it('a chain of three equals the last batch charged directly with the amounts it starts from', () => {
    const a = analyse(`${ESTER}
batch dried from first
  remove water 90 %
batch topped from dried at 70 °C
  add EtOH 0.5 equiv
  remove water 50 %
`);
    const topped = resultOf(a, 'topped');
    const start = topped.charged;
    const names = topped.inputs.species.map((s) => s.label);
    // 0.5 equiv is relative to the first batch's basis: 0.5 × 1 mol of acid (the brief).
    const dried = resultOf(a, 'dried');
    expectClose(start[1], mol(dried, 'EtOH') + 0.5, 'EtOH after the add');
    expectClose(start[3], mol(dried, 'water') / 2, 'water after removing half');
    const direct = analyse(`${ESTER}
batch direct at 70 °C
${names.map((n, i) => `  ${n} ${start[i].toPrecision(17)} mol`).join('\n')}
  basis acid
  uses esterify
`);
    const same = resultOf(direct, 'direct');
    names.forEach((n) => expectClose(mol(topped, n), mol(same, n), n, 1e-12));
    expect(topped.inputs.temperature).toBe(343.15);
  });

  it('removing every bit of a product, or an absolute amount, and adding by mass', () => {
    const a = analyse(`${ESTER}
batch all-out from first
  remove water 100 %
  remove ester 0.5 mol
  add acid 11.6158 g
`);
    const r = resultOf(a, 'all-out');
    expect(r.charged[3]).toBe(0); // all the water (100 %)
    expectClose(r.charged[2], 2 / 3 - 0.5, 'ester left'); // 2/3 − 0.5 (worked by hand)
    // C6H12O2: 6 × 12.011 + 12 × 1.008 + 2 × 15.999 = 116.160 g/mol (IUPAC 2021 atomic weights): 0.1 mol.
    expectClose(r.charged[0], 1 / 3 + 11.6158 / 116.16, 'acid after the add', 1e-12);
  });
});

describe('sweeps and targets under a follow-on batch', () => {
  it('vary T: each point equals the follow-on written at that temperature (property)', () => {
    const a = analyse(`${ESTER}
batch dried from first at 60 °C
  remove water 90 %
  vary T in 40, 60, 80 °C
`);
    const batch = a.model.batches.find((b) => b.name === 'dried')!;
    const [sweep] = a.sweeps.get(batch)!;
    expect(sweep.points).toHaveLength(3);
    for (const [i, t] of [40, 60, 80].entries()) {
      const direct = resultOf(analyse(`${ESTER}
batch dried from first at ${t} °C
  remove water 90 %
`), 'dried');
      const point = sweep.points[i].result!;
      direct.equilibrium.forEach((n, k) => expectClose(point.equilibrium[k], n, `point ${t} °C, species ${k}`, 1e-12));
    }
    // At 60 °C the point is the batch itself: 4/5 (worked by hand above).
    expectClose(sweep.points[1].result!.conversion!, 4 / 5, 'conversion at 60 °C');
  });
});

describe('venting a closed vessel', () => {
  // A ⇌ 2 B in a closed vessel, invented K. Venting lets each gas down in proportion.
  const GAS = `species A = N2O4 (g)
species B = NO2 (g)

split: A <=> 2 B
  K = 0.15 at 25 °C
  ΔH° = 57 kJ/mol

batch sealed at 25 °C
  vessel 2 L
  A 0.5 mol
`;

  it('vent: n·R·T/V before, each gas scaled by 1 atm / P, and the rest re-equilibrates toward more gas', () => {
    const a = analyse(`${GAS}
batch vented from sealed
  vent
`);
    const sealed = resultOf(a, 'sealed');
    const vented = resultOf(a, 'vented');
    const step = vented.inputs.from!.steps[0];
    const T = 298.15;
    const V = 0.002;
    const gas = sealed.equilibrium[0] + sealed.equilibrium[1];
    expectClose(step.vent!.from, (gas * R * T) / V, 'pressure before the vent (ideal gas)');
    expectClose(step.vent!.to, ATM, 'vented to 1 atm (default)');
    const keep = ATM / step.vent!.from;
    expectClose(vented.charged[0], sealed.equilibrium[0] * keep, 'A after the vent');
    expectClose(vented.charged[1], sealed.equilibrium[1] * keep, 'B after the vent');
    expectClose(step.vent!.released, gas * (1 - keep), 'gas let out');
    // Le Chatelier: at lower pressure the dissociation goes further, so Q < K right after.
    expect(vented.reactions[0].lnQ0).toBeLessThan(vented.reactions[0].input.lnK);
    expect(vented.reactions[0].extent).toBeGreaterThan(0);
    // Closed form at constant V: K = (n_B R T / V P°)² / (n_A R T / V P°) (law of mass action).
    const c = (R * T) / (V * BAR);
    const nA = mol(vented, 'A');
    const nB = mol(vented, 'B');
    expectClose((nB * c) ** 2 / (nA * c), 0.15, 'K at the end');
    // The cautions: venting says where the gas should go; the report defers to site review.
    const report = batchReport(a, a.model.batches.find((b) => b.name === 'vented')!);
    expect(report.cautions.join(' ')).toMatch(/Venting lets out .* mol of gas .*process-safety review/);
  });

  it('vent to a pressure above the present one lets nothing out, and says so', () => {
    const a = analyse(`${GAS}
batch kept from sealed
  vent to 50 bar
`);
    const kept = resultOf(a, 'kept');
    expect(kept.inputs.from!.steps[0].changes).toEqual([]);
    expect(kept.inputs.from!.steps[0].note).toMatch(/nothing is let out/);
  });
});

describe('what the chemist sees', () => {
  it('the hover shows before and after the change, Q after it, and the shift', () => {
    const text = `${ESTER}
batch dried from first
  remove water 90 %
`;
    const a = analyse(text);
    const h = hover(a, text.indexOf('dried') + 1);
    const md = h?.markdown ?? '';
    expect(md).toContain('Before change / mol');
    expect(md).toContain('After change / mol');
    expect(md).toContain('Q after change');
    expect(md).toMatch(/Right after the change, `esterify` has Q = 0\.4 against K = 4: it shifts forward/);
    expect(md).toContain('Starts from: the equilibrium contents of `first`');
    // The source's name shows the source batch; the keywords and the removed species explain themselves.
    expect(hover(a, text.indexOf('from first') + 6)?.markdown).toContain('**batch first**');
    expect(hover(a, text.indexOf('from first') + 1)?.markdown).toMatch(/^\*\*from\*\*: a follow-on batch starts from/);
    expect(hover(a, text.indexOf('remove water') + 1)?.markdown).toMatch(/^\*\*remove\*\*/);
    expect(hover(a, text.indexOf('remove water') + 8)?.markdown).toContain('H2O');
  });
});

describe('property: removing a product never lowers the conversion', () => {
  it('120 random esterifications: remove a random share of the water or the ester', () => {
    // Le Chatelier (law of mass action): taking out a product lowers Q below K, so the
    // reaction runs on forward, and the basis is consumed further (property).
    const rng = new Random(6061);
    for (let k = 0; k < 120; k++) {
      const K = Math.exp((rng.next() * 2 - 1) * 5);
      const acid = 0.1 + 3 * rng.next();
      const alcohol = 0.1 + 3 * rng.next();
      const share = Math.round(rng.next() * 1000) / 10;
      const product = rng.chance(0.5) ? 'water' : 'ester';
      const text = `species acid = C6H12O2 (l)
species EtOH = C2H5OH (l)
species ester = C8H16O2 (l)
species water = H2O (l)
esterify: acid + EtOH <=> ester + water
  K = ${K} at 60 °C
batch first at 60 °C
  acid ${acid} mol
  EtOH ${alcohol} mol
batch after from first
  remove ${product} ${share} %
`;
      const a = analyse(text);
      const before = resultOf(a, 'first').conversion!;
      const after = resultOf(a, 'after').conversion!;
      expect(after, `K ${K}, ${acid}:${alcohol}, remove ${share} % of ${product}`).toBeGreaterThanOrEqual(before - 1e-12);
      if (share > 1) expect(after).toBeGreaterThan(before);
    }
  });
});
