// The property keywords each statement accepts, and reading a quantity node
// (number + unit) into an SI value with diagnostics. One table, so completion,
// hover and the "known properties" message all agree.
import { describeDimension, parseNumber, parseUnit, type Dimension } from '../../chem/units';
import type { QuantityNode } from '../syntax/tree';
import { diagnostic, type Diagnostic } from './codes';

export interface PropertySpec {
  readonly kind: 'quantity' | 'names';
  readonly dimensions: readonly Dimension[];
  /** Whether `at TEMPERATURE` belongs to the property. */
  readonly temperature: boolean;
  readonly summary: string;
}

const quantity = (dimensions: Dimension[], summary: string, temperature = false): PropertySpec => ({
  kind: 'quantity',
  dimensions,
  temperature,
  summary,
});
const names = (summary: string): PropertySpec => ({ kind: 'names', dimensions: [], temperature: false, summary });

export const KNOWN_PROPERTIES: Readonly<Record<'species' | 'reaction' | 'batch', Readonly<Record<string, PropertySpec>>>> = {
  species: {
    density: quantity(['density'], 'density of the pure substance, for amounts given as a volume (e.g. `density 0.87 g/mL`)'),
    purity: quantity(['percent'], 'purity of the material as charged, applied to mass and volume amounts (e.g. `purity 98 %`)'),
  },
  reaction: {
    K: quantity(['dimensionless'], 'thermodynamic equilibrium constant at a temperature (e.g. `K = 4.0 at 60 °C`)', true),
  },
  batch: {
    vessel: quantity(['volume'], 'a closed vessel of this volume; the gas fills it (e.g. `vessel 2.5 L`)'),
    volume: quantity(['volume'], 'volume of the liquid, for concentrations (e.g. `volume 500 mL`)'),
    basis: names('the species that `equiv` amounts are relative to (e.g. `basis acid`)'),
    uses: names('the reactions to use, by label (e.g. `uses esterify, R2`)'),
  },
};

/** "a temperature (e.g. °C or K)" or "one of: amount of substance (…), mass (…)". */
function describeExpected(expected: readonly Dimension[]): string {
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
