// Hover: what the thing under the cursor means, as Markdown. Species and
// formulas show composition, charge, phase and molar mass; reactions show the
// per-element balance and the change in moles of gas; batches show their
// conditions and inputs. Reads only the cached analysis.
import { elementBySymbol } from '../../chem/elements';
import { formatFormulaCharge, type Formula } from '../../chem/formula';
import { Rational } from '../../chem/rational';
import { formatQuantity, parseUnit, SI_UNIT_TEXT, trim } from '../../chem/units';
import { tokenAt, type Token } from '../syntax/tree';
import { PHASE_NAMES, type BatchModel, type NotebookModel, type Phase, type ReactionModel, type ResolvedSpecies, type SpeciesDecl } from '../semantic/model';
import { gibbsFromLnK, T_REF } from '../../chem/thermo';
import { hessThermo, kAt } from '../semantic/batch-inputs';
import { batchReport, celsius, ESTIMATE_NOTE, kSourceText, num } from './batch-report';
import { markdownTable } from './tables';
import { KNOWN_PROPERTIES } from '../semantic/properties';
import type { Analysis } from './analysis';

export interface Hover {
  readonly markdown: string;
  readonly start: number;
  readonly end: number;
}

/** What each phase label means as a standard state (shown on hover). */
export const STANDARD_STATES: Readonly<Record<Phase, string>> = {
  g: 'ideal gas; activity = partial pressure / 1 bar',
  l: 'member of one ideal liquid mixture; activity = mole fraction in the liquid',
  s: 'pure solid phase; activity = 1 while present',
  aq: 'ideal dilute solute; activity = concentration / (1 mol/L)',
};

export function hover(analysis: Analysis, offset: number): Hover | undefined {
  const at = analysis.statementAt(offset);
  if (!at) return undefined;
  const tok = tokenAt(at.node, offset);
  if (!tok || tok.kind === 'whitespace' || tok.kind === 'newline' || tok.kind === 'comment' || tok.kind === 'error') return undefined;
  const span = (markdown: string, t: Token = tok): Hover => ({ markdown, start: t.start, end: t.end });

  if (tok.kind === 'phase') {
    const p = tok.text.slice(1, -1) as Phase;
    return PHASE_NAMES[p] ? span(`**${tok.text}** ${PHASE_NAMES[p]}: ${STANDARD_STATES[p]}`) : undefined;
  }
  if (tok.kind === 'unit' || tok.kind === 'number') return quantityHover(tok, analysis);
  if (at.kind === 'species') {
    if (tok.kind === 'keyword' && tok.text !== 'species') return propertyHover(tok, 'species');
    return at.item ? span(speciesMarkdown(at.item.name, at.item.formula, at.item.phase, at.item)) : undefined;
  }
  if (at.kind === 'reaction') {
    const r = at.item;
    if (tok.kind === 'species-ref') {
      const term = r.terms.find((t) => t.node.species === tok);
      return term?.species ? span(resolvedMarkdown(term.species)) : undefined;
    }
    if (tok.kind === 'keyword' && tok.text !== 'at') return propertyHover(tok, 'reaction');
    return { markdown: reactionMarkdown(r, analysis.model), start: r.equationStart, end: r.equationEnd };
  }
  if (at.kind === 'batch') {
    const b = at.item;
    if (tok.kind === 'species-ref') {
      const a = b.amounts.find((x) => x.node.species === tok) ?? b.operations.find((x) => x.node.species === tok);
      return a?.species ? span(resolvedMarkdown(a.species)) : undefined;
    }
    if (tok.kind === 'name' && b.node.source === tok) {
      // The source of a follow-on batch: its own report (what this batch starts from).
      const source = analysis.model.batches.find((x) => x.name === tok.text && x.node.name);
      return source ? span(batchMarkdown(source, analysis)) : undefined;
    }
    if (tok.kind === 'keyword' && FOLLOW_ON_KEYWORDS[tok.text]) return span(`**${tok.text}**: ${FOLLOW_ON_KEYWORDS[tok.text]}`);
    if (tok.kind === 'name' && b.node.name !== tok) {
      const reaction = analysis.model.reactions.find((r) => r.label === tok.text);
      if (reaction) return span(reactionMarkdown(reaction, analysis.model));
      const species = analysis.model.species.get(tok.text);
      if (species) return span(speciesMarkdown(species.name, species.formula, species.phase, species));
      return undefined;
    }
    if (tok.kind === 'keyword' && tok.text !== 'batch' && tok.text !== 'at') return propertyHover(tok, 'batch');
    return span(batchMarkdown(b, analysis));
  }
  return undefined;
}

/** The keywords of follow-on batches, for their hover. */
const FOLLOW_ON_KEYWORDS: Readonly<Record<string, string>> = {
  from: 'a follow-on batch starts from the equilibrium contents of the batch named after `from` (and its vessel, volume, temperature and pressure unless given here), applies its `add`, `remove` and `vent` lines, and re-equilibrates',
  add: '`add SPECIES AMOUNT` charges more, in any amount form a batch accepts (`equiv` is relative to the first batch\'s basis)',
  remove: '`remove SPECIES AMOUNT` or `remove SPECIES P %` takes some out (water distilled off, a solid filtered off)',
  vent: '`vent` lets the gas of a closed vessel down to 1 atm, every gas in proportion; `vent to PRESSURE` to that pressure. Send vented gas to a safe place and follow your site\'s process-safety review.',
  to: 'the pressure the vessel is vented down to',
};

function propertyHover(tok: Token, owner: 'species' | 'reaction' | 'batch'): Hover | undefined {
  const spec = KNOWN_PROPERTIES[owner][tok.text];
  return spec ? { markdown: `**${tok.text}**: ${spec.summary}`, start: tok.start, end: tok.end } : undefined;
}

function quantityHover(tok: Token, analysis: Analysis): Hover | undefined {
  if (tok.kind !== 'unit') return undefined;
  const u = parseUnit(tok.text);
  if (!u.ok) return undefined;
  void analysis;
  const si = SI_UNIT_TEXT[u.dimension];
  const meaning =
    u.dimension === 'temperature'
      ? `0 ${tok.text} = ${trim(u.toSI(0))} K, and a step of 1 ${tok.text} is ${trim(u.toSI(1) - u.toSI(0))} K`
      : u.dimension === 'percent' || u.dimension === 'equivalents' || u.dimension === 'dimensionless'
        ? `1 ${tok.text} = ${trim(u.toSI(1))}`
        : `1 ${tok.text} = ${labUnit(u.toSI(1), u.dimension, tok.text)}${trim(u.toSI(1))} ${si} (SI)`;
  return { markdown: `**${tok.text}**: ${u.dimension.replace('-', ' ')}; ${meaning}`, start: tok.start, end: tok.end };
}

/** The value in the usual lab unit followed by ` = `, unless that unit is the one written. */
function labUnit(value: number, dimension: Parameters<typeof formatQuantity>[1], written: string): string {
  const lab = formatQuantity(value, dimension);
  return lab.endsWith(` ${written}`) ? '' : `${lab} = `;
}

function resolvedMarkdown(s: ResolvedSpecies): string {
  return speciesMarkdown(s.declared?.name, s.formula, s.phase, s.declared);
}

export function speciesMarkdown(name: string | undefined, formula: Formula | undefined, phase: Phase | undefined, decl?: SpeciesDecl): string {
  const lines: string[] = [];
  const title = name && formula && name !== formula.text ? `**${name}**: ${formula.text}` : `**${formula?.text ?? name ?? ''}**`;
  lines.push(`${title}${phase ? ` (${phase}), ${PHASE_NAMES[phase]}` : ''}`);
  if (!formula) {
    lines.push('', 'The formula has a problem; see the diagnostic on its declaration.');
    return lines.join('\n');
  }
  lines.push('');
  if (formula.isElectron) {
    lines.push('The electron: charge −1, no elements.', '', `Molar mass: ${formula.molarMass.toExponential(6)} g/mol (CODATA)`);
    return lines.join('\n');
  }
  lines.push('| Element | Count | g/mol | Mass % |', '|:--|--:|--:|--:|');
  let estimated = false;
  for (const [symbol, count] of formula.composition) {
    const e = elementBySymbol(symbol);
    const w = e ? e.atomicWeight * count.toNumber() : NaN;
    if (e?.weightKind === 'mass-number') estimated = true;
    const pct = formula.molarMass > 0 ? (100 * w) / formula.molarMass : 0;
    lines.push(`| ${symbol}${e ? ` (${e.name})` : ''} | ${count.toString()} | ${w.toFixed(3)} | ${pct.toFixed(2)} |`);
  }
  lines.push('');
  lines.push(`Molar mass: **${formula.molarMass.toFixed(3)} g/mol**${formula.charge !== 0 ? ` · charge ${formatFormulaCharge(formula.charge).replace('^', '')}` : ''}`);
  if (estimated) lines.push('', '_Includes an element with no standard atomic weight: the mass number of its longest-lived isotope is used._');
  if (phase) lines.push('', `Standard state: ${STANDARD_STATES[phase]}.`);
  if (decl?.density !== undefined) lines.push('', `Density: ${formatQuantity(decl.density, 'density')}`);
  if (decl?.purity !== undefined) lines.push('', `Purity: ${formatQuantity(decl.purity, 'percent')}`);
  return lines.join('\n');
}

export function reactionMarkdown(r: ReactionModel, model: NotebookModel): string {
  const lines: string[] = [];
  const kind = r.reversible ? 'reversible' : 'one-way';
  lines.push(`**${r.label}**${r.labelIsAuto ? ' (automatic label)' : ''}: ${kind} reaction`, '');
  if (!r.balance) {
    lines.push('Balance not checked: a term or coefficient has a problem (see its diagnostic).');
  } else {
    lines.push('| | Left | Right | |', '|:--|--:|--:|:-:|');
    for (const t of r.balance.tallies) {
      lines.push(`| ${t.element} | ${t.left.toString()} | ${t.right.toString()} | ${t.left.equals(t.right) ? '✓' : '✗'} |`);
    }
    lines.push('', r.balance.balanced ? 'Balanced in elements and charge.' : 'Not balanced (see the diagnostic for a fix).');
    const gas = gasChange(r);
    lines.push('', `Δn(gas) = ${gas.delta.toString()} mol per mole of reaction (right − left, gas-phase terms)${gas.unknown.length > 0 ? `; no phase given for ${gas.unknown.map((s) => `\`${s}\``).join(', ')}, so not counted as gas` : ''}`);
  }
  lines.push(...reactionDataMarkdown(r, model));
  return lines.join('\n');
}

/**
 * K at the reaction's own temperature(s) and at 25 °C with ΔG°, where its data (or Hess's law)
 * give them, and what shifts it: pressure from Δn of gas, temperature from the sign of ΔH°,
 * and composition.
 */
function reactionDataMarkdown(r: ReactionModel, model: NotebookModel): string[] {
  if (!r.reversible) return ['', 'One-way: in a batch it runs to completion first, limited by its limiting reagent.'];
  const temps = new Set<number>([...(r.thermo?.points.map((p) => p.T) ?? []), T_REF]);
  const rows: string[][] = [];
  for (const T of [...temps].sort((a, b) => a - b)) {
    const k = kAt(r, model, T);
    if (!k) continue;
    rows.push([celsius(T), num(Math.exp(k.lnK)), `${num(gibbsFromLnK(k.lnK, T) / 1000)} kJ/mol`, kSourceText(k.source)]);
  }
  const out: string[] = [''];
  if (rows.length === 0) {
    out.push('No equilibrium data: add `K = … at …` (or log K, Kp, Kc, ΔG°, ΔH° with ΔS°), or formation data to its species.');
  } else {
    out.push(markdownTable({ header: ['T', 'K', 'ΔG°', 'K from'], align: ['r', 'r', 'r', 'l'], rows }));
  }
  const shifts: string[] = [];
  const gas = gasChange(r);
  if (gas.unknown.length === 0) {
    const dn = gas.delta.toNumber();
    shifts.push(
      dn < 0
        ? 'Higher pressure pushes it to the right (fewer moles of gas there).'
        : dn > 0
          ? 'Higher pressure pushes it to the left (fewer moles of gas there); lower pressure or an inert sweep favours the right.'
          : 'Pressure has no effect on its position (Δn of gas = 0).',
    );
  }
  const dH = r.thermo?.dH ?? hessThermo(r)?.dH;
  if (dH !== undefined) {
    shifts.push(
      dH < 0
        ? `Exothermic (ΔH° = ${trim(dH / 1000)} kJ/mol): higher temperature lowers K.`
        : dH > 0
          ? `Endothermic (ΔH° = ${trim(dH / 1000)} kJ/mol): higher temperature raises K.`
          : 'ΔH° = 0: K does not change with temperature.',
    );
  } else {
    shifts.push('Temperature effect unknown: give ΔH° (or K at two temperatures).');
  }
  shifts.push('An excess of a reactant, or removing a product as it forms (distilling, venting, precipitating), drives it to the right.');
  out.push('', '**What shifts it**', '', ...shifts.map((x) => `- ${x}`));
  return out;
}

/** Σν over gas-phase terms, right minus left; also the terms whose phase is unknown. */
export function gasChange(r: ReactionModel): { delta: Rational; unknown: string[] } {
  let delta = Rational.ZERO;
  const unknown: string[] = [];
  for (const t of r.terms) {
    if (!t.species || !t.coefficient) continue;
    if (t.species.formula.isElectron) continue;
    if (t.species.phase === undefined) {
      unknown.push(t.node.species.text);
      continue;
    }
    if (t.species.phase !== 'g') continue;
    delta = t.side === 'right' ? delta.add(t.coefficient) : delta.sub(t.coefficient);
  }
  return { delta, unknown };
}

function batchMarkdown(b: BatchModel, analysis: Analysis): string {
  const report = batchReport(analysis, b);
  const lines: string[] = [`**${report.title}**`, '', ...report.conditions.map((c) => `${c}  `)];
  if (!report.solved) {
    lines.push('', report.problem ?? 'Not solved.');
    return lines.join('\n');
  }
  lines.push('', `_${ESTIMATE_NOTE}_`);
  if (report.cautions.length > 0) lines.push('', ...report.cautions.map((c) => `⚠ ${c}`));
  if (report.species) lines.push('', markdownTable(report.species));
  if (report.reactions && report.reactions.rows.length > 0) lines.push('', markdownTable(report.reactions));
  if (report.summary.length > 0) lines.push('', ...report.summary.map((x) => `- ${x}`));
  if (report.targets.length > 0) lines.push('', ...report.targets.map((x) => `- ${x}`));
  for (const sw of report.sweeps) lines.push('', `**${sw.title}**`, '', markdownTable(sw.table));
  if (report.assumptions.length > 0) lines.push('', `_Assumptions: ${report.assumptions.join('; ')}._`);
  return lines.join('\n');
}
