// A reaction's thermodynamic data lines (K, log K, pK, Kp, Kc, ΔG°, ΔH°, ΔS°,
// ΔCp°) turned into one SI record of thermodynamic ln K values and ΔH°/ΔS°/ΔCp°.
// Kp and Kc are converted with Δn of gas (and of solutes for Kc), after
// checking that the written unit's power is that Δn.
import { consistencyWarnings, lnKFromGibbs, R, STANDARD_CONCENTRATION, STANDARD_PRESSURE, type KPoint, type ReactionThermo } from '../../chem/thermo';
import { Rational } from '../../chem/rational';
import { diagnostic, type Diagnostic } from './codes';
import type { ReactionTerm } from './model';
import type { PropertyValue } from './properties';

const LN10 = Math.log(10);

/** Σν (right − left) over the terms whose phase is in `phases`; undefined when a term has no phase. */
export function deltaN(terms: readonly ReactionTerm[], phases: ReadonlySet<string>): { value: Rational; missing: string[] } {
  let value = Rational.ZERO;
  const missing: string[] = [];
  for (const t of terms) {
    if (!t.species || !t.coefficient || t.species.formula.isElectron) continue;
    const phase = t.species.phase;
    if (phase === undefined) {
      missing.push(t.node.species.text);
      continue;
    }
    if (!phases.has(phase)) continue;
    value = t.side === 'right' ? value.add(t.coefficient) : value.sub(t.coefficient);
  }
  return { value, missing };
}

const GAS: ReadonlySet<string> = new Set(['g']);
const GAS_OR_SOLUTE: ReadonlySet<string> = new Set(['g', 'aq']);

/** Reads the data lines into a ReactionThermo (undefined when the reaction has none). */
export function reactionThermo(
  values: ReadonlyMap<string, readonly PropertyValue[]>,
  terms: readonly ReactionTerm[],
): { thermo?: ReactionThermo; diagnostics: Diagnostic[] } {
  const out: Diagnostic[] = [];
  const points: KPoint[] = [];
  const first = (key: string): PropertyValue | undefined => values.get(key)?.[0];
  for (const key of ['K', 'log K', 'pK', 'Kp', 'Kc', 'ΔG°']) {
    for (const v of values.get(key) ?? []) {
      if (v.temperature === undefined) continue;
      const lnK = toLnK(v, terms, out);
      if (lnK === undefined) continue;
      if (!Number.isFinite(lnK)) {
        out.push(diagnostic('bad-quantity', `${key} is out of range once converted to a thermodynamic K`, v.range.start, v.range.end));
        continue;
      }
      points.push({ lnK, T: v.temperature, written: key });
    }
  }
  const dH = first('ΔH°')?.value;
  const dS = first('ΔS°')?.value;
  const dCp = first('ΔCp°')?.value;
  if (points.length === 0 && dH === undefined && dS === undefined && dCp === undefined) return { diagnostics: out };
  const thermo: ReactionThermo = { points, dH, dS, dCp };
  const firstLine = [...values.values()].flat().sort((a, b) => a.node.start - b.node.start)[0];
  for (const w of consistencyWarnings(thermo)) {
    out.push(diagnostic('inconsistent-data', w, firstLine.node.key[0].start, firstLine.range.end));
  }
  return { thermo, diagnostics: out };
}

function toLnK(v: PropertyValue, terms: readonly ReactionTerm[], out: Diagnostic[]): number | undefined {
  const T = v.temperature!;
  switch (v.key) {
    case 'K':
      return Math.log(v.value);
    case 'log K':
      return v.value * LN10;
    case 'pK':
      return -v.value * LN10;
    case 'ΔG°':
      return lnKFromGibbs(v.value, T);
    case 'Kp':
    case 'Kc': {
      const kc = v.key === 'Kc';
      const dn = deltaN(terms, kc ? GAS_OR_SOLUTE : GAS);
      const unitRange = v.node.value?.unit ?? v.node.value ?? v.node;
      if (dn.missing.length > 0) {
        out.push(
          diagnostic(
            'bad-quantity',
            `${v.key} needs the phase of every term to know Δn: add (g), (l), (s) or (aq) to ${dn.missing.map((s) => `\`${s}\``).join(', ')}`,
            v.range.start,
            v.range.end,
          ),
        );
        return undefined;
      }
      const want = dn.value.toNumber();
      const power = v.unitPower?.power ?? 0;
      if (Math.abs(power - want) > 1e-12) {
        const what = kc ? 'concentration' : 'pressure';
        const example = kc ? (want === 1 ? 'mol/L' : `(mol/L)^${dn.value.toString()}`) : want === 1 ? 'bar' : `bar^${dn.value.toString()}`;
        out.push(
          diagnostic(
            'bad-quantity',
            want === 0
              ? `${v.key} of this reaction is dimensionless (Δn${kc ? ' of gas and solutes' : ' of gas'} = 0); remove the unit`
              : `${v.key}'s unit must be a ${what} to the power Δn${kc ? ' of gas and solutes' : ' of gas'} = ${dn.value.toString()} (e.g. \`${example}\`); the written unit has power ${formatPower(power)}`,
            unitRange.start,
            unitRange.end,
          ),
        );
        return undefined;
      }
      const si = v.value * (v.unitPower?.siFactor ?? 1);
      if (!kc) return Math.log(si) - want * Math.log(STANDARD_PRESSURE);
      // a(gas) = c·R·T/P°, a(solute) = c/c°: K = Kc · (R T / P°)^Δn(gas) · (1/c°)^Δn(solute), c in mol/m^3.
      const dnGas = deltaN(terms, GAS).value.toNumber();
      const dnSolute = want - dnGas;
      return Math.log(si) + dnGas * Math.log((R * T) / STANDARD_PRESSURE) - dnSolute * Math.log(STANDARD_CONCENTRATION);
    }
    default:
      return undefined;
  }
}

function formatPower(p: number): string {
  return Number.isInteger(p) ? String(p) : p.toFixed(1);
}
