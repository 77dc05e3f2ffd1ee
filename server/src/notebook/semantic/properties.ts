// The property keywords each statement accepts, and reading a quantity node
// (number + unit) into an SI value with diagnostics. One table, so completion,
// hover and the "known properties" message all agree.
import { describeDimension, parseNumber, parseUnit, parseUnitPower, type Dimension } from '../../chem/units';
import type { PropertyLine, PropertyNode, QuantityNode } from '../syntax/tree';
import { diagnostic, type Diagnostic } from './codes';

export interface PropertySpec {
  /**
   * quantity: NUMBER UNIT read into SI; constant: an equilibrium constant whose unit (if any) is
   * a power of a pressure or concentration unit, checked against Δn (Kp, Kc); names: a list.
   */
  readonly kind: 'quantity' | 'constant' | 'names';
  readonly dimensions: readonly Dimension[];
  /** Whether `at TEMPERATURE` belongs to the property: 'required', 'optional' or 'none'. */
  readonly temperature: 'required' | 'optional' | 'none';
  /** Whether the property may be given more than once (K at several temperatures). */
  readonly repeatable: boolean;
  readonly summary: string;
}

const quantity = (dimensions: Dimension[], summary: string, temperature: PropertySpec['temperature'] = 'none'): PropertySpec => ({
  kind: 'quantity',
  dimensions,
  temperature,
  repeatable: temperature === 'required',
  summary,
});
const constant = (summary: string): PropertySpec => ({ kind: 'constant', dimensions: ['dimensionless'], temperature: 'required', repeatable: true, summary });
const names = (summary: string): PropertySpec => ({ kind: 'names', dimensions: [], temperature: 'none', repeatable: false, summary });

export const KNOWN_PROPERTIES: Readonly<Record<'species' | 'reaction' | 'batch', Readonly<Record<string, PropertySpec>>>> = {
  species: {
    density: quantity(['density'], 'density of the pure substance, for amounts given as a volume (e.g. `density 0.87 g/mL`)'),
    purity: quantity(['percent'], 'purity of the material as charged, applied to mass and volume amounts (e.g. `purity 98 %`)'),
    'ΔfG°': quantity(['molar-energy'], 'standard Gibbs energy of formation at 298.15 K (e.g. `ΔfG° = -237.1 kJ/mol`); reactions without data of their own get K by Hess\'s law'),
    'ΔfH°': quantity(['molar-energy'], 'standard enthalpy of formation at 298.15 K (e.g. `ΔfH° = -285.8 kJ/mol`)'),
    'S°': quantity(['molar-entropy'], 'standard molar entropy at 298.15 K (e.g. `S° = 70.0 J/(mol K)`)'),
    'Cp°': quantity(['molar-entropy'], 'standard molar heat capacity, taken as constant (e.g. `Cp° = 75.3 J/(mol K)`)'),
  },
  reaction: {
    K: constant('thermodynamic equilibrium constant (dimensionless, standard states 1 bar and 1 mol/L) at a temperature (e.g. `K = 4.0 at 60 °C`)'),
    'log K': constant('decimal logarithm of the thermodynamic K at a temperature (e.g. `log K = -4.76 at 25 °C`)'),
    pK: constant('−log K at a temperature (e.g. `pK = 4.76 at 25 °C`)'),
    Kp: constant('pressure-based K with its unit, a power of a pressure unit equal to Δn of gas (e.g. `Kp = 1.5e-5 atm^-2 at 500 °C`)'),
    Kc: constant('concentration-based K with its unit, a power of a concentration unit equal to Δn of gas and solutes (e.g. `Kc = 0.5 (mol/L)^-1 at 25 °C`)'),
    'ΔG°': quantity(['molar-energy'], 'standard Gibbs energy of reaction at a temperature (e.g. `ΔG° = -12.5 kJ/mol at 25 °C`)', 'required'),
    'ΔH°': quantity(['molar-energy'], 'standard enthalpy of reaction, for the van \'t Hoff equation (e.g. `ΔH° = -92.2 kJ/mol`)'),
    'ΔS°': quantity(['molar-entropy'], 'standard entropy of reaction at 298.15 K (e.g. `ΔS° = -198.7 J/(mol K)`)'),
    'ΔCp°': quantity(['molar-entropy'], 'standard heat capacity of reaction, taken as constant (e.g. `ΔCp° = -45 J/(mol K)`)'),
  },
  batch: {
    vessel: quantity(['volume'], 'a closed vessel of this volume; the gas fills it (e.g. `vessel 2.5 L`)'),
    volume: quantity(['volume'], 'volume of the liquid, for concentrations (e.g. `volume 500 mL`)'),
    basis: names('the species that `equiv` amounts are relative to (e.g. `basis acid`)'),
    uses: names('the reactions to use, by label (e.g. `uses esterify, R2`)'),
    'heat capacity': quantity(['heat-capacity'], 'heat capacity of the whole batch, for the adiabatic temperature rise (e.g. `heat capacity 2.5 kJ/K`)'),
  },
};

/** Other spellings of property keywords (ASCII, without the degree sign, U+2206 for Δ). */
const ALIASES: Readonly<Record<string, string>> = {
  dG: 'ΔG°',
  dH: 'ΔH°',
  dS: 'ΔS°',
  dCp: 'ΔCp°',
  dfG: 'ΔfG°',
  dfH: 'ΔfH°',
  S0: 'S°',
  Cp: 'Cp°',
  logK: 'log K',
};

/** The canonical key for a written one: `dG`, `ΔG`, `∆G°` -> `ΔG°`. */
export function canonicalKey(written: string): string {
  const k = written.replace(/∆/g, 'Δ').replace(/\s+/g, ' ');
  if (ALIASES[k]) return ALIASES[k];
  if (/^Δ/.test(k) && !k.endsWith('°')) return `${k}°`;
  if (k === 'S' || k === 'Cp') return `${k}°`;
  return k;
}

/** "a temperature (e.g. °C or K)" or "one of: amount of substance (…); mass (…)". */
export function describeExpected(expected: readonly Dimension[]): string {
  if (expected.length === 1) {
    const d = describeDimension(expected[0]);
    return /^[aeiou]/.test(d) ? `an ${d}` : `a ${d}`;
  }
  return `one of: ${expected.map(describeDimension).join('; ')}`;
}

export interface QuantityValue {
  /** SI value; undefined when the quantity could not be read. */
  readonly value?: number;
  readonly dimension?: Dimension;
  readonly diagnostics: readonly Diagnostic[];
}

/**
 * Reads `NUMBER [UNIT]` into SI. A missing unit is allowed only where a plain number is
 * expected; a unit of the wrong kind says which kinds were expected.
 */
export function readQuantity(
  node: QuantityNode,
  expected: readonly Dimension[],
  what: string,
  options: { silent?: boolean } = {},
): QuantityValue {
  const out: Diagnostic[] = [];
  const num = parseNumber(node.number.text);
  if (!num.ok) {
    out.push(diagnostic('bad-quantity', `${what}: ${num.message}`, node.number.start, node.number.end));
  }
  const expectedText = describeExpected(expected);
  let dimension: Dimension | undefined;
  let toSI: ((v: number) => number) | undefined;
  if (!node.unit) {
    if (expected.includes('dimensionless')) {
      dimension = 'dimensionless';
      toSI = (v) => v;
    } else {
      if (num.ok) out.push(diagnostic('bad-quantity', `${what} needs a unit: expected ${expectedText}`, node.number.start, node.number.end));
    }
  } else {
    const unit = parseUnit(node.unit.text);
    if (!unit.ok) {
      out.push(diagnostic('bad-quantity', `${what}: ${unit.message}; expected ${expectedText}`, node.unit.start, node.unit.end));
    } else if (!expected.includes(unit.dimension)) {
      out.push(
        diagnostic(
          'bad-quantity',
          `${what}: \`${node.unit.text}\` is a unit of ${describeDimension(unit.dimension)}; expected ${expectedText}`,
          node.unit.start,
          node.unit.end,
        ),
      );
    } else {
      dimension = unit.dimension;
      toSI = unit.toSI;
    }
  }
  if (!num.ok || !toSI || !dimension) return { diagnostics: options.silent ? [] : out };
  const value = toSI(num.value);
  if (!Number.isFinite(value)) {
    out.push(diagnostic('bad-quantity', `${what} is out of range once converted`, node.start, node.end));
    return { diagnostics: options.silent ? [] : out };
  }
  return { value, dimension, diagnostics: options.silent ? [] : out };
}

/** One property line read into SI. */
export interface PropertyValue {
  /** Canonical key (`ΔG°` for `dG`). */
  readonly key: string;
  readonly node: PropertyNode;
  /** SI value (for `constant` kinds: the number as written). */
  readonly value: number;
  /** The range of the written value, for diagnostics about it. */
  readonly range: { readonly start: number; readonly end: number };
  /** K, when the line has `at TEMPERATURE`. */
  readonly temperature?: number;
  /** For Kp and Kc: the unit as a power of a pressure or concentration unit (power 0 when none). */
  readonly unitPower?: { readonly base: 'pressure' | 'concentration' | 'dimensionless'; readonly power: number; readonly siFactor: number };
}

/**
 * Reads a statement's property lines against the table for its kind: unknown keywords,
 * missing or unwanted `at TEMPERATURE`, units of the wrong kind and repeated properties
 * become diagnostics; readable values come back by canonical key, in written order.
 */
export function readPropertyLines(
  lines: readonly PropertyLine[],
  owner: 'species' | 'reaction' | 'batch',
): { values: Map<string, PropertyValue[]>; diagnostics: Diagnostic[] } {
  const values = new Map<string, PropertyValue[]>();
  const out: Diagnostic[] = [];
  const known = KNOWN_PROPERTIES[owner];
  const namesSeen = new Set<string>();
  for (const line of lines) {
    if (line.type !== 'property') continue;
    const key = canonicalKey(line.keyText);
    const spec = known[key];
    const keyStart = line.key[0].start;
    const keyEnd = line.key[line.key.length - 1].end;
    if (!spec) {
      out.push(
        diagnostic(
          'unknown-property',
          `unknown ${owner} property \`${line.keyText}\`; known ${owner} properties: ${Object.keys(known).map((k) => `\`${k}\``).join(', ')}`,
          keyStart,
          keyEnd,
        ),
      );
      continue;
    }
    if (spec.kind === 'names') {
      if (namesSeen.has(key)) out.push(diagnostic('duplicate-property', `\`${line.keyText}\` is given twice; the first is used`, keyStart, keyEnd));
      namesSeen.add(key);
      continue;
    }
    if (!spec.repeatable && values.has(key)) {
      out.push(diagnostic('duplicate-property', `\`${line.keyText}\` is given twice; the first is used`, keyStart, keyEnd));
      continue;
    }
    let temperature: number | undefined;
    if (line.temperature) {
      if (spec.temperature === 'none') {
        out.push(diagnostic('syntax', `\`${line.keyText}\` takes no temperature; remove \`at …\``, (line.at ?? line.temperature).start, line.temperature.end));
      } else {
        const t = readQuantity(line.temperature, ['temperature'], 'the temperature');
        out.push(...t.diagnostics);
        if (t.value !== undefined && t.value <= 0) {
          out.push(diagnostic('bad-quantity', 'temperature must be above absolute zero', line.temperature.start, line.temperature.end));
        } else {
          temperature = t.value;
        }
      }
    } else if (spec.temperature === 'required' && line.value) {
      out.push(
        diagnostic(
          'missing-temperature',
          `\`${line.keyText}\` belongs to a temperature: write \`${line.keyText} = … at 25 °C\``,
          keyStart,
          line.value.end,
        ),
      );
      continue;
    }
    if (!line.value) continue;
    if (spec.kind === 'constant') {
      const read = readConstant(line.value, key);
      out.push(...read.diagnostics);
      if (read.value === undefined) continue;
      if (spec.temperature === 'required' && temperature === undefined) continue;
      push(values, { key, node: line, value: read.value, range: line.value, temperature, unitPower: read.unitPower }, out);
      continue;
    }
    const q = readQuantity(line.value, spec.dimensions, `\`${line.keyText}\``);
    out.push(...q.diagnostics);
    if (q.value === undefined) continue;
    if (spec.temperature === 'required' && temperature === undefined) continue;
    push(values, { key, node: line, value: q.value, range: line.value, temperature }, out);
  }
  return { values, diagnostics: out };
}

/** Two lines whose temperatures differ by less than this (K) are for the same temperature. */
const SAME_TEMPERATURE_K = 1e-6;

/** Adds a readable value; a repeatable one given twice for the same temperature is a repeat. */
function push(values: Map<string, PropertyValue[]>, v: PropertyValue, out: Diagnostic[]): void {
  const list = values.get(v.key);
  if (list && v.temperature !== undefined && list.some((x) => x.temperature !== undefined && Math.abs(x.temperature - v.temperature!) < SAME_TEMPERATURE_K)) {
    const key = v.node.key;
    out.push(
      diagnostic('duplicate-property', `\`${v.node.keyText}\` is given twice for the same temperature; the first is used`, key[0].start, key[key.length - 1].end),
    );
    return;
  }
  if (list) list.push(v);
  else values.set(v.key, [v]);
}

/**
 * The number of an equilibrium-constant line: K must be positive; log K and pK any finite
 * number; Kp and Kc positive with a unit that is a power of a pressure or concentration.
 */
function readConstant(
  node: QuantityNode,
  key: string,
): { value?: number; unitPower?: PropertyValue['unitPower']; diagnostics: Diagnostic[] } {
  const out: Diagnostic[] = [];
  const num = parseNumber(node.number.text);
  if (!num.ok) return { diagnostics: [diagnostic('bad-quantity', `\`${key}\`: ${num.message}`, node.number.start, node.number.end)] };
  const logarithmic = key === 'log K' || key === 'pK';
  if (!logarithmic && num.value <= 0) {
    out.push(
      diagnostic(
        'bad-quantity',
        num.value === 0
          ? `${key} must be positive: ${key} = 0 would mean no product at all; for a step that does not go, leave the reaction out`
          : `${key} must be positive: an equilibrium constant is a ratio of activities`,
        node.number.start,
        node.number.end,
      ),
    );
    return { diagnostics: out };
  }
  if (key === 'Kp' || key === 'Kc') {
    if (!node.unit) return { value: num.value, unitPower: { base: 'dimensionless', power: 0, siFactor: 1 }, diagnostics: out };
    const u = parseUnitPower(node.unit.text);
    if (!u.ok) {
      out.push(diagnostic('bad-quantity', `${key}: ${u.message}`, node.unit.start, node.unit.end));
      return { diagnostics: out };
    }
    const want = key === 'Kp' ? 'pressure' : 'concentration';
    if (u.base !== want && u.base !== 'dimensionless') {
      out.push(
        diagnostic('bad-quantity', `${key}'s unit must be a power of a ${want} unit (e.g. ${key === 'Kp' ? '`atm^-2`, `bar`' : '`(mol/L)^-1`, `mol/L`'})`, node.unit.start, node.unit.end),
      );
      return { diagnostics: out };
    }
    return { value: num.value, unitPower: { base: u.base, power: u.power, siFactor: u.siFactor }, diagnostics: out };
  }
  if (node.unit) {
    out.push(
      diagnostic(
        'bad-quantity',
        `${key} is dimensionless; for a constant in pressure or concentration units write \`Kp\` or \`Kc\` with the unit`,
        node.unit.start,
        node.unit.end,
      ),
    );
    return { diagnostics: out };
  }
  return { value: num.value, diagnostics: out };
}
