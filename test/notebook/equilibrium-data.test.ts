// Reaction data through the notebook: K, log K, pK, Kp, Kc and ΔG° lines turned into the
// thermodynamic K a batch uses (Kp and Kc with Δn and the standard states), the unit-power
// checks, and K at the batch temperature (van 't Hoff, two-point, ΔH° with ΔS°, taken as
// constant, Hess's law), with the warnings that go with them.
import { describe, expect, it } from 'vitest';
import { analyse, type Analysis } from '../../server/src/notebook/ide/analysis';
import { batchReport } from '../../server/src/notebook/ide/batch-report';
import { hover } from '../../server/src/notebook/ide/hover';
import type { BatchResult } from '../../server/src/notebook/semantic/batch-results';
import { describeRanges, rangesOf } from '../support/fixtures';

/** J/(mol K), exact in the 2019 SI (CODATA 2018). */
const R = 8.314462618;
/** Pa per atm and per bar, exact by definition. */
const ATM = 101325;
const BAR = 1e5;
/** mol/m^3 in 1 mol/L (definition of the litre). */
const MOL_PER_L = 1000;

const celsius = (t: number): number => t + 273.15;
const T_25 = celsius(25);

function relErr(actual: number, expected: number): number {
  return Math.abs(actual - expected) / Math.abs(expected);
}

function expectClose(actual: number, expected: number, relative: number, what = ''): void {
  expect(relErr(actual, expected), `${what}: ${actual} vs ${expected}`).toBeLessThanOrEqual(relative);
}

function resultOf(analysis: Analysis, name: string): BatchResult {
  const batch = analysis.model.batches.find((b) => b.name === name);
  if (!batch) throw new Error(`no batch ${name}`);
  const result = analysis.results.get(batch);
  if (!result) throw new Error(`batch ${name} was not solved: ${analysis.diagnostics.map((d) => `${d.code}: ${d.message}`).join('; ')}`);
  return result;
}

/** The thermodynamic K the named batch uses for its first reversible reaction. */
function kUsed(text: string, batch = 'b'): number {
  const r = resultOf(analyse(text), batch);
  expect(r.reactions.length).toBeGreaterThan(0);
  return Math.exp(r.reactions[0].input.lnK);
}

function codes(text: string): string[] {
  return analyse(text).diagnostics.map((d) => d.code);
}

/** Diagnostics as `L<line> [start,end) code`, lines 1-based. */
function ranges(text: string): string[] {
  return describeRanges(rangesOf(text, analyse(text).diagnostics));
}

// ---- Kp and Kc ------------------------------------------------------------------------------

// Invented scenario "Larkspur loop": ammonia synthesis, standard general-chemistry textbook example.
const ammonia = (dataLine: string): string =>
  [
    'species N2 = N2 (g)',
    'species H2 = H2 (g)',
    'species NH3 = NH3 (g)',
    'synth: N2 + 3 H2 <=> 2 NH3',
    `  ${dataLine}`,
    'batch b at 500 °C',
    '  N2 1 mol',
    '  H2 3 mol',
    '',
  ].join('\n');

describe('Kp and Kc become the thermodynamic K (ammonia synthesis, Δn(gas) = −2)', () => {
  // Standard general-chemistry textbook worked example: at 500 °C, Kc = 6.0e-2 (mol/L)^-2 for
  // N2 + 3 H2 ⇌ 2 NH3, and Kp = Kc (RT)^Δn with R = 0.08206 L atm/(mol K).
  // Closed form: 6.0e-2 × (0.08206 × 773.15)^-2 = 1.4906e-5 atm^-2, i.e. 1.49e-5 to three figures
  // (the textbook prints 1.5e-5 to two).
  const KP_TEXTBOOK = 6.0e-2 * (0.08206 * 773.15) ** -2;

  it('the textbook Kp–Kc relation gives Kp = 1.49e-5 atm^-2 (closed form)', () => {
    expectClose(KP_TEXTBOOK, 1.49e-5, 0.005, 'Kp from Kc');
  });

  it('Kc = 6.0e-2 (mol/L)^-2 gives K = Kc · (c_unit R T / P°)^-2 (closed form)', () => {
    const K = kUsed(ammonia('Kc = 6.0e-2 (mol/L)^-2 at 500 °C'));
    // closed form: the format's Kc conversion with c_unit = 1 mol/L = 1000 mol/m^3, P° = 1 bar
    expectClose(K, 6.0e-2 * ((MOL_PER_L * R * celsius(500)) / BAR) ** -2, 1e-12, 'K from Kc');
  });

  it('Kp = 1.49e-5 atm^-2 gives K = Kp · (1 atm / 1 bar)^-2 exactly (closed form)', () => {
    const K = kUsed(ammonia('Kp = 1.49e-5 atm^-2 at 500 °C'));
    // closed form: 1 atm = 1.01325 bar by definition
    expectClose(K, 1.49e-5 * (ATM / BAR) ** -2, 1e-12, 'K from Kp');
  });

  it('the Kc and Kp notebooks agree to the rounding of the textbook numbers (~1 %)', () => {
    const fromKc = kUsed(ammonia('Kc = 6.0e-2 (mol/L)^-2 at 500 °C'));
    const fromKp = kUsed(ammonia('Kp = 1.49e-5 atm^-2 at 500 °C'));
    // textbook worked example (above): 1.49e-5 is Kp rounded to three figures, so 1 % is generous
    expectClose(fromKp, fromKc, 0.01, 'K from Kp vs K from Kc');
  });

  it('the same constant written as L/mol, M and bar units gives the same K (closed form)', () => {
    const fromKc = kUsed(ammonia('Kc = 6.0e-2 (mol/L)^-2 at 500 °C'));
    // closed form: (L/mol)^2 is (mol/L)^-2 and M is mol/L by definition
    expectClose(kUsed(ammonia('Kc = 6.0e-2 (L/mol)^2 at 500 °C')), fromKc, 1e-12, '(L/mol)^2');
    expectClose(kUsed(ammonia('Kc = 6.0e-2 M^-2 at 500 °C')), fromKc, 1e-12, 'M^-2');
    // closed form: a Kp in bar^-2 is the thermodynamic K itself
    expectClose(kUsed(ammonia('Kp = 1.4e-5 bar^-2 at 500 °C')), 1.4e-5, 1e-12, 'bar^-2');
  });
});

// Invented scenario "Pellworth gas cell": N2O4 ⇌ 2 NO2, standard general-chemistry textbook reaction.
const dimer = (dataLine: string): string =>
  ['species N2O4 = N2O4 (g)', 'species NO2 = NO2 (g)', 'split: N2O4 <=> 2 NO2', `  ${dataLine}`, 'batch b at 25 °C', '  N2O4 1 mol', ''].join('\n');

describe('Kp and Kc with Δn(gas) = +1 (N2O4 ⇌ 2 NO2)', () => {
  it('Kp in atm: K = Kp × 1.01325 (closed form)', () => {
    expectClose(kUsed(dimer('Kp = 0.15 atm at 25 °C')), 0.15 * 1.01325, 1e-12, 'atm');
  });

  it('Kp = 15 kPa: K = 15 kPa / 1 bar = 0.15 (closed form)', () => {
    expectClose(kUsed(dimer('Kp = 15 kPa at 25 °C')), 0.15, 1e-12, 'kPa');
  });

  it('Kc = 0.15 mol/L: K = Kc · c_unit R T / P° (closed form)', () => {
    expectClose(kUsed(dimer('Kc = 0.15 mol/L at 25 °C')), (0.15 * MOL_PER_L * R * celsius(25)) / BAR, 1e-12, 'Kc');
  });
});

// Invented scenario "Brackley wash": a weak acid in water, standard general-chemistry textbook form.
const weakAcid = (dataLine: string): string =>
  [
    'species HA = C2H4O2 (aq)',
    'species A = C2H3O2^- (aq)',
    'ionise: HA <=> H^+(aq) + A',
    `  ${dataLine}`,
    'batch b at 25 °C',
    '  volume 1 L',
    '  HA 0.1 mol/L',
    '',
  ].join('\n');

describe('aqueous Kc (Δn of solutes = +1, c° = 1 mol/L)', () => {
  it('Kc = 1.8e-5 mol/L is K = 1.8e-5 (closed form: c_unit = c°)', () => {
    expectClose(kUsed(weakAcid('Kc = 1.8e-5 mol/L at 25 °C')), 1.8e-5, 1e-12, 'mol/L');
    expectClose(kUsed(weakAcid('K = 1.8e-5 at 25 °C')), 1.8e-5, 1e-12, 'K');
  });

  it('Kc = 1.8e-2 mmol/L and Kc = 1.8e-5 M are the same K (closed form)', () => {
    expectClose(kUsed(weakAcid('Kc = 1.8e-2 mmol/L at 25 °C')), 1.8e-5, 1e-12, 'mmol/L');
    expectClose(kUsed(weakAcid('Kc = 1.8e-5 M at 25 °C')), 1.8e-5, 1e-12, 'M');
  });

  it('gas and solutes together: Kc = c_unit-power 1 for CO2(g) + H2O(l) ⇌ H^+(aq) + HCO3^-(aq) (closed form)', () => {
    // Δn(gas) = −1 and Δn(solutes) = +2, so Kc has the unit (mol/L)^1. Invented value of Kc.
    // closed form: K = Kc · (c_unit R T / P°)^−1 · (c_unit / c°)^2 with c_unit = c° = 1 mol/L
    const text = [
      'species water = H2O (l)',
      'dissolve: CO2(g) + water <=> H^+(aq) + HCO3^-(aq)',
      '  Kc = 4.5e-7 mol/L at 25 °C',
      'batch b at 25 °C',
      '  volume 1 L',
      '  water 55 mol',
      '  CO2(g) 0.01 mol',
      '',
    ].join('\n');
    expect(codes(text)).toEqual([]);
    expectClose(kUsed(text), 4.5e-7 / ((MOL_PER_L * R * T_25) / BAR), 1e-12, 'mixed Kc');
    // a unit of power 2 (the solutes alone) or −1 (the gas alone) is the wrong power
    expect(codes(text.replace('4.5e-7 mol/L', '4.5e-7 (mol/L)^2'))).toContain('bad-quantity');
    expect(codes(text.replace('4.5e-7 mol/L', '4.5e-7 L/mol'))).toContain('bad-quantity');
  });

  it('Kp of a reaction with no gas (Δn(gas) = 0) needs no unit and is K itself (closed form)', () => {
    const text = weakAcid('Kp = 1.8e-5 at 25 °C');
    expect(codes(text)).toEqual([]);
    expectClose(kUsed(text), 1.8e-5, 1e-12, 'Kp, Δn(gas) = 0');
  });
});

describe('unit powers that do not match Δn', () => {
  it('Kp in `atm` for Δn(gas) = −2 is bad-quantity on the unit, naming the power −2', () => {
    const text = ammonia('Kp = 1.5e-5 atm at 500 °C');
    const bad = analyse(text).diagnostics.filter((d) => d.code === 'bad-quantity');
    expect(bad).toHaveLength(1);
    expect(text.slice(bad[0].start, bad[0].end)).toBe('atm');
    // the message content is the point: it says which power was expected
    expect(bad[0].message).toContain('-2');
    expect(bad[0].message).toMatch(/bar\^-2/);
  });

  it('Kc in `(mol/L)^-1` for Δn = −2 is bad-quantity naming −2; the batch then lacks a K', () => {
    const text = ammonia('Kc = 0.06 (mol/L)^-1 at 500 °C');
    const a = analyse(text);
    const bad = a.diagnostics.find((d) => d.code === 'bad-quantity');
    expect(bad && text.slice(bad.start, bad.end)).toBe('(mol/L)^-1');
    expect(bad?.message).toContain('-2');
    expect(a.diagnostics.map((d) => d.code).sort()).toEqual(['bad-quantity', 'missing-data']);
    expect(a.results.size).toBe(0);
  });

  it('Kp with no unit when Δn(gas) = +1 is bad-quantity naming the power 1', () => {
    const text = dimer('Kp = 0.15 at 25 °C');
    const bad = analyse(text).diagnostics.find((d) => d.code === 'bad-quantity');
    expect(bad?.message).toMatch(/= 1\b/);
  });

  it('a unit on Kp when Δn(gas) = 0 is bad-quantity; without the unit it is fine', () => {
    const shift = (line: string): string => ['shift: CO(g) + H2O(g) <=> CO2(g) + H2(g)', `  ${line}`, ''].join('\n');
    expect(codes(shift('Kp = 1.6 atm at 500 °C'))).toEqual(['bad-quantity']);
    expect(codes(shift('Kp = 1.6 at 500 °C'))).toEqual([]);
  });

  it('a term without a phase makes Kp an error (Δn unknown), on the value', () => {
    const text = ['synth: N2 + 3 H2(g) <=> 2 NH3(g)', '  Kp = 1.5e-5 atm^-2 at 500 °C', ''].join('\n');
    expect(ranges(text)).toEqual(['L2 [7,20) bad-quantity']);
    // while K itself needs no phases
    expect(codes(['synth: N2 + 3 H2(g) <=> 2 NH3(g)', '  K = 1.5e-5 at 500 °C', ''].join('\n'))).toEqual([]);
  });
});

// ---- log K, pK, ΔG° -------------------------------------------------------------------------

describe('log K, pK and ΔG°', () => {
  it('log K = −4.74 and pK = 4.74 are the same K, 10^−4.74 (closed form)', () => {
    const fromLog = kUsed(weakAcid('log K = -4.74 at 25 °C'));
    const fromP = kUsed(weakAcid('pK = 4.74 at 25 °C'));
    // closed form: K = 10^(log K) = 10^(−pK)
    expectClose(fromLog, 10 ** -4.74, 1e-12, 'log K');
    expectClose(fromP, 10 ** -4.74, 1e-12, 'pK');
  });

  it('… which is K = 1.82e-5 to the three figures written (closed form)', () => {
    // closed form: 10^-4.74 = 1.8197e-5; 1.82e-5 carries three significant figures
    expectClose(kUsed(weakAcid('pK = 4.74 at 25 °C')), kUsed(weakAcid('K = 1.82e-5 at 25 °C')), 5e-4, 'pK vs K');
  });

  it('ΔG° = −5 kJ/mol at 100 °C gives K = exp(−ΔG°/RT) at 100 °C (closed form)', () => {
    const text = ['species A = C4H8O2 (l)', 'species B = C4H8O2 (l)', 'turn: A <=> B', '  ΔG° = -5 kJ/mol at 100 °C', 'batch b at 100 °C', '  A 1 mol', ''].join('\n');
    expectClose(kUsed(text), Math.exp(5000 / (R * celsius(100))), 1e-12, 'ΔG°');
    // the ASCII spelling is the same property
    expectClose(kUsed(text.replace('ΔG°', 'dG')), Math.exp(5000 / (R * celsius(100))), 1e-12, 'dG');
  });
});

// ---- K at the batch temperature -----------------------------------------------------------

// Invented scenario "Tamsin isomer study": A ⇌ B in one liquid phase, with invented data.
const isomer = (dataLines: readonly string[], batchT = '100 °C', extra: readonly string[] = []): string =>
  ['species A = C4H8O2 (l)', 'species B = C4H8O2 (l)', 'turn: A <=> B', ...dataLines.map((l) => `  ${l}`), `batch b at ${batchT}`, ...extra, '  A 1 mol', ''].join('\n');

describe('K at the batch temperature', () => {
  const T25 = celsius(25);
  const T100 = celsius(100);

  it('a K given at the batch temperature is used as it is', () => {
    const a = analyse(isomer(['K = 2 at 100 °C', 'ΔH° = -20 kJ/mol']));
    const r = resultOf(a, 'b');
    expect(Math.exp(r.reactions[0].input.lnK)).toBeCloseTo(2, 12);
    expect(r.reactions[0].input.source.kind).toBe('given');
  });

  it('van \'t Hoff from a K and ΔH° (closed form)', () => {
    const text = isomer(['K = 2 at 25 °C', 'ΔH° = -20 kJ/mol']);
    expect(codes(text)).toEqual([]);
    // closed form: ln K2 = ln K1 − ΔH°/R (1/T2 − 1/T1)
    expectClose(kUsed(text), Math.exp(Math.log(2) + (20000 / R) * (1 / T100 - 1 / T25)), 1e-12, 'van t Hoff');
  });

  it('van \'t Hoff with a constant ΔCp° (closed form, the format\'s integrated equation)', () => {
    const text = isomer(['K = 2 at 25 °C', 'ΔH° = -20 kJ/mol', 'ΔCp° = 40 J/(mol K)']);
    // closed form: ln K2 = ln K1 − ΔH1/R·(1/T2 − 1/T1) + ΔCp/R·(ln(T2/T1) + T1/T2 − 1)
    const lnK = Math.log(2) + (20000 / R) * (1 / T100 - 1 / T25) + (40 / R) * (Math.log(T100 / T25) + T25 / T100 - 1);
    expectClose(kUsed(text), Math.exp(lnK), 1e-12, 'with ΔCp°');
  });

  it('two K and no ΔH°: ln K linear in 1/T through the nearest two (closed form)', () => {
    const line = (T1: number, K1: number, T2: number, K2: number, T: number): number =>
      Math.exp(Math.log(K1) + ((Math.log(K2) - Math.log(K1)) / (1 / T2 - 1 / T1)) * (1 / T - 1 / T1));
    const two = isomer(['K = 2 at 25 °C', 'K = 0.5 at 200 °C']);
    expect(codes(two)).toEqual([]);
    // closed form: the line through (1/298.15 K, ln 2) and (1/473.15 K, ln 0.5)
    expectClose(kUsed(two), line(T25, 2, celsius(200), 0.5, T100), 1e-12, 'two-point');
    // With three K, at 150 °C the nearest two in 1/T are 100 °C and 200 °C (closed form:
    // |1/423.15 − 1/373.15| = 3.2e-4 and |1/423.15 − 1/473.15| = 2.5e-4 K^-1, against 9.9e-4 for 25 °C).
    const three = isomer(['K = 2 at 25 °C', 'K = 1.5 at 100 °C', 'K = 0.5 at 200 °C'], '150 °C');
    const expected = line(T100, 1.5, celsius(200), 0.5, celsius(150));
    expectClose(kUsed(three), expected, 1e-12, 'nearest two of three');
    // and it is not the line through 25 °C and 100 °C (the data are not collinear in 1/T)
    expect(relErr(line(T25, 2, T100, 1.5, celsius(150)), expected)).toBeGreaterThan(0.01);
  });

  it('ΔH° and ΔS° (at 298.15 K): ΔG° = ΔH° − TΔS° (closed form)', () => {
    const text = isomer(['ΔH° = -20 kJ/mol', 'ΔS° = -30 J/(mol K)']);
    expect(codes(text)).toEqual([]);
    // closed form: K = exp(−(ΔH° − T ΔS°)/(R T))
    expectClose(kUsed(text), Math.exp(-(-20000 - T100 * -30) / (R * T100)), 1e-12, 'ΔH° and ΔS°');
    // the ASCII spellings are the same properties
    expectClose(kUsed(isomer(['dH = -20 kJ/mol', 'dS = -30 J/(mol K)'])), kUsed(text), 1e-12, 'dH and dS');
  });

  it('one K at another temperature and no ΔH°: taken as constant, k-extrapolated on the batch header', () => {
    const text = isomer(['K = 2 at 25 °C']);
    // L5 is `batch b at 100 °C`; the batch name `b` is columns 6-7
    expect(ranges(text)).toEqual(['L5 [6,7) k-extrapolated']);
    expect(kUsed(text)).toBeCloseTo(2, 12); // closed form: K unchanged
    const r = resultOf(analyse(text), 'b');
    expect(r.reactions[0].input.source.kind).toBe('assumed-constant');
  });

  it('k-extrapolated is on the reaction\'s label in `uses` when the batch names it', () => {
    const text = isomer(['K = 2 at 25 °C'], '100 °C', ['  uses turn']);
    expect(ranges(text)).toEqual(['L6 [7,11) k-extrapolated']);
  });

  it('no warning at the temperature the K is given at', () => {
    expect(codes(isomer(['K = 2 at 25 °C'], '25 °C'))).toEqual([]);
  });
});

describe('inconsistent-data: data given twice that disagree by more than 1 %', () => {
  it('K and log K at one temperature: 58 % apart warns; 0.0 % apart does not', () => {
    // closed form: 10^0.5 = 3.162 against 2 is 58 % apart; 10^0.30103 = 2.0000 agrees
    const bad = isomer(['K = 2 at 25 °C', 'log K = 0.5 at 25 °C'], '25 °C');
    expect(ranges(bad)).toEqual(['L4 [2,7) inconsistent-data']); // from the first data line's key to its value's end
    // the message content is the point: it says by how much
    expect(analyse(bad).diagnostics[0].message).toContain('58 %');
    expect(codes(isomer(['K = 2 at 25 °C', 'log K = 0.30103 at 25 °C'], '25 °C'))).toEqual([]);
    // the first is used
    expect(kUsed(bad)).toBeCloseTo(2, 12);
  });

  it('the 1 % threshold: 0.9 % apart is quiet, 1.1 % apart warns (closed form)', () => {
    // closed form: 10^0.30492 = 2.0180 is 0.90 % above 2; 10^0.30578 = 2.0220 is 1.10 % above
    expect(codes(isomer(['K = 2 at 25 °C', 'log K = 0.30492 at 25 °C'], '25 °C'))).toEqual([]);
    expect(codes(isomer(['K = 2 at 25 °C', 'log K = 0.30578 at 25 °C'], '25 °C'))).toEqual(['inconsistent-data']);
  });

  it('the same keyword twice at one temperature is a duplicate-property instead', () => {
    expect(codes(isomer(['K = 2 at 25 °C', 'K = 2.5 at 25 °C'], '25 °C'))).toEqual(['duplicate-property']);
  });

  it('Kp and Kc that say the same thing are quiet; Kp and Kc that do not, warn', () => {
    // closed form: Kc = 0.15 mol/L is K = 0.15 × 24.79 = 3.72 at 25 °C, and Kp = 3.7184 bar is the same K
    const K = (0.15 * MOL_PER_L * R * celsius(25)) / BAR;
    expect(codes(dimer(`Kc = 0.15 mol/L at 25 °C\n  Kp = ${K.toPrecision(6)} bar at 25 °C`))).toEqual([]);
    expect(codes(dimer('Kc = 0.15 mol/L at 25 °C\n  Kp = 0.15 bar at 25 °C'))).toEqual(['inconsistent-data']);
  });

  it('K against ΔH° and ΔS°', () => {
    // closed form: ΔH° = −20 kJ/mol, ΔS° = −30 J/(mol K) give K(25 °C) = exp((20000 − 298.15·30)/(R·298.15)) = 82.6
    const K25 = Math.exp((20000 - T_25 * 30) / (R * T_25));
    expect(codes(isomer([`K = ${K25.toPrecision(6)} at 25 °C`, 'ΔH° = -20 kJ/mol', 'ΔS° = -30 J/(mol K)']))).toEqual([]);
    expect(codes(isomer(['K = 2 at 25 °C', 'ΔH° = -20 kJ/mol', 'ΔS° = -30 J/(mol K)']))).toEqual(['inconsistent-data']);
  });

  it('two K against ΔH°', () => {
    // closed form: K(200 °C) from K(25 °C) = 2 and ΔH° = −20 kJ/mol by van 't Hoff
    const K200 = Math.exp(Math.log(2) + (20000 / R) * (1 / celsius(200) - 1 / T_25));
    expect(codes(isomer(['K = 2 at 25 °C', `K = ${K200.toPrecision(6)} at 200 °C`, 'ΔH° = -20 kJ/mol']))).toEqual([]);
    expect(codes(isomer(['K = 2 at 25 °C', 'K = 0.5 at 200 °C', 'ΔH° = -20 kJ/mol']))).toEqual(['inconsistent-data']);
  });
});

// ---- Hess's law ---------------------------------------------------------------------------------

// Invented scenario "Osterby shift reactor": the water-gas shift CO(g) + H2O(g) ⇌ CO2(g) + H2(g).
// Formation data at 298.15 K, from memory of NIST-JANAF / CODATA key values (kJ/mol):
// ΔfG°: CO −137.17, H2O(g) −228.61, CO2 −394.36, H2 0; ΔfH°: CO −110.53, H2O(g) −241.83, CO2 −393.51, H2 0.
const DFG = { CO: -137.17, H2O: -228.61, CO2: -394.36 };
const DFH = { CO: -110.53, H2O: -241.83, CO2: -393.51 };
const shift = (withEnthalpy: boolean, batchT: string): string =>
  [
    'species CO = CO (g)',
    `  ΔfG° = ${DFG.CO} kJ/mol`,
    ...(withEnthalpy ? [`  ΔfH° = ${DFH.CO} kJ/mol`] : []),
    'species steam = H2O (g)',
    `  ΔfG° = ${DFG.H2O} kJ/mol`,
    ...(withEnthalpy ? [`  ΔfH° = ${DFH.H2O} kJ/mol`] : []),
    'species CO2 = CO2 (g)',
    `  ΔfG° = ${DFG.CO2} kJ/mol`,
    ...(withEnthalpy ? [`  ΔfH° = ${DFH.CO2} kJ/mol`] : []),
    'species H2 = H2 (g)',
    '  ΔfG° = 0 kJ/mol',
    ...(withEnthalpy ? ['  ΔfH° = 0 kJ/mol'] : []),
    'shift: CO + steam <=> CO2 + H2',
    `batch b at ${batchT}`,
    '  CO 1 mol',
    '  steam 1 mol',
    '',
  ].join('\n');

describe("Hess's law from formation data (water-gas shift)", () => {
  // closed form from the values above: ΔrG° = −394.36 + 0 − (−137.17) − (−228.61) = −28.58 kJ/mol
  const dG = DFG.CO2 - DFG.CO - DFG.H2O;
  const K298 = Math.exp(-(dG * 1000) / (R * 298.15));

  it('ΔrG° = −28.58 kJ/mol and K(298.15 K) ≈ 1.0e5 (closed form)', () => {
    expect(dG).toBeCloseTo(-28.58, 10);
    expectClose(K298, 1.0e5, 0.05, 'K(298.15 K) rounded');
  });

  it('the batch at 25 °C uses K = exp(−ΔrG°/RT) (closed form), with no warning', () => {
    const text = shift(false, '25 °C');
    expect(codes(text)).toEqual([]);
    expectClose(kUsed(text), K298, 1e-12, 'Hess K');
    const r = resultOf(analyse(text), 'b');
    expect(r.reactions[0].input.source.kind).toBe('hess');
  });

  it("the hover on the reaction says Hess's law and shows ΔrG° = −28.58 kJ/mol", () => {
    const text = shift(false, '25 °C');
    const md = hover(analyse(text), text.indexOf('shift:'))?.markdown ?? '';
    expect(md).toContain("Hess's law");
    expect(md).toContain('-28.58 kJ/mol');
  });

  it('with ΔfH° as well, K moves to 500 °C by van \'t Hoff with ΔrH° = −41.15 kJ/mol (closed form)', () => {
    const text = shift(true, '500 °C');
    expect(codes(text)).toEqual([]);
    // closed form: ΔrH° = −393.51 − (−110.53) − (−241.83) = −41.15 kJ/mol
    const dH = (DFH.CO2 - DFH.CO - DFH.H2O) * 1000;
    expect(dH).toBeCloseTo(-41150, 6);
    expectClose(kUsed(text), Math.exp(Math.log(K298) - (dH / R) * (1 / celsius(500) - 1 / 298.15)), 1e-12, 'Hess + van t Hoff');
  });

  it('with ΔfG° only, K at 500 °C is the 25 °C value taken as constant, with k-extrapolated', () => {
    const text = shift(false, '500 °C');
    expect(codes(text)).toEqual(['k-extrapolated']);
    expectClose(kUsed(text), K298, 1e-12, 'taken as constant');
  });

  it('… and the batch report does not claim a van \'t Hoff correction it did not make', () => {
    // There is no ΔrH° (no ΔfH°), so K was taken as constant (the k-extrapolated warning says so);
    // the "K from" text of the batch report must not say it was moved with ΔrH°.
    const a = analyse(shift(false, '500 °C'));
    const report = batchReport(a, a.model.batches[0]);
    const kFrom = report.reactions?.rows[0][2] ?? '';
    expect(kFrom).toContain("Hess's law");
    expect(kFrom).not.toMatch(/van 't Hoff|ΔrH°/);
  });
});
