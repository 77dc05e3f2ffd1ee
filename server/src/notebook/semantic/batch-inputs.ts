// A batch turned into the inputs of an equilibrium solve: every amount line in
// moles (mass, volume with density, equivalents, concentration, partial
// pressure), the reactions that can run, each reversible one's K at the batch
// temperature, and the conditions (constant T and P, or a closed vessel).
// Missing data become errors on the exact line, saying what to add.
import { enthalpyAt, lnKAt, hessData, R, type FormationData, type KSource, type ReactionThermo } from '../../chem/thermo';
import { formatQuantity } from '../../chem/units';
import { speciesIdentity } from './build';
import { diagnostic, type Diagnostic } from './codes';
import type { BatchAmount, BatchModel, NotebookModel, Phase, ReactionModel, ResolvedSpecies } from './model';

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
}

export type BatchInputResult = { readonly inputs?: BatchInputs; readonly diagnostics: readonly Diagnostic[] };

/** Reactions with any of these problems cannot be used in a solve. */
function usable(r: ReactionModel): boolean {
  return r.balance !== undefined && r.balance.balanced;
}

export function batchInputs(batch: BatchModel, model: NotebookModel): BatchInputResult {
  const out: Diagnostic[] = [];
  const header = batch.node.name ?? batch.node.keyword;
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
  const toMoles = (a: BatchAmount): { n: number; from?: string } | undefined => {
    const s = a.species;
    if (!s || a.value === undefined || !a.dimension) return undefined;
    const M = s.formula.molarMass / 1000; // kg/mol
    const purity = s.declared?.purity ?? 1;
    const purityNote = purity < 1 ? ` × ${formatQuantity(purity, 'percent')} purity` : '';
    const name = a.node.species.text;
    const where = a.node.value ?? a.node;
    switch (a.dimension) {
      case 'amount':
        return { n: a.value };
      case 'mass':
        if (M <= 0) {
          out.push(diagnostic('missing-data', `\`${name}\` has no molar mass, so a mass cannot be converted to moles`, where.start, where.end));
          return undefined;
        }
        return { n: (a.value * purity) / M, from: `${formatQuantity(a.value, 'mass')}${purityNote} ÷ ${(M * 1000).toFixed(3)} g/mol` };
      case 'volume': {
        const density = s.declared?.density;
        if (density === undefined) {
          if (s.phase === 'g') {
            const P = batch.pressure;
            return { n: (P * a.value) / (R * T), from: `${formatQuantity(a.value, 'volume')} of ideal gas at the batch T and ${formatQuantity(P, 'pressure')}` };
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
          n: (a.value * density * purity) / M,
          from: `${formatQuantity(a.value, 'volume')} × ${formatQuantity(density, 'density')}${purityNote} ÷ ${(M * 1000).toFixed(3)} g/mol`,
        };
      }
      case 'concentration':
        if (batch.volume === undefined) {
          out.push(diagnostic('missing-data', `a concentration of \`${name}\` needs the liquid volume: add \`volume … mL\` to this batch`, where.start, where.end));
          return undefined;
        }
        return { n: a.value * batch.volume, from: `${formatQuantity(a.value, 'concentration')} × ${formatQuantity(batch.volume, 'volume')}` };
      case 'pressure':
        if (gasVolume === undefined) {
          out.push(diagnostic('missing-data', `a partial pressure of \`${name}\` needs a closed vessel: add \`vessel … L\` to this batch (or give mol)`, where.start, where.end));
          return undefined;
        }
        if (s.phase !== 'g') {
          out.push(diagnostic('missing-data', `a partial pressure is for a gas; \`${name}\` is not declared as (g)`, where.start, where.end));
          return undefined;
        }
        return { n: (a.value * gasVolume) / (R * T), from: `${formatQuantity(a.value, 'pressure')} in ${formatQuantity(gasVolume, 'volume')} of gas space at the batch T` };
      case 'equivalents':
        return undefined; // after the basis
      default:
        return undefined;
    }
  };
  for (const a of batch.amounts) {
    if (a.dimension === 'equivalents') continue;
    const m = toMoles(a);
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

  // ---- species and reactions ---------------------------------------------------------------
  const species: BatchSpeciesDraft[] = [];
  const index = new Map<string, number>();
  const add = (s: ResolvedSpecies, label: string, anchor: { start: number; end: number }): number => {
    const id = speciesIdentity(s);
    let i = index.get(id);
    if (i === undefined) {
      i = species.length;
      index.set(id, i);
      species.push({ id, label, species: s, charged: 0, anchor });
    }
    return i;
  };
  for (const a of batch.amounts) {
    if (!a.species || a.value === undefined) continue; // a line without a readable amount has its own error
    const i = add(a.species, a.node.species.text, a.node.species);
    const m = moles.get(a);
    if (m) {
      species[i].charged = m.n;
      species[i].chargedFrom = m.from;
    }
  }
  const available = new Set<string>();
  for (const s of species) if (s.charged > 0) available.add(s.id);

  const candidates = batch.uses ?? model.reactions;
  const selection: BatchInputs['selection'] = batch.uses ? 'uses' : 'automatic';
  const sideAvailable = (r: ReactionModel, side: 'left' | 'right'): boolean =>
    r.terms.filter((t) => t.side === side).every((t) => t.species !== undefined && (available.has(speciesIdentity(t.species)) || t.species.formula.isElectron));
  const chosen: ReactionModel[] = [];
  if (batch.uses) {
    for (const r of batch.uses) chosen.push(r);
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
  if (hasSolute && batch.volume === undefined) {
    out.push(diagnostic('missing-data', 'this batch has dissolved (aq) species: add `volume … mL` (the liquid volume) so their concentrations are known', header.start, header.end));
  }
  if (!amountsOk || !reactionsOk || phaseless.length > 0 || (hasSolute && batch.volume === undefined)) return { diagnostics: out };

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
  const basisIndex = basisAmount?.species ? index.get(speciesIdentity(basisAmount.species)) : undefined;
  const heat = heatCapacityOf(batch, finished);
  return {
    inputs: {
      species: finished,
      oneWay,
      reversible,
      temperature: T,
      conditions: gasVolume !== undefined ? { kind: 'constant-volume', gasVolume } : { kind: 'constant-pressure', P: batch.pressure },
      liquidVolume: batch.volume,
      basis: basisIndex,
      selection,
      heatCapacity: heat?.value,
      heatCapacityFrom: heat?.from,
    },
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
