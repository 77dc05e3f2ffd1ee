// Tests for quantities and units (server/src/chem/units.ts): conversions to SI
// against the unit definitions, strict number reading, and that unit text is
// never evaluated as an expression.
import { describe, expect, it } from 'vitest';
import { formatQuantity, parseNumber, parseUnit, type Dimension } from '../../server/src/chem/units';

function si(unit: string, value: number): { dimension: Dimension; value: number } {
  const r = parseUnit(unit);
  if (!r.ok) throw new Error(`${unit}: ${r.message}`);
  return { dimension: r.dimension, value: r.toSI(value) };
}

const relClose = (actual: number, expected: number, rel = 1e-12): void => {
  expect(Math.abs(actual - expected)).toBeLessThanOrEqual(rel * Math.abs(expected));
};

describe('unit conversion to SI', () => {
  const cases: Array<[string, number, Dimension, number, string]> = [
    ['atm', 1, 'pressure', 101325, 'standard atmosphere, exact by definition (SI Brochure, 9th ed.)'],
    ['bar', 1, 'pressure', 1e5, '1 bar = 10^5 Pa exactly (SI Brochure, 9th ed.)'],
    ['kPa', 2.5, 'pressure', 2500, 'SI prefix kilo (SI Brochure)'],
    ['torr', 760, 'pressure', 101325, '760 torr = 1 atm by definition (NIST SP 811)'],
    ['mmHg', 1, 'pressure', 133.322387415, 'conventional millimetre of mercury (NIST SP 811)'],
    ['psi', 1, 'pressure', 6894.757293168, 'NIST SP 811: 1 psi = 6.894 757 293 168 kPa'],
    ['°C', 0, 'temperature', 273.15, 'Celsius zero = 273.15 K exactly (SI Brochure)'],
    ['°C', 60, 'temperature', 333.15, 'Celsius offset 273.15 (SI Brochure)'],
    ['℃', 25, 'temperature', 298.15, 'Celsius offset 273.15 (SI Brochure)'],
    ['K', 298.15, 'temperature', 298.15, 'kelvin is the SI unit'],
    ['°F', 212, 'temperature', 373.15, 'water boils at 212 °F = 100 °C (common practice)'],
    ['mL', 500, 'volume', 5e-4, '1 mL = 10^-6 m^3 (SI Brochure)'],
    ['L', 2.5, 'volume', 2.5e-3, '1 L = 10^-3 m^3 (SI Brochure)'],
    ['g', 116, 'mass', 0.116, 'SI prefix (SI Brochure)'],
    ['mmol', 5, 'amount', 0.005, 'SI prefix milli (SI Brochure)'],
    ['kJ/mol', -285.8, 'molar-energy', -285800, 'SI prefix kilo (SI Brochure)'],
    ['J/(mol K)', 70, 'molar-entropy', 70, 'already SI'],
    ['g/mL', 0.87, 'density', 870, '1 g/mL = 1000 kg/m^3 (SI Brochure)'],
    ['mol/L', 1, 'concentration', 1000, '1 mol/L = 1000 mol/m^3 (SI Brochure)'],
    ['M', 0.5, 'concentration', 500, 'molarity M = mol/L (IUPAC Green Book, common practice)'],
    ['mM', 2, 'concentration', 2, 'millimolar = mol/m^3 (common practice)'],
    ['%', 98, 'percent', 0.98, 'per cent = 1/100 (common practice)'],
    ['equiv', 3, 'equivalents', 3, 'equivalents are a plain multiple (common practice)'],
  ];
  for (const [unit, value, dimension, expected, source] of cases) {
    it(`${value} ${unit} -> ${expected} (${source})`, () => {
      const r = si(unit, value);
      expect(r.dimension).toBe(dimension);
      relClose(r.value, expected);
    });
  }
});

describe('unit text is read, never evaluated', () => {
  for (const text of ['sin(2)', '1+1', 'x = 2', 'import("fs")', 'evaluate', 'kg 5', '2 kg', 'f(x)', 'a.b']) {
    it(`rejects \`${text}\``, () => {
      expect(parseUnit(text).ok).toBe(false);
    });
  }
  it('rejects a unit of a quantity a notebook does not use', () => {
    const r = parseUnit('m/s');
    expect(r.ok).toBe(false);
  });
});

describe('numbers', () => {
  it('reads plain decimal and exponent forms', () => {
    expect(parseNumber('2')).toEqual({ ok: true, value: 2 });
    expect(parseNumber('-2.5e3')).toEqual({ ok: true, value: -2500 });
    expect(parseNumber('.5')).toEqual({ ok: true, value: 0.5 });
    expect(parseNumber('1e-300')).toEqual({ ok: true, value: 1e-300 });
  });
  for (const bad of ['NaN', 'Infinity', '-Infinity', '1e400', '1e-400', '0x10', '1,5', '2..3', '', '+', '1/2', '5e']) {
    it(`rejects \`${bad}\``, () => {
      expect(parseNumber(bad).ok).toBe(false);
    });
  }
});

describe('formatting', () => {
  it('shows temperatures in °C and K', () => {
    expect(formatQuantity(333.15, 'temperature')).toBe('60 °C (333.15 K)');
  });
  it('shows pressures in bar', () => {
    expect(formatQuantity(101325, 'pressure')).toBe('1.01325 bar');
  });
});
