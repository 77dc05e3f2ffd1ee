// Equilibrium solver (server/src/chem/equilibrium) against closed forms and
// textbook-style worked examples: gas dissociation, esterification, ammonia
// synthesis, a solid decomposition in a closed vessel, a weak acid, and
// extreme equilibrium constants with trace amounts compared in log space.
import { describe, expect, it } from 'vitest';
import {
  GAS_CONSTANT,
  STANDARD_CONCENTRATION,
  STANDARD_PRESSURE,
  solveEquilibrium,
  type EquilibriumProblem,
} from '../../../server/src/chem/equilibrium';
import { expectNoNaN, expectRelative } from './helpers';

/** Relative tolerance for ordinary closed forms: far below the 1e-9 requirement, above double rounding (common practice). */
const REL = 1e-12;
/** The hard precision requirement for extreme K and trace amounts (the brief). */
const REQUIRED = 1e-9;

describe('A(g) ⇌ 2 B(g) at constant pressure (N2O4 ⇌ 2 NO2 style)', () => {
  // Degree of dissociation from pure A: K = 4α²/(1 − α²)·P/P°, so α = sqrt(K/(K + 4P/P°)) (closed form).
  const cases: Array<[number, number]> = [
    [0.15, 1e5], // K ≈ 0.15 for N2O4 ⇌ 2 NO2 near 298 K (from memory), 1 bar
    [0.15, 1e6], // same K at 10 bar (closed form covers any P)
    [1e-6, 5e4], // nearly undissociated (closed form)
    [50, 2e5], // nearly fully dissociated (closed form)
  ];
  it.each(cases)('K = %s, P = %s Pa', (K, P) => {
    const n0 = 2.5;
    const problem: EquilibriumProblem = {
      species: [
        { id: 'N2O4', phase: 'g', n0 },
        { id: 'NO2', phase: 'g', n0: 0 },
      ],
      reactions: [{ label: 'dissociation', nu: [-1, 2], lnK: Math.log(K) }],
      conditions: { kind: 'constant-pressure', T: 298.15, P },
    };
    const r = solveEquilibrium(problem);
    expect(r.status).toBe('converged');
    expect(r.method).toBe('single');
    const alpha = Math.sqrt(K / (K + (4 * P) / STANDARD_PRESSURE)); // closed form
    expectRelative(r.n[1], 2 * alpha * n0, REL, 'NO2');
    expectRelative(r.n[0], (1 - alpha) * n0, REL, 'N2O4');
    expectRelative(r.extents[0], alpha * n0, REL, 'extent');
    expectRelative(r.gasMoles, (1 + alpha) * n0, REL, 'gas moles');
    // ideal-gas volume n·R·T/P (closed form)
    expectRelative(r.gasVolume, ((1 + alpha) * n0 * GAS_CONSTANT * 298.15) / P, REL, 'gas volume');
    expect(Math.abs(r.lnQ[0] - Math.log(K))).toBeLessThan(1e-12); // at equilibrium Q = K (definition); rounding of ln only
    expect(r.lnQ0[0]).toBe(-Infinity); // no NO2 at the start: Q0 = 0 (documented convention)
    expectNoNaN(r);
  });
});

describe('esterification acid + alcohol ⇌ ester + water, all in one liquid', () => {
  const problem = (alcohol: number): EquilibriumProblem => ({
    species: [
      { id: 'acid', phase: 'l', n0: 1 },
      { id: 'alcohol', phase: 'l', n0: alcohol },
      { id: 'ester', phase: 'l', n0: 0 },
      { id: 'water', phase: 'l', n0: 0 },
    ],
    // K = 4 for acetic acid + ethanol (classic general-chemistry textbook example)
    reactions: [{ label: 'esterification', nu: [-1, -1, 1, 1], lnK: Math.log(4) }],
    conditions: { kind: 'constant-pressure', T: 333.15, P: 1e5 },
  });

  it('1:1 start converts 2/3 of the acid', () => {
    const r = solveEquilibrium(problem(1));
    expect(r.status).toBe('converged');
    expectRelative(r.n[2], 2 / 3, REL, 'ester'); // x²/(1 − x)² = 4 gives x = 2/3 (closed form, classic textbook example)
    expectRelative(r.n[0], 1 / 3, REL, 'acid'); // 1 − 2/3 (closed form)
    expectRelative(r.activities[2], 1 / 3, REL, 'ester mole fraction'); // (2/3)/2 (closed form)
  });

  it('1:3 excess alcohol: the root of 3x² − 16x + 12 = 0', () => {
    const r = solveEquilibrium(problem(3));
    expect(r.status).toBe('converged');
    const x = (8 - 2 * Math.sqrt(7)) / 3; // x²/((1 − x)(3 − x)) = 4 ⇒ x = (16 − √112)/6 (closed form from the quadratic)
    expectRelative(r.n[2], x, REL, 'ester');
    expectRelative(r.n[1], 3 - x, REL, 'alcohol');
  });
});

describe('ammonia synthesis N2 + 3 H2 ⇌ 2 NH3 at constant pressure, 1:3 feed', () => {
  // With extent ξ: K·(P/P°)² = 4ξ²(4 − 2ξ)²/(27(1 − ξ)⁴); the square root gives a quadratic
  // whose root is 1 − ξ = 2/√(4 + u), u = √(27K)·P/P° (closed form derived here).
  const cases: Array<[number, number]> = [
    [9e-5, 2e7], // K near 700 K ≈ 1e-4 (from memory, approximate), 200 bar (common practice for the Haber process)
    [9e-5, 1e5], // same K at 1 bar (closed form)
    [6e5, 1e5], // K near 298 K of order 1e5–1e6 (from memory), 1 bar
  ];
  it.each(cases)('K = %s, P = %s Pa', (K, P) => {
    const problem: EquilibriumProblem = {
      species: [
        { id: 'N2', phase: 'g', n0: 1 },
        { id: 'H2', phase: 'g', n0: 3 },
        { id: 'NH3', phase: 'g', n0: 0 },
      ],
      reactions: [{ label: 'synthesis', nu: [-1, -3, 2], lnK: Math.log(K) }],
      conditions: { kind: 'constant-pressure', T: 700, P },
    };
    const r = solveEquilibrium(problem);
    expect(r.status).toBe('converged');
    const u = (Math.sqrt(27 * K) * P) / STANDARD_PRESSURE;
    const remaining = 2 / Math.sqrt(4 + u); // 1 − ξ (closed form)
    expectRelative(r.n[0], remaining, REL, 'N2');
    expectRelative(r.n[1], 3 * remaining, REL, 'H2');
    expectRelative(r.n[2], 2 * (1 - remaining), REL, 'NH3');
  });
});

describe('CaCO3(s) ⇌ CaO(s) + CO2(g): a solid that may run out', () => {
  const K = 0.5; // illustrative K (P_CO2 = 0.5 bar) of the order of the value near 1100 K (from memory)
  const T = 1100;
  const vessel = (V: number): EquilibriumProblem => ({
    species: [
      { id: 'CaCO3', phase: 's', n0: 1 },
      { id: 'CaO', phase: 's', n0: 0 },
      { id: 'CO2', phase: 'g', n0: 0 },
    ],
    reactions: [{ label: 'calcination', nu: [-1, 1, 1], lnK: Math.log(K) }],
    conditions: { kind: 'constant-volume', T, gasVolume: V },
  });

  it('small closed vessel: CO2 pressure = K·P° with solid left', () => {
    const V = 0.01;
    const r = solveEquilibrium(vessel(V));
    expect(r.status).toBe('converged');
    const nCO2 = (K * STANDARD_PRESSURE * V) / (GAS_CONSTANT * T); // ideal gas at P = K·P° (closed form)
    expectRelative(r.n[2], nCO2, REL, 'CO2');
    expectRelative(r.n[0], 1 - nCO2, REL, 'CaCO3');
    expectRelative(r.pressure, K * STANDARD_PRESSURE, REL, 'pressure');
    expect(r.absentPhases).toEqual([]);
    expect(r.activities[0]).toBe(1); // pure solid present (standard state)
  });

  it('large vessel: all the carbonate decomposes, Q < K, and CaCO3 is reported absent', () => {
    const V = 1;
    const r = solveEquilibrium(vessel(V));
    expect(r.status).toBe('converged');
    expect(r.n[0]).toBe(0); // used up exactly, not 1e-30 (closed form: all converts)
    expectRelative(r.n[2], 1, REL, 'CO2'); // all the carbon as CO2 (closed form)
    expectRelative(r.pressure, (GAS_CONSTANT * T) / V, REL, 'pressure'); // n·R·T/V with n = 1 mol (closed form)
    expect(r.absentPhases).toEqual([0]);
    expect(r.lnQ[0]).toBeLessThan(Math.log(K)); // Q = P/P° < K: would go on but the solid is gone
    expect(r.activities[0]).toBe(0); // absent solid (documented convention)
  });

  it('at constant pressure the carbonate decomposes fully or not at all (pure CO2 gas)', () => {
    const atP = (P: number): EquilibriumProblem => ({ ...vessel(1), conditions: { kind: 'constant-pressure', T, P } });
    const low = solveEquilibrium(atP(0.2e5)); // P < K·P°: decomposition wins (closed form: Q = P/P° < K always)
    expect(low.status).toBe('converged');
    expect(low.n[0]).toBe(0);
    expectRelative(low.n[1], 1, REL, 'CaO');
    expect(low.absentPhases).toEqual([0]);
    const high = solveEquilibrium(atP(2e5)); // P > K·P°: no CO2 can exist (closed form: Q = P/P° > K)
    expect(high.status).toBe('converged');
    expect(high.n).toEqual([1, 0, 0]);
    expect(high.absentPhases).toEqual([1]); // CaO never forms
  });
});

describe('NH4Cl(s) ⇌ NH3(g) + HCl(g) at constant pressure: a whole gas phase that forms or not', () => {
  // With only these two gases, y = 1/2 each, so Q = (P/2P°)² whatever the amount: the salt
  // decomposes completely if K > (P/2P°)² and not at all otherwise (closed form). A second,
  // unrelated reaction in solution sends the same question through the general path.
  const problem = (K: number, secondReaction: boolean): EquilibriumProblem => ({
    species: [
      { id: 'NH4Cl', phase: 's', n0: 1 },
      { id: 'NH3', phase: 'g', n0: 0 },
      { id: 'HCl', phase: 'g', n0: 0 },
      { id: 'X', phase: 'aq', n0: 1 },
      { id: 'Y', phase: 'aq', n0: 0 },
    ],
    reactions: [
      { label: 'sublimation', nu: [-1, 1, 1, 0, 0], lnK: Math.log(K) },
      ...(secondReaction ? [{ label: 'isomerisation', nu: [0, 0, 0, -1, 1], lnK: 0 }] : []),
    ],
    conditions: { kind: 'constant-pressure', T: 600, P: 1e5 },
    liquidVolume: 1e-3,
  });
  it.each([[false], [true]])('second reaction: %s', (second) => {
    const below = solveEquilibrium(problem(0.2, second)); // 0.2 < (1/2)² = 0.25 (closed form)
    expect(below.status).toBe('converged');
    expect(below.n.slice(0, 3)).toEqual([1, 0, 0]);
    expect(below.gasMoles).toBe(0);
    const above = solveEquilibrium(problem(0.3, second)); // 0.3 > 0.25 (closed form)
    expect(above.status).toBe('converged');
    expect(above.n[0]).toBe(0);
    expectRelative(above.n[1], 1, REL, 'NH3'); // all of the salt (closed form)
    expect(above.absentPhases).toEqual([0]);
    expectRelative(above.lnQ[0], 2 * Math.log(0.5), REL, 'ln Q = ln (P/2P°)²'); // closed form at P = P°
    if (second) expectRelative(above.n[4], 0.5, REL, 'Y'); // K = 1 for X ⇌ Y (closed form)
  });
});

describe('weak acid in water', () => {
  // Ka of acetic acid ≈ 1.8e-5 at 25 °C (from memory; published tables give 1.75e-5)
  const Ka = 1.8e-5;
  it.each([
    [0.1, 1e-3], // 0.1 M in 1 L (common textbook example)
    [1e-4, 2e-3], // dilute: dissociation not negligible (closed form covers it)
  ])('HA + H2O ⇌ H3O+ + A-, C = %s M, V = %s m^3', (C, V) => {
    const nHA = C * V * STANDARD_CONCENTRATION;
    const problem: EquilibriumProblem = {
      species: [
        { id: 'HA', phase: 'aq', n0: nHA },
        { id: 'H2O', phase: 'solvent', n0: 55.5 * V * STANDARD_CONCENTRATION },
        { id: 'H3O+', phase: 'aq', n0: 0 },
        { id: 'A-', phase: 'aq', n0: 0 },
      ],
      reactions: [{ label: 'Ka', nu: [-1, -1, 1, 1], lnK: Math.log(Ka) }],
      conditions: { kind: 'constant-pressure', T: 298.15, P: 1e5 },
      liquidVolume: V,
    };
    const r = solveEquilibrium(problem);
    expect(r.status).toBe('converged');
    // x²/(C − x) = Ka ⇒ x = 2·Ka·C/(Ka + √(Ka² + 4·Ka·C)) (closed form, quadratic formula in stable form)
    const x = (2 * Ka * C) / (Ka + Math.sqrt(Ka * Ka + 4 * Ka * C));
    expectRelative(r.n[2], x * V * STANDARD_CONCENTRATION, REL, 'H3O+');
    expectRelative(r.n[0], (C - x) * V * STANDARD_CONCENTRATION, REL, 'HA');
    expectRelative(r.activities[2], x, REL, 'a(H3O+) = c/c°');
    expect(r.activities[1]).toBe(1); // solvent activity 1 (standard state)
  });
});

describe('extreme K and trace amounts (log-space closed forms)', () => {
  const T = 500;
  const V = 0.02;
  /** A(g) ⇌ B(g) at constant volume: B/A = K, so ln B = ln n + ln K − ln(1 + K) (closed form). */
  it.each([[-690], [690], [-69.0775527898214]])('A ⇌ B with ln K = %s', (lnK) => {
    const n = 3;
    const problem: EquilibriumProblem = {
      species: [
        { id: 'A', phase: 'g', n0: n },
        { id: 'B', phase: 'g', n0: 0 },
      ],
      reactions: [{ label: 'isomerisation', nu: [-1, 1], lnK }],
      conditions: { kind: 'constant-volume', T, gasVolume: V },
    };
    const r = solveEquilibrium(problem);
    expect(r.status).toBe('converged');
    const lnOnePlusK = lnK > 0 ? lnK + Math.log1p(Math.exp(-lnK)) : Math.log1p(Math.exp(lnK)); // ln(1 + K), stable (closed form)
    expectRelative(r.n[1], Math.exp(Math.log(n) + lnK - lnOnePlusK), REQUIRED, 'B');
    expectRelative(r.n[0], Math.exp(Math.log(n) - lnOnePlusK), REQUIRED, 'A');
  });

  it('a trace product near 1e-30 of the total: A(aq) ⇌ 2 B(aq)', () => {
    const n = 1;
    const Vl = 1e-3;
    const lnK = Math.log(1e-60); // makes B ≈ 1e-30 mol of 1 mol (closed form below)
    const problem: EquilibriumProblem = {
      species: [
        { id: 'A', phase: 'aq', n0: n },
        { id: 'B', phase: 'aq', n0: 0 },
      ],
      reactions: [{ label: 'split', nu: [-1, 2], lnK }],
      conditions: { kind: 'constant-pressure', T: 298.15, P: 1e5 },
      liquidVolume: Vl,
    };
    const r = solveEquilibrium(problem);
    expect(r.status).toBe('converged');
    // B²/((n − B/2)·V·c°) = K ⇒ B² + p·B − 2p·n = 0 with p = K·V·c°/2 (closed form, stable root)
    const p = (Math.exp(lnK) * Vl * STANDARD_CONCENTRATION) / 2;
    const B = (4 * p * n) / (p + Math.sqrt(p * p + 8 * p * n));
    expect(B / n).toBeLessThan(2e-30); // the case really is trace: B ≈ √(K·V·c°·n) = 1e-30 (closed form)
    expectRelative(r.n[1], B, REQUIRED, 'B');
    expectRelative(r.n[0], n - B / 2, REQUIRED, 'A');
  });

  it('excess reagent with K = 1e300: the limiting reagent left is ~1e-300 relative, the excess keeps its 1e-12', () => {
    const nA = 1;
    const excess = 2 ** -40; // ≈ 9.1e-13 mol more B than A, exactly representable
    const lnK = 690;
    const alpha = (GAS_CONSTANT * T) / (V * STANDARD_PRESSURE); // a = α·n at constant volume (closed form)
    const problem: EquilibriumProblem = {
      species: [
        { id: 'A', phase: 'g', n0: nA },
        { id: 'B', phase: 'g', n0: nA + excess },
        { id: 'C', phase: 'g', n0: 0 },
      ],
      reactions: [{ label: 'combination', nu: [-1, -1, 1], lnK }],
      conditions: { kind: 'constant-volume', T, gasVolume: V },
    };
    const r = solveEquilibrium(problem);
    expect(r.status).toBe('converged');
    // With A left: C = nA − A, B = excess + A, and C/(α·A·B) = K ⇒ Kα·A² + b·A − nA = 0, b = Kα·e + 1;
    // the stable root A = 2nA/(b·(1 + √(1 + 4Kα·nA/b²))) is evaluated in logs (closed form; Kα·e ≈ 2e288 overflows b²)
    const lnKa = lnK + Math.log(alpha);
    const lnB = lnKa + Math.log(excess) + Math.log1p(Math.exp(-(lnKa + Math.log(excess))));
    const ratio = Math.exp(Math.log(4) + lnKa + Math.log(nA) - 2 * lnB);
    const A = Math.exp(Math.log(2 * nA) - lnB - Math.log(1 + Math.sqrt(1 + ratio)));
    expect(A).toBeLessThan(1e-287); // the limiting reagent really is trace (closed form)
    expectRelative(r.n[0], A, REQUIRED, 'A (limiting, trace)');
    expectRelative(r.n[1], excess + A, REQUIRED, 'B (excess)');
    expectRelative(r.n[2], nA - A, REQUIRED, 'C');
  });

  it('two independent reactions at ln K = ∓690 together (Newton path)', () => {
    const problem: EquilibriumProblem = {
      species: [
        { id: 'A', phase: 'g', n0: 1 },
        { id: 'B', phase: 'g', n0: 0 },
        { id: 'C', phase: 'g', n0: 2 },
        { id: 'D', phase: 'g', n0: 0 },
      ],
      reactions: [
        { label: 'down', nu: [-1, 1, 0, 0], lnK: -690 },
        { label: 'up', nu: [0, 0, -1, 1], lnK: 690 },
      ],
      conditions: { kind: 'constant-volume', T, gasVolume: V },
    };
    const r = solveEquilibrium(problem);
    expect(r.status).toBe('converged');
    expect(r.method).toBe('newton');
    expectRelative(r.n[1], Math.exp(-690 - Math.log1p(Math.exp(-690))), REQUIRED, 'B'); // n·K/(1 + K) (closed form)
    expectRelative(r.n[2], 2 * Math.exp(-690 - Math.log1p(Math.exp(-690))), REQUIRED, 'C'); // n/(1 + K) (closed form)
  });

  it('a chain A ⇌ B ⇌ C with a product at 1e-280 of the total (Newton path)', () => {
    const lnK1 = Math.log(1e-30);
    const lnK2 = Math.log(1e-250);
    const n = 4;
    const problem: EquilibriumProblem = {
      species: [
        { id: 'A', phase: 'aq', n0: n },
        { id: 'B', phase: 'aq', n0: 0 },
        { id: 'C', phase: 'aq', n0: 0 },
      ],
      reactions: [
        { label: 'first', nu: [-1, 1, 0], lnK: lnK1 },
        { label: 'second', nu: [0, -1, 1], lnK: lnK2 },
      ],
      conditions: { kind: 'constant-pressure', T: 298.15, P: 1e5 },
      liquidVolume: 1e-3,
    };
    const r = solveEquilibrium(problem);
    expect(r.status).toBe('converged');
    // B = K1·A, C = K2·B, A + B + C = n ⇒ ln C = ln n + ln K1 + ln K2 − ln(1 + K1 + K1·K2) (closed form)
    const lnDenominator = Math.log1p(Math.exp(lnK1) + Math.exp(lnK1 + lnK2));
    expectRelative(r.n[2], Math.exp(Math.log(n) + lnK1 + lnK2 - lnDenominator), REQUIRED, 'C');
    expectRelative(r.n[1], Math.exp(Math.log(n) + lnK1 - lnDenominator), REQUIRED, 'B');
  });
});
