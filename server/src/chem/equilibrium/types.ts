// The public data types and physical constants of the equilibrium solver:
// what a caller hands in (species, reactions, conditions) and what it gets back.

/**
 * Phase of a species, which fixes its standard state and activity:
 * - 'g': ideal gas, standard state the pure gas at P° = 1e5 Pa. At constant pressure
 *   a = y·P/P° (y: mole fraction among all gas species, inert ones included); at constant
 *   volume a = n·R·T/(V·P°).
 * - 'l': member of one ideal liquid mixture (all 'l' species together): a = mole fraction.
 * - 'aq': ideal dilute solute, standard state c° = 1 mol/L: a = n/(liquidVolume·c°).
 * - 's': pure solid, a = 1 while present; it may be used up, or never form.
 * - 'solvent': the solvent of the 'aq' solutes (e.g. water), a = 1 while present; like a
 *   solid it cannot go below zero.
 */
export type SolverPhase = 'g' | 'l' | 'aq' | 's' | 'solvent';

export interface SolverSpecies {
  readonly id: string;
  readonly phase: SolverPhase;
  /** Initial amount, mol, >= 0. */
  readonly n0: number;
}

export interface SolverReaction {
  readonly label: string;
  /** Stoichiometric coefficients, one per species: products +, reactants -, 0 if absent. */
  readonly nu: readonly number[];
  /** Natural log of the thermodynamic equilibrium constant at the batch temperature. */
  readonly lnK: number;
}

export type SolverConditions =
  | { readonly kind: 'constant-pressure'; /** K */ readonly T: number; /** Pa */ readonly P: number }
  | { readonly kind: 'constant-volume'; /** K */ readonly T: number; /** m^3 */ readonly gasVolume: number };

export interface EquilibriumProblem {
  readonly species: readonly SolverSpecies[];
  readonly reactions: readonly SolverReaction[];
  readonly conditions: SolverConditions;
  /** Volume of the liquid phase, m^3; required (and > 0) when any species is 'aq'. */
  readonly liquidVolume?: number;
}

export interface EquilibriumResult {
  readonly status: 'converged' | 'failed' | 'invalid';
  /** Why, for 'failed' and 'invalid' (names the reaction or species). */
  readonly message?: string;
  /** Amounts at equilibrium, mol, one per species (n0 copied when not converged). */
  readonly n: readonly number[];
  /**
   * Net extent of each reaction from n0, mol. Only a basis of linearly independent active
   * reactions (the first ones in input order) carries extents; a reaction dropped as a
   * consistent combination of earlier ones, and an inactive reaction, reports 0. Reactions
   * that can only run in step through a species that never forms (an intermediate made and
   * used up together) carry the extents of the combinations that ran, so n = n0 + ν·ξ
   * holds for the reactions as given.
   */
  readonly extents: readonly number[];
  /** Activities at equilibrium (solid and solvent: 1 when present, 0 when absent). */
  readonly activities: readonly number[];
  /**
   * ln Q per reaction at equilibrium. Q follows the usual convention for heterogeneous
   * equilibria: a pure phase (solid, solvent, or the only species of a gas phase at
   * constant pressure or of the liquid phase) enters with its pure-phase activity (1, or
   * P/P° for a pure gas) whether or not it is present, so a used-up solid shows Q < K. A
   * species of a mixture phase that is absent has activity 0, so ln Q is ±Infinity then (as
   * for lnQ0 below).
   */
  readonly lnQ: readonly number[];
  /**
   * ln Q per reaction for the initial amounts, same convention. -Infinity when a product
   * mixture species is absent (Q = 0), +Infinity when a reactant mixture species is absent
   * and no product is (Q = ∞); when both sides have an absent species Q = 0/0 is undefined
   * and is reported as -Infinity ("nothing formed yet"), never NaN.
   */
  readonly lnQ0: readonly number[];
  /** Pa: P at constant pressure; the ideal-gas total pressure at constant volume (0 without gas). */
  readonly pressure: number;
  /** Total amount of gas, mol (inert gases included). */
  readonly gasMoles: number;
  /** m^3: ideal-gas volume at constant pressure (0 without gas); the given V at constant volume (0 if no species is a gas). */
  readonly gasVolume: number;
  /**
   * Indices of solid and solvent species absent at equilibrium (used up or never formed). A
   * gas or liquid phase that is absent shows as zero amounts and gasMoles = 0.
   */
  readonly absentPhases: readonly number[];
  /** Reactions that cannot run in either direction from what is present (extent 0). */
  readonly inactiveReactions: readonly number[];
  readonly iterations: number;
  readonly method: 'none' | 'single' | 'newton';
}

/** Pa, the IUPAC standard pressure (1 bar). */
export const STANDARD_PRESSURE = 1e5;
/** mol/m^3, the standard concentration 1 mol/L. */
export const STANDARD_CONCENTRATION = 1000;
/** J/(mol K), exact in the 2019 SI (CODATA 2018). */
export const GAS_CONSTANT = 8.314462618;
