// Completion: what may be written at the cursor, from the line's context.
// Statement keywords and species names at the start of a line; species names
// and element symbols in equations; property keywords under a statement;
// units fitting the quantity being written; labels after `uses`; species
// after `basis`. Every item carries a short detail.
import { ELEMENTS } from '../../chem/elements';
import { KNOWN_PROPERTIES } from '../semantic/properties';
import type { Analysis } from './analysis';

export type CompletionKind = 'keyword' | 'species' | 'label' | 'batch' | 'property' | 'unit' | 'element';

export interface CompletionItem {
  readonly label: string;
  readonly kind: CompletionKind;
  readonly detail: string;
  /** Text to insert when it differs from the label. */
  readonly insertText?: string;
}

export interface CompletionResult {
  /** The range the items replace: the partial word before the cursor. */
  readonly start: number;
  readonly end: number;
  readonly items: readonly CompletionItem[];
}

const TEMPERATURE_UNITS: readonly CompletionItem[] = [
  { label: '°C', kind: 'unit', detail: 'degree Celsius' },
  { label: 'K', kind: 'unit', detail: 'kelvin' },
  { label: '°F', kind: 'unit', detail: 'degree Fahrenheit' },
];
const PRESSURE_UNITS: readonly CompletionItem[] = [
  { label: 'bar', kind: 'unit', detail: 'pressure, 10^5 Pa' },
  { label: 'atm', kind: 'unit', detail: 'pressure, 101325 Pa' },
  { label: 'kPa', kind: 'unit', detail: 'pressure, kilopascal' },
  { label: 'MPa', kind: 'unit', detail: 'pressure, megapascal' },
  { label: 'psi', kind: 'unit', detail: 'pressure, pound-force per square inch' },
];
const AMOUNT_UNITS: readonly CompletionItem[] = [
  { label: 'mol', kind: 'unit', detail: 'amount of substance' },
  { label: 'mmol', kind: 'unit', detail: 'amount, millimole' },
  { label: 'kmol', kind: 'unit', detail: 'amount, kilomole' },
  { label: 'g', kind: 'unit', detail: 'mass (with the molar mass, and purity if given)' },
  { label: 'mg', kind: 'unit', detail: 'mass, milligram' },
  { label: 'kg', kind: 'unit', detail: 'mass, kilogram' },
  { label: 'mL', kind: 'unit', detail: 'volume (needs the species density)' },
  { label: 'L', kind: 'unit', detail: 'volume (needs the species density)' },
  { label: 'equiv', kind: 'unit', detail: 'equivalents of the basis species' },
  { label: 'mol/L', kind: 'unit', detail: 'concentration (needs the batch liquid volume)' },
  { label: 'mmol/L', kind: 'unit', detail: 'concentration, millimolar' },
  ...PRESSURE_UNITS.map((u) => ({ ...u, detail: `partial ${u.detail} (needs a vessel)` })),
];
const VOLUME_UNITS: readonly CompletionItem[] = [
  { label: 'mL', kind: 'unit', detail: 'volume, millilitre' },
  { label: 'L', kind: 'unit', detail: 'volume, litre' },
];
const UNITS_BY_PROPERTY: Readonly<Record<string, readonly CompletionItem[]>> = {
  density: [{ label: 'g/mL', kind: 'unit', detail: 'density' }, { label: 'kg/m^3', kind: 'unit', detail: 'density, SI' }],
  purity: [{ label: '%', kind: 'unit', detail: 'per cent' }],
  vessel: VOLUME_UNITS,
  volume: VOLUME_UNITS,
  'ΔG°': [{ label: 'kJ/mol', kind: 'unit', detail: 'molar energy' }],
  'ΔH°': [{ label: 'kJ/mol', kind: 'unit', detail: 'molar energy' }],
  'ΔfG°': [{ label: 'kJ/mol', kind: 'unit', detail: 'molar energy' }],
  'ΔfH°': [{ label: 'kJ/mol', kind: 'unit', detail: 'molar energy' }],
  'ΔS°': [{ label: 'J/(mol K)', kind: 'unit', detail: 'molar entropy' }],
  'ΔCp°': [{ label: 'J/(mol K)', kind: 'unit', detail: 'molar heat capacity' }],
  'S°': [{ label: 'J/(mol K)', kind: 'unit', detail: 'molar entropy' }],
  'Cp°': [{ label: 'J/(mol K)', kind: 'unit', detail: 'molar heat capacity' }],
  Kp: [...PRESSURE_UNITS, { label: 'atm^-1', kind: 'unit', detail: 'pressure to the power Δn of gas' }, { label: 'bar^-2', kind: 'unit', detail: 'pressure to the power Δn of gas' }],
  Kc: [{ label: 'mol/L', kind: 'unit', detail: 'concentration to the power Δn' }, { label: '(mol/L)^-1', kind: 'unit', detail: 'concentration to the power Δn' }],
};

const NUMBER_THEN_PARTIAL = /(?:^|\s)[+\-−]?(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][+\-−]?\d+)?\s+([^\s]*)$/;

export function completions(analysis: Analysis, offset: number): CompletionResult {
  const { text } = analysis;
  const lineStart = text.lastIndexOf('\n', offset - 1) + 1;
  const before = text.slice(lineStart, offset);
  const partialMatch = /[^\s,:+]*$/.exec(before);
  const partial = partialMatch ? partialMatch[0] : '';
  const start = offset - partial.length;
  const result = (items: CompletionItem[]): CompletionResult => ({ start, end: offset, items });
  if (before.includes('#')) return result([]);

  const indented = /^[ \t]/.test(before);
  const speciesItems = (): CompletionItem[] =>
    analysis.model.speciesList.map((s) => ({
      label: s.name,
      kind: 'species' as const,
      detail: s.formula ? `${s.formula.text}${s.phase ? ` (${s.phase})` : ''}, ${s.formula.molarMass.toFixed(3)} g/mol` : 'species (formula has a problem)',
    }));

  // `... at 60 °` : a temperature unit; `, 2 ` on a batch header: a pressure unit.
  const atMatch = /\bat\s+[+\-−]?[\d.]+(?:[eE][+\-−]?\d+)?\s*(\S*)$/.exec(before);
  if (atMatch) return result([...TEMPERATURE_UNITS]);
  if (/^batch\b/.test(before) && /,\s*[\d.]+(?:[eE][+\-−]?\d+)?\s+\S*$/.test(before)) return result([...PRESSURE_UNITS]);
  if (/^batch\s+\S+\s+from\s+\S*$/.test(before)) {
    return result(analysis.model.batches.filter((b) => b.node.name && !before.startsWith(`batch ${b.name} `)).map((b) => ({ label: b.name, kind: 'batch' as const, detail: 'start from the equilibrium contents of this batch' })));
  }
  if (/^batch\s+\S+\s+from\s+\S+\s+\S*$/.test(before)) return result([{ label: 'at', kind: 'keyword', detail: 'a new temperature (and pressure) for the follow-on batch' }]);
  if (/^batch\s+\S+\s+\S*$/.test(before)) {
    return result([
      { label: 'at', kind: 'keyword', detail: 'the batch temperature follows' },
      { label: 'from', kind: 'keyword', detail: 'a follow-on batch: starts from the equilibrium contents of another batch' },
    ]);
  }

  if (!indented) {
    if (/^species\s+\w+\s*=\s*\S*$/.test(before) || isInEquation(before)) {
      if (/^[A-Z][A-Za-z0-9()[\]^+\-·.*]*$/.test(partial) || partial === '') {
        const items: CompletionItem[] = isInEquation(before) ? speciesItems() : [];
        if (partial !== '' || !isInEquation(before)) items.push(...elementItems());
        return result(items);
      }
      return result(isInEquation(before) ? speciesItems() : []);
    }
    if (!/\s/.test(before)) {
      return result([
        { label: 'species', kind: 'keyword', detail: 'declare a name for a formula: species NAME = FORMULA (PHASE)' },
        { label: 'batch', kind: 'keyword', detail: 'a mixture at conditions: batch NAME at TEMPERATURE[, PRESSURE]' },
        ...speciesItems(),
      ]);
    }
    return result([]);
  }

  // Indented: a property line of the statement above.
  const owner = ownerAbove(analysis, lineStart);
  const words = before.trim().split(/\s+/);
  if (owner === 'batch') {
    if (words[0] === 'uses') {
      return result(analysis.model.reactions.map((r) => ({ label: r.label, kind: 'label' as const, detail: `${r.reversible ? 'reversible' : 'one-way'}: ${text.slice(r.equationStart, r.equationEnd)}` })));
    }
    if (words[0] === 'basis') return result(speciesItems());
    // The word being typed after an operation keyword: `remove |` or `remove wa|`.
    const second = (words.length === 1 && /\s$/.test(before)) || (words.length === 2 && !/\s$/.test(before));
    if ((words[0] === 'add' || words[0] === 'remove') && second) return result(speciesItems());
    if (words[0] === 'remove' && NUMBER_THEN_PARTIAL.test(before)) return result([{ label: '%', kind: 'unit', detail: 'percentage of what is there' }, ...AMOUNT_UNITS]);
    if (words[0] === 'vent') return second ? result([{ label: 'to', kind: 'keyword', detail: 'vent down to a stated pressure (default 1 atm)' }]) : NUMBER_THEN_PARTIAL.test(before) ? result([...PRESSURE_UNITS]) : result([]);
    if (words[0] === 'vessel' || words[0] === 'volume') return NUMBER_THEN_PARTIAL.test(before) ? result([...VOLUME_UNITS]) : result([]);
    if (words[0] === 'heat') return NUMBER_THEN_PARTIAL.test(before) ? result([{ label: 'kJ/K', kind: 'unit', detail: 'heat capacity' }]) : result([]);
    if (NUMBER_THEN_PARTIAL.test(before)) return result([...AMOUNT_UNITS]);
    if (words.length <= 1) {
      return result([
        ...Object.entries(KNOWN_PROPERTIES.batch).map(([k, spec]) => ({ label: k, kind: 'property' as const, detail: spec.summary })),
        ...(followOnAbove(analysis, lineStart) ? OPERATION_ITEMS : speciesItems()),
      ]);
    }
    return result([]);
  }
  if (owner === 'species' || owner === 'reaction') {
    const table = KNOWN_PROPERTIES[owner];
    const key = words[0] === 'log' ? 'log K' : words[0];
    if (words.length >= 2 && NUMBER_THEN_PARTIAL.test(before)) {
      const canonical = Object.keys(table).find((k) => k === key || k.replace('°', '') === key) ?? key;
      return result([...(UNITS_BY_PROPERTY[canonical] ?? [])]);
    }
    if (words.length <= 1) return result(Object.entries(table).map(([k, spec]) => ({ label: k, kind: 'property' as const, detail: spec.summary })));
  }
  return result([]);
}

/** Operation lines of a follow-on batch. */
const OPERATION_ITEMS: readonly CompletionItem[] = [
  { label: 'add', kind: 'keyword', detail: 'add SPECIES AMOUNT: charge more (any amount form; equiv is relative to the first batch\'s basis)' },
  { label: 'remove', kind: 'keyword', detail: 'remove SPECIES AMOUNT or PERCENT: take some out (e.g. `remove water 90 %`)' },
  { label: 'vent', kind: 'keyword', detail: 'vent [to PRESSURE]: let the closed vessel\'s gas down to 1 atm or the given pressure' },
];

/** Whether the batch above the line is a follow-on batch (`batch B from A`). */
function followOnAbove(analysis: Analysis, lineStart: number): boolean {
  const s = analysis.statementAt(Math.max(0, lineStart - 1));
  return s?.node.type === 'batch' && s.node.from !== undefined;
}

/** A reaction line: not a species or batch statement, and the cursor is in its terms. */
function isInEquation(before: string): boolean {
  return !/^(species|batch)\b/.test(before) && !/^[ \t]/.test(before) && /\S/.test(before);
}

function elementItems(): CompletionItem[] {
  return ELEMENTS.map((e) => ({ label: e.symbol, kind: 'element' as const, detail: `${e.name}, ${e.atomicWeight} g/mol` }));
}

/** The kind of the nearest statement above a line (for an indented line's properties). */
function ownerAbove(analysis: Analysis, lineStart: number): 'species' | 'reaction' | 'batch' | undefined {
  let found: 'species' | 'reaction' | 'batch' | undefined;
  for (const s of analysis.syntax.tree.statements) {
    if (s.start >= lineStart) break;
    found = s.type === 'error-line' ? undefined : s.type;
  }
  return found;
}
