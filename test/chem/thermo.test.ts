// Tests for K at temperature (server/src/chem/thermo.ts): the integrated van 't
// Hoff equation, ΔG° = ΔH° − TΔS°, Hess's law and the consistency warnings,
// against closed forms and CODATA / NIST-JANAF values.
import { describe, expect, it } from 'vitest';
import {
  consistencyWarnings,
  gibbsFromLnK,
  hessData,
  lnKAt,
  lnKFromEnthalpyEntropy,
  lnKFromGibbs,
  R,
  T_REF,
  vantHoff,
} from '../../server/src/chem/thermo';

const rel = (a: number, b: number): number => Math.abs(a - b) / Math.abs(b);

describe('constants', () => {
  it('R is the exact 2019 SI value', () => {
    expect(R).toBe(8.314462618); // CODATA 2018: R = N_A k = 8.314 462 618... J/(mol K), exact
  });
});

describe('van \'t Hoff', () => {
  it('constant ΔH°: ln(K2/K1) = −ΔH°/R (1/T2 − 1/T1) (closed form)', () => {
    const lnK1 = Math.log(4);
    const dH = -20e3;
    const lnK2 = vantHoff(lnK1, 333.15, 363.15, dH);
    expect(lnK2).toBeCloseTo(lnK1 - (dH / R) * (1 / 363.15 - 1 / 333.15), 12); // closed form
    expect(lnK2).toBeLessThan(lnK1); // exothermic: K falls on heating (common practice)
  });
  it('is reversible: moving there and back returns the same K, with ΔCp° too (closed form)', () => {
    const there = vantHoff(1.3, 298.15, 500, 45e3, -30);
    // ΔH° at 500 K for the way back: ΔH(T) = ΔH1 + ΔCp (T − T1) (closed form, Kirchhoff)
    const back = vantHoff(there, 500, 298.15, 45e3 + -30 * (500 - 298.15), -30);
    expect(back).toBeCloseTo(1.3, 12);
  });
  it('agrees with ΔG° = ΔH° − TΔS° when both describe the same reaction (closed form)', () => {
    const dH = -91.8e3;
    const dS = -198.1;
    const dCp = -45.3;
    const k298 = lnKFromEnthalpyEntropy(dH, dS, dCp, T_REF);
    const viaVantHoff = vantHoff(k298, T_REF, 700, dH, dCp);
    expect(viaVantHoff).toBeCloseTo(lnKFromEnthalpyEntropy(dH, dS, dCp, 700), 10);
  });
});

describe('K from ΔfG°, ΔfH° and S° (CODATA key values, from memory)', () => {
  // CODATA 1989 key values (from memory): ΔfH°(H2O, l) = −285.830 kJ/mol;
  // S°: H2O(l) 69.95, H2(g) 130.680, O2(g) 205.152 J/(mol K); and NIST-JANAF / CODATA
  // ΔfG°(H2O, l) = −237.14 kJ/mol.
  const water = hessData([
    { nu: -1, data: { dfH: 0, S: 130.68 } },
    { nu: -0.5, data: { dfH: 0, S: 205.152 } },
    { nu: 1, data: { dfH: -285.83e3, S: 69.95 } },
  ]);
  it('Hess\'s law gives ΔrG° of water formation within 0.05 kJ/mol of the tabulated ΔfG°', () => {
    expect(water).toBeDefined();
    const k = lnKAt(water!, T_REF)!;
    expect(k.source.kind).toBe('enthalpy-entropy');
    expect(Math.abs(gibbsFromLnK(k.lnK, T_REF) - -237.14e3)).toBeLessThan(50); // CODATA ΔfG°(H2O, l), from memory
  });
  it('ammonia: K(298.15 K) from ΔfG° = −16.367 kJ/mol (NIST-JANAF, from memory) for N2 + 3 H2 ⇌ 2 NH3', () => {
    const nh3 = hessData([
      { nu: -1, data: { dfG: 0, dfH: 0 } },
      { nu: -3, data: { dfG: 0, dfH: 0 } },
      { nu: 2, data: { dfG: -16.367e3, dfH: -45.898e3 } },
    ])!;
    const k = lnKAt(nh3, T_REF)!;
    expect(k.source.kind).toBe('given');
    // ln K = −ΔrG°/(R T) = 2 × 16367 / (8.314462618 × 298.15) = 13.2047 (closed form)
    expect(k.lnK).toBeCloseTo((2 * 16367) / (R * 298.15), 9);
    // and K at 700 K falls (exothermic, ΔrH° = −91.8 kJ/mol): van 't Hoff, constant ΔH (closed form)
    const k700 = lnKAt(nh3, 700)!;
    expect(k700.source.kind).toBe('van-t-hoff');
    expect(k700.lnK).toBeCloseTo(k.lnK - (-91.796e3 / R) * (1 / 700 - 1 / T_REF), 9);
  });
});

describe('choosing the route to K(T)', () => {
  it('uses a K given at the temperature itself', () => {
    const k = lnKAt({ points: [{ lnK: 2, T: 333.15, written: 'K' }] }, 333.15)!;
    expect(k.source.kind).toBe('given');
    expect(k.lnK).toBe(2);
  });
  it('interpolates ln K in 1/T through two given points (van \'t Hoff, closed form)', () => {
    const k = lnKAt(
      {
        points: [
          { lnK: 1, T: 300, written: 'K' },
          { lnK: 3, T: 400, written: 'K' },
        ],
      },
      350,
    )!;
    expect(k.source.kind).toBe('two-point');
    const slope = (3 - 1) / (1 / 400 - 1 / 300);
    expect(k.lnK).toBeCloseTo(1 + slope * (1 / 350 - 1 / 300), 12); // closed form
  });
  it('takes K as constant with a warning when it has no ΔH°', () => {
    const k = lnKAt({ points: [{ lnK: 1.5, T: 298.15, written: 'K' }] }, 350)!;
    expect(k.source.kind).toBe('assumed-constant');
    expect(k.lnK).toBe(1.5);
    expect(k.warnings.some((w) => w.includes('taken as constant'))).toBe(true);
  });
  it('uses ΔH° and ΔS° when no K is given', () => {
    const k = lnKAt({ points: [], dH: -10e3, dS: -20 }, 400)!;
    expect(k.source.kind).toBe('enthalpy-entropy');
    expect(k.lnK).toBeCloseTo(-(-10e3 - 400 * -20) / (R * 400), 12); // closed form
  });
  it('returns undefined with no data', () => {
    expect(lnKAt({ points: [] }, 300)).toBeUndefined();
  });
  it('ln K from ΔG° and back (closed form)', () => {
    expect(gibbsFromLnK(lnKFromGibbs(-12.5e3, 310), 310)).toBeCloseTo(-12.5e3, 8);
  });
});

describe('consistency warnings (more than 1 % apart)', () => {
  it('warns when K and ΔH°/ΔS° disagree by more than 1 %, and says by how much', () => {
    const dH = -20e3;
    const dS = -50;
    const lnK = lnKFromEnthalpyEntropy(dH, dS, undefined, 300);
    expect(consistencyWarnings({ points: [{ lnK: lnK + 0.005, T: 300, written: 'K' }], dH, dS })).toEqual([]);
    const w = consistencyWarnings({ points: [{ lnK: lnK + 0.05, T: 300, written: 'K' }], dH, dS });
    expect(w).toHaveLength(1);
    expect(w[0]).toContain('5.1 %'); // e^0.05 − 1 = 5.13 % (closed form)
  });
  it('warns when two K at one temperature disagree', () => {
    const w = consistencyWarnings({
      points: [
        { lnK: Math.log(4), T: 333.15, written: 'K' },
        { lnK: Math.log(4.2), T: 333.15, written: 'log K' },
      ],
    });
    expect(w).toHaveLength(1);
    expect(w[0]).toContain('5.0 %'); // 4.2/4 − 1 = 5 % (closed form)
  });
  it('warns when two K and ΔH° do not fit the van \'t Hoff line', () => {
    const lnK2 = vantHoff(1, 300, 350, -30e3);
    expect(consistencyWarnings({ points: [{ lnK: 1, T: 300, written: 'K' }, { lnK: lnK2, T: 350, written: 'K' }], dH: -30e3 })).toEqual([]);
    expect(consistencyWarnings({ points: [{ lnK: 1, T: 300, written: 'K' }, { lnK: lnK2 + 0.1, T: 350, written: 'K' }], dH: -30e3 })).toHaveLength(1);
  });
  it('relative difference is a ratio, so tiny K are compared fairly (1e-30 vs 1.02e-30)', () => {
    expect(rel(1.02e-30, 1e-30)).toBeCloseTo(0.02, 12); // closed form
    const w = consistencyWarnings({
      points: [
        { lnK: Math.log(1e-30), T: 300, written: 'K' },
        { lnK: Math.log(1.02e-30), T: 300, written: 'K' },
      ],
    });
    expect(w).toHaveLength(1);
  });
});
