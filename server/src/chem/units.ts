// Quantities with units: a number written by the chemist plus a unit text,
// converted to SI with a private mathjs instance. Only unit texts are handed to
// mathjs (Unit.parse), never expressions: nothing in a notebook is evaluated.
import { create, createUnitDependencies, unitDependencies, type MathJsInstance, type Unit } from 'mathjs';

/** The kinds of quantity a notebook may write, each with its SI unit. */
export type Dimension =
  | 'temperature' // K
  | 'pressure' // Pa
  | 'volume' // m^3
  | 'mass' // kg
  | 'amount' // mol
  | 'molar-energy' // J/mol
  | 'molar-entropy' // J/(mol K)
  | 'heat-capacity' // J/K
  | 'density' // kg/m^3
  | 'concentration' // mol/m^3
  | 'percent' // dimensionless fraction (98 % -> 0.98)
  | 'equivalents' // multiples of the basis species' amount
  | 'dimensionless';

export const SI_UNIT_TEXT: Readonly<Record<Dimension, string>> = {
  temperature: 'K',
  pressure: 'Pa',
  volume: 'm^3',
  mass: 'kg',
  amount: 'mol',
  'molar-energy': 'J/mol',
  'molar-entropy': 'J/(mol K)',
  'heat-capacity': 'J/K',
  density: 'kg/m^3',
  concentration: 'mol/m^3',
  percent: '1',
  equivalents: 'equiv',
  dimensionless: '1',
};

/** Largest magnitude accepted for any written number; beyond it a value is surely a typo. */
export const MAX_ABS_NUMBER = 1e300;

let instance: MathJsInstance | undefined;

/** The private mathjs instance, with the units chemists write that mathjs lacks. */
function math(): MathJsInstance {
  if (instance) return instance;
  // Only the unit machinery: loading all of mathjs would slow the server's start for nothing.
  const m = create({ unitDependencies, createUnitDependencies }, {});
  // Molarity is not a built-in mathjs unit: define it explicitly (1 M = 1 mol/L).
  m.createUnit('M', { definition: '1 mol/L', prefixes: 'short' });
  // mathjs rounds these; use the definitions instead (NIST SP 811): 1 torr = 101325/760 Pa,
  // 1 mmHg = 133.322387415 Pa (conventional), 1 psi = 0.45359237 kg × 9.80665 m/s² / (0.0254 m)².
  m.createUnit(
    {
      torr: { definition: `${101325 / 760} Pa` },
      mmHg: { definition: '133.322387415 Pa' },
      psi: { definition: `${(0.45359237 * 9.80665) / (0.0254 * 0.0254)} Pa` },
    },
    { override: true },
  );
  instance = m;
  return m;
}

const REFERENCE_UNITS: ReadonlyArray<[Exclude<Dimension, 'percent' | 'equivalents' | 'dimensionless'>, string]> = [
  ['temperature', 'K'],
  ['pressure', 'Pa'],
  ['volume', 'm^3'],
  ['mass', 'kg'],
  ['amount', 'mol'],
  ['molar-energy', 'J/mol'],
  ['molar-entropy', 'J/(mol K)'],
  ['heat-capacity', 'J/K'],
  ['density', 'kg/m^3'],
  ['concentration', 'mol/m^3'],
];

/** A strictly written decimal number: optional sign, digits, optional fraction and exponent. */
export const NUMBER_PATTERN = /^[+\-−]?(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][+\-−]?\d+)?$/;

export type NumberResult = { ok: true; value: number } | { ok: false; message: string };

/** Parses a number exactly as written (no expressions, no NaN/Infinity words). */
export function parseNumber(text: string): NumberResult {
  if (!NUMBER_PATTERN.test(text)) {
    return { ok: false, message: `expected a number such as 2, 0.5 or 1.2e-3, found \`${text}\`` };
  }
  const value = Number(text.replace(/−/g, '-'));
  if (!Number.isFinite(value) || Math.abs(value) > MAX_ABS_NUMBER) {
    return { ok: false, message: `the number \`${text}\` is too large to be meaningful (limit ${MAX_ABS_NUMBER})` };
  }
  const mantissa = text.split(/[eE]/)[0];
  if ((value === 0 && /[1-9]/.test(mantissa)) || (value !== 0 && Math.abs(value) < 1 / MAX_ABS_NUMBER)) {
    return { ok: false, message: `the number \`${text}\` is too small to be meaningful (limit ${1 / MAX_ABS_NUMBER})` };
  }
  return { ok: true, value };
}

export type UnitResult = { ok: true; dimension: Dimension; toSI: (value: number) => number } | { ok: false; message: string };

/** Characters a unit text may contain; anything else is rejected before mathjs sees it. */
const UNIT_TEXT_PATTERN = /^[A-Za-zµμΩ°℃][A-Za-z0-9µμΩ°℃ /*^·()\-−]*$/;

function normaliseUnitText(text: string): string {
  return text
    .replace(/℃/g, 'degC')
    .replace(/°\s*C\b/g, 'degC')
    .replace(/°\s*F\b/g, 'degF')
    .replace(/°\s*K\b/g, 'K')
    .replace(/·/g, ' ')
    .replace(/−/g, '-')
    .replace(/μ/g, 'u')
    .replace(/µ/g, 'u')
    .trim();
}

const cache = new Map<string, UnitResult>();

/** Reads a unit text (`g/mL`, `°C`, `kJ/mol`, `%`, `equiv`) and says what it measures. */
export function parseUnit(text: string): UnitResult {
  const hit = cache.get(text);
  if (hit) return hit;
  const result = parseUnitUncached(text);
  cache.set(text, result);
  return result;
}

function parseUnitUncached(text: string): UnitResult {
  const trimmed = text.trim();
  if (trimmed === '%') return { ok: true, dimension: 'percent', toSI: (v) => v / 100 };
  if (trimmed === 'equiv' || trimmed === 'eq') return { ok: true, dimension: 'equivalents', toSI: (v) => v };
  if (!UNIT_TEXT_PATTERN.test(trimmed)) {
    return { ok: false, message: `\`${trimmed}\` is not a unit` };
  }
  const m = math();
  const parsed = readUnit(m, trimmed);
  if (!parsed.ok) return parsed;
  const unit = parsed.unit;
  const unitText = normaliseUnitText(trimmed);
  for (const [dimension, reference] of REFERENCE_UNITS) {
    if (unit.equalBase(m.unit(reference))) {
      return { ok: true, dimension, toSI: linearToSI(m, unitText, reference) };
    }
  }
  if (unit.dimensions.every((d) => d === 0)) {
    return { ok: true, dimension: 'dimensionless', toSI: linearToSI(m, unitText, '') };
  }
  return { ok: false, message: `\`${trimmed}\` is a unit of no quantity a notebook uses here` };
}

/**
 * Every unit a notebook accepts converts to SI linearly (°C and °F with an offset), so the
 * conversion is read from mathjs once and then applied as slope and intercept.
 */
function linearToSI(m: MathJsInstance, unitText: string, reference: string): (v: number) => number {
  const intercept = m.unit(0, unitText).toNumber(reference);
  const slope = m.unit(1, unitText).toNumber(reference) - intercept;
  return intercept === 0 ? (v) => v * slope : (v) => intercept + v * slope;
}

export type UnitPowerResult =
  | { ok: true; base: 'pressure' | 'concentration' | 'dimensionless'; power: number; siFactor: number }
  | { ok: false; message: string };

/** Powers we accept for Kp and Kc units: Δn may be a half-integer when coefficients are fractions. */
const POWER_DENOMINATOR = 2;

/**
 * Reads the unit of a pressure- or concentration-based equilibrium constant (`atm^-2`,
 * `bar`, `kPa^-1`, `(mol/L)^-1`, `L/mol`, `M^2`) as a power of a pressure or concentration.
 * `siFactor` is the SI value of one written unit (Pa^power or (mol/m^3)^power).
 */
export function parseUnitPower(text: string): UnitPowerResult {
  const trimmed = text.trim();
  // mathjs reads no power of a parenthesised unit and no leading `1/`; both are common in K units.
  const grouped = /^\((.+)\)\s*\^\s*\(?([+\-−]?\d+(?:\.\d+)?(?:\/\d+)?)\)?$/.exec(trimmed);
  const reciprocal = /^1\s*\/\s*(.+)$/.exec(trimmed);
  if (grouped || reciprocal) {
    const inner = parseUnitPower(grouped ? grouped[1] : reciprocal![1]);
    if (!inner.ok) return inner;
    let exponent = -1;
    if (grouped) {
      const [num, den] = grouped[2].replace('−', '-').split('/');
      exponent = Number(num) / (den ? Number(den) : 1);
    }
    const power = inner.power * exponent;
    if (!Number.isInteger(power * POWER_DENOMINATOR)) return { ok: false, message: `\`${trimmed}\`: powers must be whole or half numbers` };
    return { ok: true, base: inner.base, power, siFactor: inner.siFactor ** exponent };
  }
  if (!/^[A-Za-z(µμ°][A-Za-z0-9µμ °/*^·()\-−+.]*$/.test(trimmed)) return { ok: false, message: `\`${trimmed}\` is not a unit` };
  const m = math();
  const parsed = readUnit(m, trimmed);
  if (!parsed.ok) return parsed;
  const unit = parsed.unit;
  const dims = unit.dimensions;
  const siFactor = m.unit(1, normaliseUnitText(trimmed)).toSI().toNumber();
  if (dims.every((d) => d === 0)) return { ok: true, base: 'dimensionless', power: 0, siFactor };
  for (const [base, reference] of [
    ['pressure', 'Pa'],
    ['concentration', 'mol/m^3'],
  ] as const) {
    const refDims = m.unit(reference).dimensions;
    let power: number | undefined;
    let consistent = true;
    for (let i = 0; i < dims.length; i++) {
      if (refDims[i] === 0) {
        if (dims[i] !== 0) consistent = false;
        continue;
      }
      const p = dims[i] / refDims[i];
      if (power === undefined) power = p;
      else if (Math.abs(power - p) > 1e-12) consistent = false;
    }
    if (consistent && power !== undefined && Number.isInteger(power * POWER_DENOMINATOR)) {
      return { ok: true, base, power, siFactor };
    }
  }
  return { ok: false, message: `\`${trimmed}\` is not a power of a pressure or concentration unit` };
}

/** A valueless mathjs unit read from unit text, or why it cannot be read. */
function readUnit(m: MathJsInstance, trimmed: string): { ok: true; unit: Unit } | { ok: false; message: string } {
  let unit: Unit;
  try {
    unit = m.Unit.parse(normaliseUnitText(trimmed)) as Unit;
  } catch (e) {
    const detail = e instanceof Error && !/not found/.test(e.message) ? ` (${e.message.replace(/\.$/, '')})` : '';
    return { ok: false, message: `unknown unit \`${trimmed}\`${detail}` };
  }
  if ((unit as unknown as { value: unknown }).value !== null) {
    return { ok: false, message: `\`${trimmed}\` contains a number; write the number before the unit` };
  }
  return { ok: true, unit };
}

/** Human name of a dimension, for messages ("expected a temperature"). */
export function describeDimension(d: Dimension): string {
  switch (d) {
    case 'molar-energy':
      return 'molar energy (e.g. kJ/mol)';
    case 'molar-entropy':
      return 'molar entropy or heat capacity (e.g. J/(mol K))';
    case 'heat-capacity':
      return 'heat capacity (e.g. kJ/K)';
    case 'concentration':
      return 'concentration (e.g. mol/L)';
    case 'percent':
      return 'percentage (%)';
    case 'equivalents':
      return 'equivalents (equiv)';
    case 'temperature':
      return 'temperature (e.g. °C or K)';
    case 'pressure':
      return 'pressure (e.g. bar, atm, kPa)';
    case 'volume':
      return 'volume (e.g. mL, L)';
    case 'mass':
      return 'mass (e.g. g, kg)';
    case 'amount':
      return 'amount of substance (e.g. mol, mmol)';
    case 'density':
      return 'density (e.g. g/mL)';
    case 'dimensionless':
      return 'plain number';
  }
}

/** Formats an SI value for display in a common lab unit. */
export function formatQuantity(value: number, dimension: Dimension): string {
  switch (dimension) {
    case 'temperature':
      return `${trim(value - 273.15)} °C (${trim(value)} K)`;
    case 'pressure':
      return `${trim(value / 1e5)} bar`;
    case 'volume':
      return value < 1e-3 ? `${trim(value * 1e6)} mL` : `${trim(value * 1e3)} L`;
    case 'mass':
      return `${trim(value * 1e3)} g`;
    case 'amount':
      return `${trim(value)} mol`;
    case 'molar-energy':
      return `${trim(value / 1e3)} kJ/mol`;
    case 'molar-entropy':
      return `${trim(value)} J/(mol K)`;
    case 'heat-capacity':
      return `${trim(value / 1000)} kJ/K`;
    case 'density':
      return `${trim(value / 1e3)} g/mL`;
    case 'concentration':
      return `${trim(value / 1e3)} mol/L`;
    case 'percent':
      return `${trim(value * 100)} %`;
    case 'equivalents':
      return `${trim(value)} equiv`;
    case 'dimensionless':
      return trim(value);
  }
}

/** Up to 6 significant figures, without trailing zeros. */
export function trim(value: number): string {
  if (value === 0) return '0';
  const abs = Math.abs(value);
  if (abs >= 1e6 || abs < 1e-4) return value.toExponential(5).replace(/\.?0+e/, 'e');
  return String(Number(value.toPrecision(6)));
}
