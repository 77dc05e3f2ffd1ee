// What a solved batch tells the chemist, as plain data: the initial / change /
// equilibrium table, each reaction's K at the batch temperature with its
// source, Q at the start and the direction of the shift, conversion, yields,
// pressure and gas volume, cautions and assumptions. The hover renders it as
// Markdown and the CLI as text, so both show the same numbers.
import { formatQuantity, trim } from '../../chem/units';
import type { KSource } from '../../chem/thermo';
import { PHASE_NAMES, STANDARD_ATMOSPHERE, type BatchModel } from '../semantic/model';
import type { BatchResult } from '../semantic/batch-results';
import type { FollowOn, ReversibleInput } from '../semantic/batch-inputs';
import type { SweepResult } from '../semantic/sweeps';
import type { TargetResult } from '../semantic/targets';
import { R } from '../../chem/thermo';
import type { Analysis } from './analysis';
import type { Table } from './tables';

export interface BatchReport {
  readonly title: string;
  readonly conditions: readonly string[];
  readonly solved: boolean;
  /** Why there is no result (missing data, failed solve). */
  readonly problem?: string;
  readonly species?: Table;
  readonly reactions?: Table;
  readonly summary: readonly string[];
  readonly cautions: readonly string[];
  readonly assumptions: readonly string[];
  /** One short line: the headline result (inlay hint, code lens). */
  readonly headline?: string;
  /** One table per `vary` line. */
  readonly sweeps: readonly { readonly title: string; readonly table: Table }[];
  /** One line per `target` line: where the goal is met, or why not. */
  readonly targets: readonly string[];
}

export const ESTIMATE_NOTE = 'Ideal equilibrium estimates, not a process-safety assessment.';

/** Off-gas volumes are given at 1 atm and 25 °C (common practice for reporting gas evolution). */
const OFF_GAS_T = 298.15;
const OFF_GAS_P = 101325;

export const ASSUMPTIONS: Readonly<Record<string, string>> = {
  g: 'gases ideal: a = y·P/P° with P° = 1 bar',
  l: 'liquids one ideal mixture: a = mole fraction',
  aq: 'solutes ideal and dilute: a = c/c° with c° = 1 mol/L',
  solvent: 'water as the solvent has a = 1',
  s: 'solids pure phases: a = 1 while present',
};

/** 4 significant figures; exponent form for very small or large values. */
export function num(x: number): string {
  if (!Number.isFinite(x)) return x > 0 ? '∞' : x < 0 ? '−∞' : '—';
  if (x === 0) return '0';
  const a = Math.abs(x);
  if (a < 1e-3 || a >= 1e6) return x.toExponential(3).replace('e+', 'e').replace(/\.?0+e/, 'e');
  return String(Number(x.toPrecision(4)));
}

function signed(x: number): string {
  const s = num(x);
  return x > 0 ? `+${s}` : s.replace(/^-/, '−');
}

export function percent(x: number): string {
  return `${(x * 100).toFixed(x >= 0.9995 || x < 0.0005 ? 2 : 1)} %`;
}

export function kSourceText(source: ReversibleInput['source']): string {
  const s = source as KSource;
  switch (s.kind) {
    case 'given':
      return `given (${s.written})`;
    case 'van-t-hoff':
      return `van 't Hoff from ${celsius(s.fromT)} (${s.written}, ΔH° = ${trim(s.dH / 1000)} kJ/mol${s.dCp !== undefined ? `, ΔCp° = ${trim(s.dCp)} J/(mol K)` : ''})`;
    case 'two-point':
      return `van 't Hoff through K at ${celsius(s.T1)} and ${celsius(s.T2)}`;
    case 'enthalpy-entropy':
      return `ΔG° = ΔH° − TΔS°${s.dCp !== undefined ? ' with ΔCp°' : ''}`;
    case 'hess':
      return `Hess's law: ${s.detail}`;
    case 'assumed-constant':
      return `taken as constant from ${celsius(s.fromT)} (no ΔH°)`;
  }
}

export function celsius(T: number): string {
  return `${trim(T - 273.15)} °C`;
}

export function batchReport(analysis: Analysis, batch: BatchModel): BatchReport {
  const title = `batch ${batch.name}`;
  const conditions: string[] = [];
  const result = analysis.results.get(batch);
  const inputs = result?.inputs;
  // A follow-on batch keeps its source's temperature, pressure, vessel and volume unless it gives its own.
  const source = batch.source !== undefined ? ` (as in \`${batch.source}\`)` : '';
  if (batch.source !== undefined) conditions.push(`Starts from: the equilibrium contents of \`${batch.source}\`, then the changes below`);
  const T = batch.temperature ?? inputs?.temperature;
  conditions.push(`Temperature: ${T !== undefined ? `${formatQuantity(T, 'temperature')}${batch.temperature === undefined ? source : ''}` : 'not readable'}`);
  const vessel = batch.vessel ?? inputs?.vessel;
  const volume = batch.volume ?? inputs?.liquidVolume;
  if (vessel !== undefined) {
    conditions.push(
      `Closed vessel: ${formatQuantity(vessel, 'volume')}${volume !== undefined ? `, of which ${formatQuantity(volume, 'volume')} liquid` : ''} (constant volume)${batch.vessel === undefined ? source : ''}`,
    );
  } else {
    const written = batch.node.pressure ? analysis.text.slice(batch.node.pressure.start, batch.node.pressure.end) : '';
    const P = inputs?.conditions.kind === 'constant-pressure' ? inputs.conditions.P : batch.pressure;
    const shown = !batch.pressureIsDefault
      ? `${written}${written.endsWith(' bar') ? '' : ` (${formatQuantity(batch.pressure, 'pressure')})`}`
      : batch.source !== undefined
        ? `${P === STANDARD_ATMOSPHERE ? '1 atm' : formatQuantity(P, 'pressure')}${source}`
        : '1 atm (default: none written)';
    conditions.push(`Pressure: ${shown}, constant`);
    if (volume !== undefined) conditions.push(`Liquid volume: ${formatQuantity(volume, 'volume')}${batch.volume === undefined ? source : ''}`);
  }
  if (!result) {
    const own = analysis.diagnostics.filter((d) => d.severity === 'error' && d.start >= batch.node.start && d.start < batch.node.end);
    return {
      title,
      conditions,
      solved: false,
      problem: own.length > 0 ? `Not solved: ${own.map((d) => d.message).join('; ')}` : 'Not solved: the batch is incomplete.',
      summary: [],
      cautions: [],
      assumptions: [],
      sweeps: [],
      targets: [],
    };
  }
  if (result.status !== 'converged') {
    return { title, conditions, solved: false, problem: `Not solved: ${result.message ?? 'the solver did not converge'}`, summary: [], cautions: [], assumptions: [], sweeps: [], targets: [] };
  }
  return {
    ...solvedReport(title, conditions, result),
    sweeps: (analysis.sweeps.get(batch) ?? []).map((s) => sweepTable(s, result)),
    targets: (analysis.targets.get(batch) ?? []).map(targetLine),
  };
}

/** A target's outcome in one line: where the goal is met, or that it cannot be, and the best value. */
export function targetLine(t: TargetResult): string {
  const m = t.target;
  const goal = m.goal === 'pressure' ? `pressure = ${num(m.value / 1e5)} bar` : `${m.goal} of ${m.species} = ${percent(m.value)}`;
  const range = `${num(m.from)} to ${num(m.to)} ${m.unitText}`;
  if (t.values.length === 1) return `Target ${goal}: reached at ${m.label} = **${num(t.values[0])} ${m.unitText}** (searched ${range})`;
  if (t.values.length > 1) return `Target ${goal}: reached at ${t.values.length} values of ${m.label}: ${t.values.map((v) => `${num(v)} ${m.unitText}`).join(', ')} (searched ${range})`;
  const best = t.best ? `; the closest is ${m.goal === 'pressure' ? `${num(t.best.reached / 1e5)} bar` : percent(t.best.reached)} at ${m.label} = ${num(t.best.value)} ${m.unitText}` : '';
  return `Target ${goal}: cannot be reached with ${m.label} from ${range}${best}`;
}

/**
 * A sweep as a table: the variable, then the conversion of the basis species, each product's
 * yield, the pressure where gases take part, and the first reaction's K, at every point.
 */
export function sweepTable(s: SweepResult, base: BatchResult): { title: string; table: Table } {
  const { inputs } = base;
  const basis = inputs.basis;
  const products = base.yields.map((y) => y.index);
  // The pressure column, unless the sweep's own variable already is the (constant) pressure.
  const hasGas = inputs.species.some((sp) => sp.phase === 'g') && !(s.sweep.variable.kind === 'pressure' && inputs.conditions.kind === 'constant-pressure');
  const firstReaction = inputs.reversible[0]?.reaction.label;
  const header = [`${s.sweep.label} / ${s.sweep.unitText}`];
  if (basis !== undefined && base.conversion !== undefined) header.push(`Conversion of ${inputs.species[basis].label}`);
  for (const i of products) header.push(`Yield of ${inputs.species[i].label}`);
  if (hasGas) header.push('P / bar');
  if (firstReaction) header.push(`K (${firstReaction})`);
  const rows = s.points.map((p) => {
    const r = p.result;
    const row = [num(p.written)];
    if (!r || r.status !== 'converged') return [...row, ...header.slice(1).map(() => 'not solved')];
    if (basis !== undefined && base.conversion !== undefined) row.push(r.conversion !== undefined ? percent(r.conversion) : '—');
    for (const i of products) {
      const y = r.yields.find((x) => x.index === i);
      row.push(y && y.theoretical > r.afterOneWay[i] ? percent(Math.max(0, yieldFraction(r, y))) : '—');
    }
    if (hasGas) row.push(num(r.pressure / 1e5));
    if (firstReaction) row.push(num(Math.exp(r.inputs.reversible[0].lnK)));
    return row;
  });
  return {
    title: `Sweep of ${s.sweep.label} (${s.points.length} point${s.points.length === 1 ? '' : 's'})`,
    table: { header, align: header.map((_, i) => (i === 0 ? 'r' : 'r')), rows },
  };
}

function solvedReport(title: string, conditions: string[], result: BatchResult): BatchReport {
  const { inputs } = result;
  const T = inputs.temperature;
  const from = inputs.from;
  const hasOneWay = inputs.oneWay.length > 0;
  const rows: string[][] = [];
  const phasesPresent = new Set<string>();
  const gasPressureOf = (n: number): number =>
    inputs.conditions.kind === 'constant-volume' ? (n * R * T) / inputs.conditions.gasVolume : result.gasMoles > 0 ? (n / result.gasMoles) * result.pressure : 0;
  inputs.species.forEach((s, i) => {
    phasesPresent.add(s.solvent ? 'solvent' : s.phase);
    const eq = result.equilibrium[i];
    let shown: string;
    if (s.phase === 'g') shown = `${num(gasPressureOf(eq) / 1e5)} bar`;
    else if (s.phase === 'aq' && inputs.liquidVolume) shown = `${num(eq / inputs.liquidVolume / 1000)} mol/L`;
    else shown = `${num(eq * s.species.formula.molarMass)} g`;
    if ((s.phase === 's' || s.solvent) && result.absent.has(i)) shown = s.charged > 0 || result.afterOneWay[i] > 0 ? 'used up' : 'does not form';
    const row = [s.label, `${s.solvent ? 'solvent' : s.phase}`];
    if (from) row.push(num(from.before[i]));
    row.push(num(result.charged[i]));
    if (hasOneWay) row.push(num(result.afterOneWay[i]));
    row.push(signed(eq - result.charged[i]), num(eq), shown);
    rows.push(row);
  });
  const species: Table = {
    header: [
      'Species',
      'Phase',
      ...(from ? ['Before change / mol', 'After change / mol'] : ['Initial / mol']),
      ...(hasOneWay ? ['After one-way / mol'] : []),
      'Change / mol',
      'Equilibrium / mol',
      'At equilibrium',
    ],
    align: ['l', 'l', ...(from ? (['r', 'r'] as const) : (['r'] as const)), ...(hasOneWay ? (['r'] as const) : []), 'r', 'r', 'r'],
    rows,
  };
  const reactionRows: string[][] = [];
  for (const r of inputs.oneWay) {
    const j = inputs.oneWay.indexOf(r);
    reactionRows.push([r.reaction.label, 'one-way', '—', 'runs to completion first', '→', num(result.oneWayExtents[j])]);
  }
  for (const o of result.reactions) {
    const K = Math.exp(o.input.lnK);
    const direction = o.inactive ? 'cannot run' : directionOf(o.lnQ0, o.input.lnK);
    reactionRows.push([o.input.reaction.label, num(K), kSourceText(o.input.source), Number.isNaN(o.lnQ0) ? '—' : num(Math.exp(o.lnQ0)), direction, num(o.extent)]);
  }
  const reactions: Table = {
    header: ['Reaction', `K at ${celsius(T)}`, 'K from', from ? 'Q after change' : 'Q at start', 'Shift', 'Extent / mol'],
    align: ['l', 'r', 'l', 'r', 'l', 'r'],
    rows: reactionRows,
  };
  const summary: string[] = [];
  const cautions: string[] = [];
  if (from) followOnSummary(result, from, summary, cautions);
  let headline: string | undefined;
  if (inputs.basis !== undefined && result.conversion !== undefined) {
    const label = inputs.species[inputs.basis].label;
    const chain = from
      ? ` (of ${num(inputs.basisFed ?? 0)} mol fed over the chain of batches${inputs.basisWithdrawn ? `, less ${num(inputs.basisWithdrawn)} mol taken out` : ''})`
      : '';
    summary.push(`Conversion of ${label}: **${percent(result.conversion)}**${chain}`);
    headline = `${percent(result.conversion)} conversion of ${label}`;
  }
  for (const y of result.yields) {
    const label = inputs.species[y.index].label;
    const fraction = yieldFraction(result, y);
    summary.push(`Yield of ${label}: ${percent(Math.max(0, fraction))} (${num(y.formed)} of ${num(y.theoretical)} mol theoretical)`);
    if (!headline) headline = `${percent(Math.max(0, fraction))} yield of ${label}`;
  }
  if (result.gasMoles > 0) {
    if (inputs.conditions.kind === 'constant-volume') {
      summary.push(`Final total pressure: **${num(result.pressure / 1e5)} bar** (${num(result.gasMoles)} mol of gas in ${formatQuantity(inputs.conditions.gasVolume, 'volume')} of gas space)`);
      if (!headline) headline = `P = ${num(result.pressure / 1e5)} bar`;
      else headline += `, P = ${num(result.pressure / 1e5)} bar`;
      if (result.pressure > 1.5e5) {
        cautions.push(
          `The closed vessel reaches ${num(result.pressure / 1e5)} bar. Check its rated pressure and relief before running this, and follow local codes and your site's process-safety review.`,
        );
      }
    } else {
      summary.push(`Gas at equilibrium: ${num(result.gasMoles)} mol, ${num(result.gasVolume * 1000)} L as ideal gas at ${celsius(T)} and ${num(result.pressure / 1e5)} bar`);
      if (result.gasFormed > 0 && result.gasFormed > 1e-9 * result.gasMoles) {
        const evolved = result.gasFormed;
        const offGasLitres = ((evolved * R * OFF_GAS_T) / OFF_GAS_P) * 1000;
        summary.push(`Gas given off: ${num(evolved)} mol, ${num(offGasLitres)} L at 1 atm and 25 °C (off-gas)`);
        cautions.push(
          `The step gives off ${num(evolved)} mol of gas (${num(offGasLitres)} L at 1 atm and 25 °C): vent it safely, and size the vent and off-gas handling under your site's process-safety review.`,
        );
      }
    }
  }
  if (inputs.conditions.kind === 'constant-volume' && result.gasFormed > 1e-9 * Math.max(result.gasMoles, 1e-300)) {
    cautions.push(
      `The step gives off ${num(result.gasFormed)} mol of gas inside the closed vessel: check the vessel's rating and size its relief for the gas and the heat, under local codes and your site's process-safety review.`,
    );
  }
  const heat = result.heat;
  if (heat.released !== undefined) {
    const kJ = heat.released / 1000;
    summary.push(
      `Heat ${kJ >= 0 ? 'released' : 'absorbed'} at equilibrium: **${num(Math.abs(kJ))} kJ**${heat.byStep.length > 1 ? ` (${heat.byStep.map((x) => `${x.label} ${num(x.released / 1000)} kJ`).join(', ')})` : ''}, from ΔH° and the extents`,
    );
    if (result.adiabaticRise !== undefined) {
      summary.push(`Adiabatic temperature ${result.adiabaticRise >= 0 ? 'rise' : 'fall'}: ${num(Math.abs(result.adiabaticRise))} K (heat capacity ${num((inputs.heatCapacity ?? 0) / 1000)} kJ/K, ${inputs.heatCapacityFrom})`);
      if (result.adiabaticRise > 50) {
        cautions.push(
          `If this heat stayed in the batch it would heat it by ${num(result.adiabaticRise)} K. Measure the heat release by calorimetry before scale-up, plan controlled addition and cooling, and follow your site's process-safety review.`,
        );
      }
    } else {
      summary.push('Adiabatic temperature rise: not known; give the batch a `heat capacity … kJ/K`, or Cp° to every species');
    }
  } else if (heat.unknown.length > 0) {
    summary.push(`Heat: not known; give ΔH° to ${heat.unknown.map((l) => `\`${l}\``).join(', ')}`);
  }
  result.absent.forEach((i) => {
    const s = inputs.species[i];
    summary.push(`${s.label} (${s.solvent ? 'solvent' : PHASE_NAMES[s.phase]}) ${result.charged[i] > 0 || result.afterOneWay[i] > 0 ? 'is used up' : 'does not form'} at equilibrium.`);
  });
  const used = [...inputs.oneWay.map((r) => r.reaction.label), ...inputs.reversible.map((r) => r.reaction.label)];
  summary.push(`Reactions used (${inputs.selection === 'uses' ? 'from `uses`' : 'every reaction that can run from what is charged'}): ${used.map((l) => `\`${l}\``).join(', ') || 'none'}`);
  const chargedFrom = inputs.species.filter((s) => s.chargedFrom).map((s) => `${s.label}: ${s.chargedFrom}`);
  if (chargedFrom.length > 0) summary.push(`Amounts converted: ${chargedFrom.join('; ')}`);
  const assumptions = [...phasesPresent].map((p) => ASSUMPTIONS[p]).filter((a): a is string => a !== undefined);
  return { title, conditions, solved: true, species, reactions, summary, cautions, assumptions, headline, sweeps: [], targets: [] };
}

/**
 * A product's yield: of a batch of its own, what this step formed against what it could
 * form; of a follow-on batch, what is in the vessel against the theoretical amount (the
 * chain's product so far counts, since the chain made it).
 */
export function yieldFraction(result: BatchResult, y: BatchResult['yields'][number]): number {
  if (result.inputs.from) return y.formed / y.theoretical;
  const start = result.afterOneWay[y.index];
  return (y.formed - start) / (y.theoretical - start);
}

/** The changes of a follow-on batch, and how each reaction stands right after them. */
function followOnSummary(result: BatchResult, from: FollowOn, summary: string[], cautions: string[]): void {
  const { inputs } = result;
  const lines: string[] = [];
  for (const step of from.steps) {
    const effect = step.changes.map((c) => `${inputs.species[c.index].label} ${signed(c.mol)} mol`).join(', ');
    let line = `\`${step.text}\`: ${effect || 'no change'}`;
    if (step.vent) {
      const litres = ((step.vent.released * R * OFF_GAS_T) / OFF_GAS_P) * 1000;
      line += step.vent.released > 0 ? `; gas let down from ${num(step.vent.from / 1e5)} to ${num(step.vent.to / 1e5)} bar, ${num(step.vent.released)} mol let out (${num(litres)} L at 1 atm and 25 °C)` : '';
      if (step.vent.released > 0) {
        cautions.push(
          `Venting lets out ${num(step.vent.released)} mol of gas (${num(litres)} L at 1 atm and 25 °C): send it to a safe place (scrubber, flare or vent stack as the gas requires), let the vessel down slowly, and follow local codes and your site's process-safety review.`,
        );
      }
    }
    if (step.note) line += ` (${step.note})`;
    lines.push(line);
  }
  summary.push(`Changes from \`${from.source}\`: ${lines.length > 0 ? lines.join('; ') : 'none (only the conditions change)'}`);
  for (const o of result.reactions) {
    if (o.inactive || Number.isNaN(o.lnQ0)) continue;
    const K = Math.exp(o.input.lnK);
    const direction = directionOf(o.lnQ0, o.input.lnK);
    const shift = direction === 'at equilibrium' ? 'it is at equilibrium already: no shift' : `it shifts ${direction.replace(/^[→←] /, '')}, by ${num(Math.abs(o.extent))} mol of reaction`;
    summary.push(`Right after the change, \`${o.input.reaction.label}\` has Q = ${num(Math.exp(o.lnQ0))} against K = ${num(K)}: ${shift}`);
  }
}

function directionOf(lnQ0: number, lnK: number): string {
  if (Number.isNaN(lnQ0)) return '—';
  if (Math.abs(lnQ0 - lnK) < 1e-9 * Math.max(1, Math.abs(lnK))) return 'at equilibrium';
  return lnQ0 < lnK ? '→ forward (Q < K)' : '← backward (Q > K)';
}
