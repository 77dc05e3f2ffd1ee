// A batch turned into the inputs of an equilibrium solve: every amount line in
// moles (mass, volume with density, equivalents, concentration, partial
// pressure), the reactions that can run, each reversible one's K at the batch
// temperature, and the conditions (constant T and P, or a closed vessel).
// Missing data become errors on the exact line, saying what to add.
import { enthalpyAt, lnKAt, hessData, R, type FormationData, type KSource, type ReactionThermo } from '../../chem/thermo';
import { formatQuantity, type Dimension } from '../../chem/units';
import { forEachToken, type SyntaxElement } from '../syntax/tree';
import { speciesIdentity } from './build';
import { diagnostic, type Diagnostic } from './codes';
import { STANDARD_ATMOSPHERE, type BatchAmount, type BatchModel, type NotebookModel, type Phase, type ReactionModel, type ResolvedSpecies } from './model';

/** A species taking part in a batch: from an amount line or a used reaction. */
export interface BatchSpecies {
  /** speciesIdentity(): equal for two references to the same species. */
  readonly id: string;
  /** What the chemist wrote: a declared name or a formula. */
  readonly label: string;
  readonly species: ResolvedSpecies;
  readonly phase: Phase;
  /** Solvent water: activity 1 when solutes are present. */
  readonly solvent: boolean;
  /** mol charged (before one-way reactions). */
  readonly charged: number;
  /** How the charged amount was worked out, for the hover (e.g. "116 g ÷ 116.16 g/mol"). */
  readonly chargedFrom?: string;
}

export interface BatchReaction {
  readonly reaction: ReactionModel;
  /** Stoichiometric numbers over BatchInputs.species (products +, reactants −). */
  readonly nu: readonly number[];
  /** ΔH° at the batch temperature (J/mol), when the data give it. */
  readonly dH?: number;
}

export interface ReversibleInput extends BatchReaction {
  readonly lnK: number;
  readonly source: KSource | { readonly kind: 'hess'; readonly detail: string };
}

export interface BatchInputs {
  readonly species: readonly BatchSpecies[];
  readonly oneWay: readonly BatchReaction[];
  readonly reversible: readonly ReversibleInput[];
  /** K */
  readonly temperature: number;
  readonly conditions: { readonly kind: 'constant-pressure'; readonly P: number } | { readonly kind: 'constant-volume'; readonly gasVolume: number };
  /** m^3 of liquid (for solutes) */
  readonly liquidVolume?: number;
  /** Index into species of the basis (for conversion), when there is one. */
  readonly basis?: number;
  /** How the reactions were chosen, for the hover. */
  readonly selection: 'uses' | 'automatic';
  /** J/K: the batch's `heat capacity`, or Σ n·Cp° when every species has Cp°; undefined otherwise. */
  readonly heatCapacity?: number;
  /** Where the heat capacity came from, for the hover. */
  readonly heatCapacityFrom?: string;
  /** m^3 of the closed vessel (gas space plus liquid), when there is one. */
  readonly vessel?: number;
  /**
   * For the conversion of the basis: mol of it charged over the whole chain of batches (the
   * first batch's charge plus every `add`), and mol taken out by `remove` and `vent`.
   */
  readonly basisFed?: number;
  readonly basisWithdrawn?: number;
  /** Present for a follow-on batch (`batch B from A`). */
  readonly from?: FollowOn;
}

/** What one operation line of a follow-on batch did. */
export interface FollowOnStep {
  /** The line as the chemist wrote it (`remove H2O 90 %`). */
  readonly text: string;
  /** Its effect: the species and the signed change in mol. */
  readonly changes: readonly { readonly index: number; readonly mol: number }[];
  /** `vent`: the gas pressure before and after (Pa), and the mol of gas let out. */
  readonly vent?: { readonly from: number; readonly to: number; readonly released: number };
  /** How an added amount was worked out, or why nothing changed. */
  readonly note?: string;
}

/** A follow-on batch: where its contents come from and what was done to them. */
export interface FollowOn {
  readonly source: string;
  /** mol per species (this batch's order) at the source's equilibrium, before the operations. */
  readonly before: readonly number[];
  readonly steps: readonly FollowOnStep[];
}

export type BatchInputResult = { readonly inputs?: BatchInputs; readonly diagnostics: readonly Diagnostic[] };

/**
 * The source of a follow-on batch as batchInputs needs it: the source's inputs and its
 * equilibrium amounts (undefined when the source has no answer).
 */
export interface SourceState {
  readonly name: string;
  readonly inputs: BatchInputs;
  readonly equilibrium: readonly number[];
  readonly converged: boolean;
}

/** Reactions with any of these problems cannot be used in a solve. */
function usable(r: ReactionModel): boolean {
  return r.balance !== undefined && r.balance.balanced;
}

export function batchInputs(batch: BatchModel, model: NotebookModel, source?: SourceState): BatchInputResult {
  const out: Diagnostic[] = [];
  if (batch.source !== undefined) return followOnInputs(batch, model, source, out);
  if (batch.temperature === undefined) return { diagnostics: out };
  const T = batch.temperature;

  // ---- amounts in mol --------------------------------------------------------------------
  const absolute = batch.amounts.filter((a) => a.value !== undefined && a.dimension !== 'equivalents' && a.species);
  const basisAmount = batch.basis !== undefined ? batch.amounts.find((a) => a.node.species.text === batch.basis) : absolute[0];
  const moles = new Map<BatchAmount, { n: number; from?: string }>();
  let amountsOk = true;
  const gasVolume = batch.vessel !== undefined ? batch.vessel - (batch.volume ?? 0) : undefined;
  // A liquid volume that fills the vessel is already an error on its line; there is nothing to solve.
  if (gasVolume !== undefined && gasVolume <= 0) return { diagnostics: out };
  const context: ChargeContext = { T, P: batch.pressure, volume: batch.volume, gasVolume };
  for (const a of batch.amounts) {
    if (a.dimension === 'equivalents') continue;
    const m = a.species && a.value !== undefined && a.dimension ? toMoles(a.species, a.node.species.text, a.value, a.dimension, a.node.value ?? a.node, context, out) : undefined;
    if (m) moles.set(a, m);
    else amountsOk = false; // unreadable or unconvertible: its line already says why
  }
  for (const a of batch.amounts) {
    if (a.dimension !== 'equivalents') continue;
    if (a.value === undefined || !a.species) {
      amountsOk = false;
      continue;
    }
    const base = basisAmount && basisAmount !== a ? moles.get(basisAmount) : undefined;
    if (!base || basisAmount?.dimension === 'equivalents') {
      if (basisAmount && basisAmount.dimension === 'equivalents') {
        const where = a.node.value ?? a.node;
        out.push(diagnostic('bad-basis', 'the basis of `equiv` must itself have an absolute amount (mol, g, mL, …)', where.start, where.end));
      }
      amountsOk = false;
      continue;
    }
    moles.set(a, { n: a.value * base.n, from: `${a.value} × ${Number(base.n.toPrecision(4))} mol of ${basisAmount!.node.species.text}` });
  }

  const contents = new Contents();
  for (const a of batch.amounts) {
    if (!a.species || a.value === undefined) continue; // a line without a readable amount has its own error
    const i = contents.add(a.species, a.node.species.text, a.node.species);
    const m = moles.get(a);
    if (m) {
      contents.drafts[i].charged = m.n;
      contents.drafts[i].chargedFrom = m.from;
    }
  }
  const basisIndex = basisAmount?.species ? contents.index.get(speciesIdentity(basisAmount.species)) : undefined;
  return finishInputs(batch, model, contents, { T, P: batch.pressure, volume: batch.volume, gasVolume, vessel: batch.vessel }, basisIndex, undefined, amountsOk, out);
}

/** Temperature, pressure and volumes that amounts are converted at. */
interface ChargeContext {
  readonly T: number;
  readonly P: number;
  /** m^3 of liquid */
  readonly volume?: number;
  /** m^3 of gas space in a closed vessel */
  readonly gasVolume?: number;
}

/** An amount in any form a batch accepts, in mol (with how it was worked out), or undefined with an error on `where`. */
function toMoles(
  s: ResolvedSpecies,
  name: string,
  value: number,
  dimension: Dimension,
  where: { start: number; end: number },
  context: ChargeContext,
  out: Diagnostic[],
): { n: number; from?: string } | undefined {
  const M = s.formula.molarMass / 1000; // kg/mol
  const purity = s.declared?.purity ?? 1;
  const purityNote = purity < 1 ? ` × ${formatQuantity(purity, 'percent')} purity` : '';
  const { T } = context;
  switch (dimension) {
    case 'amount':
      return { n: value };
    case 'mass':
      if (M <= 0) {
        out.push(diagnostic('missing-data', `\`${name}\` has no molar mass, so a mass cannot be converted to moles`, where.start, where.end));
        return undefined;
      }
      return { n: (value * purity) / M, from: `${formatQuantity(value, 'mass')}${purityNote} ÷ ${(M * 1000).toFixed(3)} g/mol` };
    case 'volume': {
      const density = s.declared?.density;
      if (density === undefined) {
        if (s.phase === 'g') {
          const P = context.P;
          return { n: (P * value) / (R * T), from: `${formatQuantity(value, 'volume')} of ideal gas at the batch T and ${formatQuantity(P, 'pressure')}` };
        }
        out.push(
          diagnostic(
            'missing-data',
            `a volume of \`${name}\` needs its density: add \`density … g/mL\` under ${s.declared ? `\`species ${s.declared.name}\`` : `a \`species\` declaration for ${name}`}`,
            where.start,
            where.end,
          ),
        );
        return undefined;
      }
      return {
        n: (value * density * purity) / M,
        from: `${formatQuantity(value, 'volume')} × ${formatQuantity(density, 'density')}${purityNote} ÷ ${(M * 1000).toFixed(3)} g/mol`,
      };
    }
    case 'concentration':
      if (context.volume === undefined) {
        out.push(diagnostic('missing-data', `a concentration of \`${name}\` needs the liquid volume: add \`volume … mL\` to this batch`, where.start, where.end));
        return undefined;
      }
      return { n: value * context.volume, from: `${formatQuantity(value, 'concentration')} × ${formatQuantity(context.volume, 'volume')}` };
    case 'pressure':
      if (context.gasVolume === undefined) {
        out.push(diagnostic('missing-data', `a partial pressure of \`${name}\` needs a closed vessel: add \`vessel … L\` to this batch (or give mol)`, where.start, where.end));
        return undefined;
      }
      if (s.phase !== 'g') {
        out.push(diagnostic('missing-data', `a partial pressure is for a gas; \`${name}\` is not declared as (g)`, where.start, where.end));
        return undefined;
      }
      return { n: (value * context.gasVolume) / (R * T), from: `${formatQuantity(value, 'pressure')} in ${formatQuantity(context.gasVolume, 'volume')} of gas space at the batch T` };
    default:
      return undefined;
  }
}

/** The species of a batch as they are gathered: from amount lines, the source batch, or used reactions. */
class Contents {
  readonly drafts: BatchSpeciesDraft[] = [];
  readonly index = new Map<string, number>();
  add(s: ResolvedSpecies, label: string, anchor: { start: number; end: number }): number {
    const id = speciesIdentity(s);
    let i = this.index.get(id);
    if (i === undefined) {
      i = this.drafts.length;
      this.index.set(id, i);
      this.drafts.push({ id, label, species: s, charged: 0, anchor });
    }
    return i;
  }
}

interface Conditions {
  readonly T: number;
  readonly P: number;
  readonly volume?: number;
  readonly gasVolume?: number;
  readonly vessel?: number;
}

/**
 * A follow-on batch: its source's equilibrium contents (and vessel, volume, temperature and
 * pressure unless this batch gives its own), then each operation line in order.
 */
function followOnInputs(batch: BatchModel, model: NotebookModel, source: SourceState | undefined, out: Diagnostic[]): BatchInputResult {
  const where = batch.node.source ?? batch.node.name ?? batch.node.keyword;
  if (!source || !source.converged) {
    // An unknown source or a loop has its own error on this name; a source with errors of its own says why there.
    if (source && !source.converged) {
      out.push(diagnostic('missing-data', `\`${batch.source}\` has no equilibrium answer (see its errors), so this batch cannot start from it`, where.start, where.end));
    }
    return { diagnostics: out };
  }
  const src = source.inputs;
  const T = batch.temperature ?? src.temperature;
  const sourceP = src.conditions.kind === 'constant-pressure' ? src.conditions.P : STANDARD_ATMOSPHERE;
  const P = batch.pressureIsDefault ? sourceP : batch.pressure;
  const vessel = batch.vessel ?? src.vessel;
  const volume = batch.volume ?? src.liquidVolume;
  const gasVolume = vessel !== undefined ? vessel - (volume ?? 0) : undefined;
  if (gasVolume !== undefined && gasVolume <= 0) {
    out.push(diagnostic('bad-quantity', 'the liquid volume must be less than the vessel volume, leaving room for the gas', where.start, where.end));
    return { diagnostics: out };
  }
  const contents = new Contents();
  src.species.forEach((sp, i) => {
    const k = contents.add(sp.species, sp.label, where);
    contents.drafts[k].charged = source.equilibrium[i];
  });
  const before = source.equilibrium.slice();
  const basisId = batch.basis ?? (src.basis !== undefined ? src.species[src.basis].id : undefined);
  let basisIndex: number | undefined;
  if (batch.basis !== undefined) {
    basisIndex = contents.drafts.findIndex((d) => d.label === batch.basis || d.id === batch.basis);
    const line = batch.node.properties.find((p) => p.type === 'property' && p.keyText === 'basis');
    if (basisIndex < 0) {
      const at = line && line.type === 'property' && line.names[0] ? line.names[0] : where;
      out.push(diagnostic('bad-basis', `the basis \`${batch.basis}\` must be one of the species this batch starts with or adds`, at.start, at.end));
      basisIndex = undefined;
    }
  } else if (basisId !== undefined) basisIndex = contents.index.get(basisId);
  // Conversion over the whole chain: what was fed in and what was taken out.
  const inherited = batch.basis === undefined && src.basis !== undefined;
  let fed = inherited ? (src.basisFed ?? src.species[src.basis!].charged) : basisIndex !== undefined ? contents.drafts[basisIndex].charged : 0;
  let withdrawn = inherited ? (src.basisWithdrawn ?? 0) : 0;
  const equivBase = src.basis !== undefined ? (src.basisFed ?? src.species[src.basis].charged) : undefined;
  const context: ChargeContext = { T, P, volume, gasVolume };
  const steps: FollowOnStep[] = [];
  let ok = true;
  for (const op of batch.operations) {
    const lineText = textOf(op.node).trim();
    if (op.operation === 'vent') {
      if (gasVolume === undefined) {
        out.push(diagnostic('bad-operation', '`vent` lets down the gas of a closed vessel: this batch (and its source) has no `vessel`', op.node.keyword.start, op.node.keyword.end));
        ok = false;
        continue;
      }
      const to = op.value ?? STANDARD_ATMOSPHERE;
      let gas = 0;
      contents.drafts.forEach((d) => {
        if (d.species.phase === 'g') gas += d.charged;
      });
      const pressure = (gas * R * T) / gasVolume;
      if (pressure <= to) {
        steps.push({ text: lineText, changes: [], vent: { from: pressure, to: pressure, released: 0 }, note: `the gas is already at ${formatQuantity(pressure, 'pressure')}, not above ${formatQuantity(to, 'pressure')}: nothing is let out` });
        continue;
      }
      const keep = to / pressure;
      const changes: { index: number; mol: number }[] = [];
      contents.drafts.forEach((d, i) => {
        if (d.species.phase !== 'g' || d.charged <= 0) return;
        const after = d.charged * keep;
        changes.push({ index: i, mol: after - d.charged });
        if (i === basisIndex) withdrawn += d.charged - after;
        d.charged = after;
      });
      steps.push({ text: lineText, changes, vent: { from: pressure, to, released: gas * (1 - keep) } });
      continue;
    }
    const s = op.species ? sameSpecies(contents, op.species) : undefined;
    if (!s || op.value === undefined || !op.dimension || !op.node.species) {
      ok = false; // its line already says what is wrong
      continue;
    }
    const name = op.node.species.text;
    const at = op.node.value ?? op.node;
    if (op.operation === 'add') {
      let m: { n: number; from?: string } | undefined;
      if (op.dimension === 'equivalents') {
        if (equivBase === undefined) {
          out.push(diagnostic('bad-basis', '`equiv` is relative to the basis of the first batch of the chain, which has none', at.start, at.end));
          ok = false;
          continue;
        }
        m = { n: op.value * equivBase, from: `${op.value} × ${Number(equivBase.toPrecision(4))} mol of the first batch's basis` };
      } else m = toMoles(s, name, op.value, op.dimension, at, context, out);
      if (!m) {
        ok = false;
        continue;
      }
      const i = contents.add(s, name, op.node.species);
      contents.drafts[i].charged += m.n;
      if (i === basisIndex) fed += m.n;
      steps.push({ text: lineText, changes: [{ index: i, mol: m.n }], note: m.from });
      continue;
    }
    // remove
    const i = contents.index.get(speciesIdentity(s));
    const present = i !== undefined ? contents.drafts[i].charged : 0;
    let mol: number;
    if (op.dimension === 'percent') mol = present * op.value;
    else {
      const m = toMoles(s, name, op.value, op.dimension, at, context, out);
      if (!m) {
        ok = false;
        continue;
      }
      mol = m.n;
      // Taking out what is there, to rounding, is taking it all.
      if (mol > present && mol <= present * (1 + REMOVE_ROUNDING)) mol = present;
      if (mol > present) {
        out.push(
          diagnostic(
            'bad-operation',
            `only ${Number(present.toPrecision(4))} mol of \`${name}\` is there at this point, so ${Number(mol.toPrecision(4))} mol cannot be removed (give a smaller amount or a percentage)`,
            at.start,
            at.end,
          ),
        );
        ok = false;
        continue;
      }
    }
    if (i === undefined) {
      steps.push({ text: lineText, changes: [], note: `there is no \`${name}\` at this point: nothing is removed` });
      continue;
    }
    const after = op.dimension === 'percent' && op.value === 1 ? 0 : Math.max(0, present - mol);
    contents.drafts[i].charged = after;
    if (i === basisIndex) withdrawn += present - after;
    steps.push({ text: lineText, changes: [{ index: i, mol: after - present }] });
  }
  return finishInputs(
    batch,
    model,
    contents,
    { T, P, volume, gasVolume, vessel },
    basisIndex,
    {
      fed,
      withdrawn,
      from: { source: source.name, before, steps },
      reactions: batch.uses === undefined && src.selection === 'uses' ? [...src.oneWay, ...src.reversible].map((r) => r.reaction) : undefined,
    },
    ok,
    out,
  );
}

/**
 * The species an operation line means: itself, or, for a bare formula written without a
 * phase (`remove H2O 90 %`), the one species of the batch with that formula.
 */
function sameSpecies(contents: Contents, s: ResolvedSpecies): ResolvedSpecies {
  if (s.declared || s.phase !== undefined || contents.index.has(speciesIdentity(s))) return s;
  const matches = contents.drafts.filter((d) => !d.species.declared && d.species.key === s.key);
  return matches.length === 1 ? matches[0].species : s;
}

/** Removing up to this fraction more than is there (rounding in a converted amount) removes it all. */
const REMOVE_ROUNDING = 1e-12;

/** The source text of a node (from its tokens), without its line break or note. */
function textOf(node: SyntaxElement): string {
  let out = '';
  forEachToken(node, (t) => {
    if (t.kind !== 'newline' && t.kind !== 'comment') out += t.text;
  });
  return out;
}

function finishInputs(
  batch: BatchModel,
  model: NotebookModel,
  contents: Contents,
  conditions: Conditions,
  basisIndex: number | undefined,
  followOn: { fed: number; withdrawn: number; from: FollowOn; reactions?: readonly ReactionModel[] } | undefined,
  amountsOk: boolean,
  out: Diagnostic[],
): BatchInputResult {
  const header = batch.node.name ?? batch.node.keyword;
  const { T, volume, gasVolume } = conditions;
  const species = contents.drafts;
  const index = contents.index;
  const add = (s: ResolvedSpecies, label: string, anchor: { start: number; end: number }): number => contents.add(s, label, anchor);
  // ---- species and reactions ---------------------------------------------------------------
  const available = new Set<string>();
  for (const s of species) if (s.charged > 0) available.add(s.id);

  const given = batch.uses ?? followOn?.reactions;
  const candidates = given ?? model.reactions;
  const selection: BatchInputs['selection'] = given ? 'uses' : 'automatic';
  const sideAvailable = (r: ReactionModel, side: 'left' | 'right'): boolean =>
    r.terms.filter((t) => t.side === side).every((t) => t.species !== undefined && (available.has(speciesIdentity(t.species)) || t.species.formula.isElectron));
  const chosen: ReactionModel[] = [];
  if (given) {
    for (const r of given) chosen.push(r);
  } else {
    // Closure: a reaction runs when all species on one side are available; what it forms
    // becomes available to the others. One-way reactions need their left side.
    let grew = true;
    while (grew) {
      grew = false;
      for (const r of candidates) {
        if (chosen.includes(r) || !usable(r)) continue;
        const runs = r.reversible ? sideAvailable(r, 'left') || sideAvailable(r, 'right') : sideAvailable(r, 'left');
        if (!runs) continue;
        chosen.push(r);
        for (const t of r.terms) if (t.species) available.add(speciesIdentity(t.species));
        grew = true;
      }
    }
    chosen.sort((a, b) => a.node.start - b.node.start);
  }

  const usesLine = batch.node.properties.find((p) => p.type === 'property' && p.keyText === 'uses');
  const reactionAnchor = (r: ReactionModel): { start: number; end: number } => {
    if (usesLine && usesLine.type === 'property') {
      const tok = usesLine.names.find((n) => n.text === r.label);
      if (tok) return tok;
    }
    return header;
  };
  let reactionsOk = true;
  for (const r of chosen) {
    if (!usable(r)) {
      const a = reactionAnchor(r);
      out.push(diagnostic('missing-data', `reaction \`${r.label}\` cannot be used until its equation is balanced and every term resolves`, a.start, a.end));
      reactionsOk = false;
      continue;
    }
    for (const t of r.terms) {
      if (!t.species || t.species.formula.isElectron) continue;
      add(t.species, t.node.species.text, reactionAnchor(r));
    }
    if (r.terms.some((t) => t.species?.formula.isElectron)) {
      const a = reactionAnchor(r);
      out.push(diagnostic('missing-data', `reaction \`${r.label}\` is a half reaction (it has electrons); a batch needs whole reactions`, a.start, a.end));
      reactionsOk = false;
    }
  }

  const phaseless = species.filter((s) => s.species.phase === undefined);
  for (const s of phaseless) {
    out.push(
      diagnostic(
        'missing-data',
        `the phase of \`${s.label}\` is needed to solve this batch: write it as \`${s.label}(s)\`, (l), (g) or (aq), or declare the species with a phase`,
        s.anchor.start,
        s.anchor.end,
      ),
    );
  }
  const hasSolute = species.some((s) => s.species.phase === 'aq');
  if (hasSolute && volume === undefined) {
    out.push(diagnostic('missing-data', 'this batch has dissolved (aq) species: add `volume … mL` (the liquid volume) so their concentrations are known', header.start, header.end));
  }
  if (!amountsOk || !reactionsOk || phaseless.length > 0 || (hasSolute && volume === undefined)) return { diagnostics: out };

  const finished: BatchSpecies[] = species.map(({ anchor: _anchor, ...s }) => ({
    ...s,
    phase: s.species.phase!,
    solvent: hasSolute && s.species.phase === 'l' && s.species.formula.text.replace(/\s/g, '') === 'H2O',
  }));
  const nuOf = (r: ReactionModel): number[] => {
    const nu = new Array<number>(finished.length).fill(0);
    for (const t of r.terms) {
      if (!t.species || !t.coefficient || t.species.formula.isElectron) continue;
      const i = index.get(speciesIdentity(t.species))!;
      nu[i] += (t.side === 'right' ? 1 : -1) * t.coefficient.toNumber();
    }
    return nu;
  };
  const oneWay: BatchReaction[] = [];
  const reversible: ReversibleInput[] = [];
  for (const r of chosen) {
    if (!r.reversible) {
      oneWay.push({ reaction: r, nu: nuOf(r), dH: enthalpyOf(r, T) });
      continue;
    }
    const k = kAt(r, model, T);
    if (!k) {
      const a = reactionAnchor(r);
      out.push(
        diagnostic(
          'missing-data',
          `reaction \`${r.label}\` has no equilibrium data: add \`K = … at …\` (or log K, Kp, ΔG°, ΔH° with ΔS°) under it, or formation data (ΔfG°) to its species`,
          a.start,
          a.end,
        ),
      );
      reactionsOk = false;
      continue;
    }
    for (const w of k.warnings.filter((x) => x.startsWith('K is given at'))) {
      const a = reactionAnchor(r);
      out.push(diagnostic('k-extrapolated', `\`${r.label}\`: ${w}`, a.start, a.end));
    }
    reversible.push({ reaction: r, nu: nuOf(r), lnK: k.lnK, source: k.source, dH: enthalpyOf(r, T) });
  }
  if (!reactionsOk) return { diagnostics: out };
  const heat = heatCapacityOf(batch, finished);
  const inputs: BatchInputs = {
    species: finished,
    oneWay,
    reversible,
    temperature: T,
    conditions: gasVolume !== undefined ? { kind: 'constant-volume', gasVolume } : { kind: 'constant-pressure', P: conditions.P },
    liquidVolume: volume,
    basis: basisIndex,
    selection,
    heatCapacity: heat?.value,
    heatCapacityFrom: heat?.from,
    vessel: conditions.vessel,
  };
  if (!followOn) return { inputs, diagnostics: out };
  // The source's species list comes first in the same order, so `before` lines up; species
  // added here or brought in by reactions start from zero before the change.
  const before = finished.map((_, i) => followOn.from.before[i] ?? 0);
  return {
    inputs: { ...inputs, basisFed: followOn.fed, basisWithdrawn: followOn.withdrawn, from: { ...followOn.from, before } },
    diagnostics: out,
  };
}

interface BatchSpeciesDraft {
  /** Where a problem with this species is reported: its amount line, or the reaction that brings it in. */
  readonly anchor: { readonly start: number; readonly end: number };
  readonly id: string;
  readonly label: string;
  readonly species: ResolvedSpecies;
  charged: number;
  chargedFrom?: string;
}

/**
 * K of a reaction at T: from its own data, else by Hess's law from its species' formation
 * data (declared species only).
 */
export function kAt(r: ReactionModel, model: NotebookModel, T: number): { lnK: number; source: ReversibleInput['source']; warnings: readonly string[] } | undefined {
  const own = r.thermo ? lnKAt(r.thermo, T) : undefined;
  if (own) return own;
  const hess = hessThermo(r);
  if (!hess) return undefined;
  const k = lnKAt(hess, T);
  if (!k) return undefined;
  void model;
  let how: string;
  switch (k.source.kind) {
    case 'given':
      how = 'ΔrG° = Σν·ΔfG° at 298.15 K';
      break;
    case 'van-t-hoff':
      how = "Σν·ΔfG° at 298.15 K moved with ΔrH° = Σν·ΔfH° (van 't Hoff)";
      break;
    case 'enthalpy-entropy':
      how = 'ΔrH° and ΔrS° from ΔfH° and S°';
      break;
    case 'assumed-constant':
      how = 'Σν·ΔfG° at 298.15 K, taken as constant (no ΔfH° for a temperature correction)';
      break;
    default:
      how = 'formation data';
  }
  return { lnK: k.lnK, source: { kind: 'hess', detail: how }, warnings: k.warnings };
}

/** The reaction's data by Hess's law, when every species has formation data. */
export function hessThermo(r: ReactionModel): ReactionThermo | undefined {
  const terms: { nu: number; data: FormationData | undefined }[] = [];
  for (const t of r.terms) {
    if (!t.species || !t.coefficient) return undefined;
    const nu = (t.side === 'right' ? 1 : -1) * t.coefficient.toNumber();
    // The electron and H+(aq) have zero formation data by convention (common practice).
    const conventionalZero = t.species.formula.isElectron || (t.species.formula.text.replace(/[\^]/g, '') === 'H+' && t.species.phase === 'aq');
    terms.push({ nu, data: conventionalZero ? { dfG: 0, dfH: 0, S: 0, Cp: 0 } : t.species.declared?.formation });
  }
  return hessData(terms);
}

/** ΔH° at T of a reaction: its own data, else Hess's law; undefined when unknown. */
export function enthalpyOf(r: ReactionModel, T: number): number | undefined {
  const own = r.thermo ? enthalpyAt(r.thermo, T) : undefined;
  if (own !== undefined) return own;
  const hess = hessThermo(r);
  return hess ? enthalpyAt(hess, T) : undefined;
}

/**
 * The batch's heat capacity for an adiabatic rise: its `heat capacity` line, else Σ n·Cp° over
 * the charged species when every one of them has Cp° (constant, from its declaration).
 */
function heatCapacityOf(batch: BatchModel, species: readonly BatchSpecies[]): { value: number; from: string } | undefined {
  if (batch.heatCapacity !== undefined) return { value: batch.heatCapacity, from: 'the batch\'s heat capacity' };
  let total = 0;
  for (const s of species) {
    if (s.charged <= 0) continue;
    const cp = s.species.declared?.formation?.Cp;
    if (cp === undefined) return undefined;
    total += s.charged * cp;
  }
  return total > 0 ? { value: total, from: 'Σ n·Cp° of what is charged' } : undefined;
}
