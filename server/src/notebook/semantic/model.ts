// The semantic model of a notebook: declared species, reactions with their
// resolved terms and balance, and batches with their conditions, all as plain
// data in SI units. It is built from the syntax tree by build.ts and is what
// the IDE features and the CLI read; it holds chemistry inputs, not protocol.
import type { BalanceSolution, ElementTally } from '../../chem/balance';
import type { Formula } from '../../chem/formula';
import type { Rational } from '../../chem/rational';
import type { Dimension } from '../../chem/units';
import type { FormationData, ReactionThermo } from '../../chem/thermo';
import type { BatchNode, ReactionNode, SpeciesNode, TermNode, Token, AmountNode, OperationNode } from '../syntax/tree';
import type { Diagnostic } from './codes';

export type Phase = 'g' | 'l' | 's' | 'aq';

export const PHASE_NAMES: Readonly<Record<Phase, string>> = {
  g: 'gas',
  l: 'liquid',
  s: 'solid',
  aq: 'aqueous solution',
};

export interface SpeciesDecl {
  readonly name: string;
  readonly nameToken: Token;
  readonly node: SpeciesNode;
  /** Undefined when the formula could not be read (a diagnostic says why). */
  readonly formula?: Formula;
  readonly phase?: Phase;
  /** kg/m^3 */
  readonly density?: number;
  /** fraction, 0 < purity <= 1 */
  readonly purity?: number;
  /** Formation data at 298.15 K, for Hess's law. */
  readonly formation?: FormationData;
}

/** What a term or amount line refers to, once resolved. */
export interface ResolvedSpecies {
  /** The declared name, or the formula text when the term is a bare formula. */
  readonly key: string;
  readonly declared?: SpeciesDecl;
  readonly formula: Formula;
  readonly phase?: Phase;
}

export interface ReactionTerm {
  readonly node: TermNode;
  readonly side: 'left' | 'right';
  /** Undefined when the written coefficient is invalid. */
  readonly coefficient?: Rational;
  /** Undefined when the species cannot be resolved. */
  readonly species?: ResolvedSpecies;
}

export interface ReactionModel {
  readonly node: ReactionNode;
  /** The written label, or R1, R2, ... by position among the notebook's reactions. */
  readonly label: string;
  readonly labelIsAuto: boolean;
  readonly reversible: boolean;
  readonly terms: readonly ReactionTerm[];
  /** [start, end) of the equation text, from the first term to the last. */
  readonly equationStart: number;
  readonly equationEnd: number;
  /** Present when every term resolved: balance as written and the minimal balance. */
  readonly balance?: {
    readonly tallies: readonly ElementTally[];
    readonly balanced: boolean;
    readonly solution: BalanceSolution;
  };
  /** The reaction's own thermodynamic data in SI (undefined when it has none). */
  readonly thermo?: ReactionThermo;
}

export interface BatchAmount {
  readonly node: AmountNode;
  readonly species?: ResolvedSpecies;
  /** SI value in the unit's dimension (mol, kg, m^3, equivalents, mol/m^3, Pa). */
  readonly value?: number;
  readonly dimension?: Dimension;
}

/** An operation line of a follow-on batch, read into SI. */
export interface BatchOperation {
  readonly node: OperationNode;
  readonly operation: OperationNode['operation'];
  readonly species?: ResolvedSpecies;
  /**
   * SI value in `dimension`: an amount of any form a batch accepts (add, remove), a fraction
   * for a percentage (remove), Pa for `vent to`. Undefined when unreadable or absent (`vent`).
   */
  readonly value?: number;
  readonly dimension?: Dimension;
}

export interface BatchModel {
  readonly node: BatchNode;
  readonly name: string;
  /** K */
  readonly temperature?: number;
  /** Pa */
  readonly pressure: number;
  readonly pressureIsDefault: boolean;
  readonly amounts: readonly BatchAmount[];
  /** m^3 of closed vessel */
  readonly vessel?: number;
  /** m^3 of liquid */
  readonly volume?: number;
  readonly basis?: string;
  /** Labels listed by `uses`, resolved to reactions where they exist. */
  readonly uses?: readonly ReactionModel[];
  /** J/K, from `heat capacity`. */
  readonly heatCapacity?: number;
  /** A follow-on batch: the name of the batch whose equilibrium contents it starts from. */
  readonly source?: string;
  /** A follow-on batch's operation lines, in order. */
  readonly operations: readonly BatchOperation[];
}

export interface NotebookModel {
  readonly species: ReadonlyMap<string, SpeciesDecl>;
  readonly speciesList: readonly SpeciesDecl[];
  readonly reactions: readonly ReactionModel[];
  readonly batches: readonly BatchModel[];
  readonly diagnostics: readonly Diagnostic[];
}

/** Standard atmosphere, the default batch pressure (Pa). Exact by definition. */
export const STANDARD_ATMOSPHERE = 101325;
