// Solves a batch: one-way reactions run to completion first (notebook order,
// limited by their limiting reagent), then the reversible ones go to
// equilibrium through the shared solver. Solves are memoised by a canonical
// key of their inputs, so re-analysing after an edit re-solves only the
// batches the edit touched. Also derives what the chemist reads: conversion,
// yields, final pressure, and the cautions that go with them.
import { resultWithoutAnswer, solveEquilibrium, type EquilibriumProblem, type EquilibriumResult, type SolverPhase } from '../../chem/equilibrium';
import { diagnostic, type Diagnostic } from './codes';
import type { BatchModel } from './model';
import type { BatchInputs, ReversibleInput } from './batch-inputs';

/** A closed vessel above this pressure (Pa) gets a caution (1.5 bar). */
export const PRESSURE_CAUTION_PA = 1.5e5;
/** An adiabatic temperature rise above this (K) gets a caution. */
export const ADIABATIC_RISE_CAUTION_K = 50;
/** Gas formed below this fraction of the charged amount is rounding, not evolution. */
const GAS_EVOLUTION_FRACTION = 1e-9;

export interface ReactionOutcome {
  readonly input: ReversibleInput;
  /** mol of reaction, from the composition after one-way steps. */
  readonly extent: number;
  readonly lnQ0: number;
  readonly lnQ: number;
  /** Could not run at all from what is present. */
  readonly inactive: boolean;
}

export interface BatchResult {
  readonly inputs: BatchInputs;
  readonly status: EquilibriumResult['status'];
  readonly message?: string;
  /** mol, per species: charged, after one-way reactions, at equilibrium. */
  readonly charged: readonly number[];
  readonly afterOneWay: readonly number[];
  readonly equilibrium: readonly number[];
  readonly activities: readonly number[];
  readonly oneWayExtents: readonly number[];
  readonly reactions: readonly ReactionOutcome[];
  /** Pa: the batch pressure, or the computed total pressure of a closed vessel. */
  readonly pressure: number;
  readonly gasMoles: number;
  /** m^3 */
  readonly gasVolume: number;
  readonly absent: ReadonlySet<number>;
  /** Fraction of the basis species consumed, when there is a basis that is consumed. */
  readonly conversion?: number;
  /** For each product of a used reaction: amount formed and the theoretical amount. */
  readonly yields: readonly { readonly index: number; readonly formed: number; readonly theoretical: number }[];
  /**
   * Heat released (J; negative when absorbed) by the steps, −Σ ΔH°·ξ, when every used
   * reaction has ΔH°; otherwise `unknown` names those that lack it.
   */
  readonly heat: { readonly released?: number; readonly byStep: readonly { label: string; released: number }[]; readonly unknown: readonly string[] };
  /** K: heat released ÷ heat capacity, when both are known. */
  readonly adiabaticRise?: number;
  /** mol of gas at equilibrium minus mol of gas charged (positive: the step gives off gas). */
  readonly gasFormed: number;
}

const SOLVER_PHASE: Readonly<Record<string, SolverPhase>> = { g: 'g', l: 'l', s: 's', aq: 'aq' };

/** Most solves kept; older ones are dropped first. */
const SOLVE_CACHE_LIMIT = 5000;

/** Memoises solver results by a canonical key of the problem (plain data in, plain data out). */
export class SolveCache {
  private readonly map = new Map<string, EquilibriumResult>();
  hits = 0;
  misses = 0;

  /** `start`: a warm start for a miss (see SolveOptions); the key is the problem alone, since the answer does not depend on it. */
  solve(problem: EquilibriumProblem, start?: readonly number[]): EquilibriumResult {
    const key = JSON.stringify(problem);
    const hit = this.map.get(key);
    if (hit) {
      this.hits++;
      this.map.delete(key);
      this.map.set(key, hit);
      return hit;
    }
    this.misses++;
    const result = safeSolve(problem, start);
    this.map.set(key, result);
    if (this.map.size > SOLVE_CACHE_LIMIT) this.map.delete(this.map.keys().next().value as string);
    return result;
  }
}

/**
 * The solver does not throw on any input; should a defect make it throw anyway, that batch is
 * reported as not solved (with the reason) and the rest of the notebook is still analysed.
 */
function safeSolve(problem: EquilibriumProblem, start?: readonly number[]): EquilibriumResult {
  try {
    return solveEquilibrium(problem, { start });
  } catch (e) {
    return resultWithoutAnswer(problem, 'failed', `internal solver error (${e instanceof Error ? e.message : String(e)}); please report this notebook`);
  }
}

/** `start`: the equilibrium of a neighbouring solve of the same species (a sweep's previous point), as a warm start. */
export function solveBatch(inputs: BatchInputs, cache: SolveCache, start?: readonly number[]): BatchResult {
  const count = inputs.species.length;
  const charged = inputs.species.map((s) => s.charged);
  const n = [...charged];
  // One-way reactions: to completion, in notebook order, limited by the limiting reagent.
  const oneWayExtents: number[] = [];
  for (const r of inputs.oneWay) {
    let extent = Infinity;
    let limiting = -1;
    r.nu.forEach((v, i) => {
      if (v < 0 && n[i] / -v < extent) {
        extent = n[i] / -v;
        limiting = i;
      }
    });
    if (!Number.isFinite(extent)) extent = 0;
    for (let i = 0; i < count; i++) n[i] += r.nu[i] * extent;
    if (limiting >= 0) n[limiting] = 0; // exactly used up, no rounding residue
    for (let i = 0; i < count; i++) if (n[i] < 0) n[i] = 0;
    oneWayExtents.push(extent);
  }
  const afterOneWay = [...n];
  const problem: EquilibriumProblem = {
    species: inputs.species.map((s, i) => ({ id: s.id, phase: s.solvent ? 'solvent' : SOLVER_PHASE[s.phase], n0: afterOneWay[i] })),
    reactions: inputs.reversible.map((r) => ({ label: r.reaction.label, nu: r.nu, lnK: r.lnK })),
    conditions:
      inputs.conditions.kind === 'constant-pressure'
        ? { kind: 'constant-pressure', T: inputs.temperature, P: inputs.conditions.P }
        : { kind: 'constant-volume', T: inputs.temperature, gasVolume: inputs.conditions.gasVolume },
    liquidVolume: inputs.liquidVolume,
  };
  const result = cache.solve(problem, start !== undefined && start.length === count ? start : undefined);
  const equilibrium = result.status === 'converged' ? [...result.n] : afterOneWay;
  const reactions: ReactionOutcome[] = inputs.reversible.map((input, j) => ({
    input,
    extent: result.extents[j] ?? 0,
    lnQ0: result.lnQ0[j] ?? NaN,
    lnQ: result.lnQ[j] ?? NaN,
    inactive: result.inactiveReactions.includes(j),
  }));
  let conversion: number | undefined;
  // Over a chain of follow-on batches the conversion is of everything fed in, less what was taken out.
  const fed = inputs.basisFed ?? (inputs.basis !== undefined ? charged[inputs.basis] : 0);
  if (inputs.basis !== undefined && fed > 0) {
    const consumed = fed - (inputs.basisWithdrawn ?? 0) - equilibrium[inputs.basis];
    if (consumed > 0 || inputs.reversible.some((r) => r.nu[inputs.basis!] < 0) || inputs.oneWay.some((r) => r.nu[inputs.basis!] < 0)) {
      conversion = consumed / fed;
    }
  }
  const byStep: { label: string; released: number }[] = [];
  const unknown: string[] = [];
  const steps = [
    ...inputs.oneWay.map((r, j) => ({ r, extent: oneWayExtents[j] })),
    ...inputs.reversible.map((r, j) => ({ r, extent: result.status === 'converged' ? (result.extents[j] ?? 0) : 0 })),
  ];
  for (const { r, extent } of steps) {
    if (r.dH === undefined) unknown.push(r.reaction.label);
    else byStep.push({ label: r.reaction.label, released: -r.dH * extent });
  }
  const released = unknown.length === 0 ? byStep.reduce((sum, x) => sum + x.released, 0) : undefined;
  const adiabaticRise = released !== undefined && inputs.heatCapacity !== undefined ? released / inputs.heatCapacity : undefined;
  let gasCharged = 0;
  let gasAtEnd = 0;
  inputs.species.forEach((sp, i) => {
    if (sp.phase !== 'g') return;
    gasCharged += charged[i];
    gasAtEnd += equilibrium[i];
  });
  return {
    heat: { released, byStep, unknown },
    adiabaticRise,
    gasFormed: gasAtEnd - gasCharged,
    inputs,
    status: result.status,
    message: result.message,
    charged,
    afterOneWay,
    equilibrium,
    activities: result.activities,
    oneWayExtents,
    reactions,
    pressure: result.pressure,
    gasMoles: result.gasMoles,
    gasVolume: result.gasVolume,
    absent: new Set(result.absentPhases),
    conversion,
    yields: yields(inputs, afterOneWay, equilibrium),
  };
}

/**
 * Yield of each product against its theoretical amount: for every reversible reaction
 * that forms it, the amount it would reach if that reaction went to completion from the
 * composition after the one-way steps; the largest of these is the theoretical amount.
 */
function yields(inputs: BatchInputs, start: readonly number[], end: readonly number[]): BatchResult['yields'] {
  const out: { index: number; formed: number; theoretical: number }[] = [];
  for (let i = 0; i < inputs.species.length; i++) {
    let theoretical = 0;
    for (const r of inputs.reversible) {
      if (r.nu[i] <= 0) continue;
      let extent = Infinity;
      r.nu.forEach((v, k) => {
        if (v < 0) extent = Math.min(extent, start[k] / -v);
      });
      if (Number.isFinite(extent)) theoretical = Math.max(theoretical, start[i] + r.nu[i] * extent);
    }
    if (theoretical > start[i]) out.push({ index: i, formed: end[i], theoretical });
  }
  return out;
}

/** Diagnostics a solved batch earns: a failed solve, and the closed-vessel pressure caution. */
export function resultDiagnostics(batch: BatchModel, result: BatchResult): Diagnostic[] {
  const out: Diagnostic[] = [];
  const header = batch.node.name ?? batch.node.keyword;
  if (result.status !== 'converged') {
    out.push(
      diagnostic(
        'no-convergence',
        `batch \`${batch.name}\` could not be solved: ${result.message ?? 'the solver did not converge'}`,
        header.start,
        header.end,
      ),
    );
    return out;
  }
  const header2 = header;
  if (result.adiabaticRise !== undefined && result.adiabaticRise > ADIABATIC_RISE_CAUTION_K) {
    out.push(
      diagnostic(
        'heat-caution',
        `if the heat of this step (${Number((result.heat.released! / 1000).toPrecision(4))} kJ) stayed in the batch it would heat it by ${Number(result.adiabaticRise.toPrecision(3))} K (adiabatic, ideal equilibrium estimate). Measure the heat release by calorimetry before scale-up, plan controlled addition and cooling, and follow your site's process-safety review.`,
        header2.start,
        header2.end,
      ),
    );
  }
  const gasCharged = result.inputs.species.reduce((sum, sp, i) => sum + (sp.phase === 'g' ? result.charged[i] : 0), 0);
  const totalCharged = result.charged.reduce((a, b) => a + b, 0);
  if (result.inputs.conditions.kind === 'constant-volume' && result.gasFormed > GAS_EVOLUTION_FRACTION * Math.max(totalCharged, gasCharged)) {
    const vesselLine = batch.node.properties.find((p) => p.type === 'property' && p.keyText === 'vessel');
    const where = vesselLine && vesselLine.type === 'property' ? (vesselLine.value ?? vesselLine) : header;
    out.push(
      diagnostic(
        'gas-caution',
        `this step gives off ${Number(result.gasFormed.toPrecision(3))} mol of gas inside a closed vessel (ideal equilibrium estimate). Check the vessel's rating and size its relief for the gas and the heat, and follow local codes and your site's process-safety review.`,
        where.start,
        where.end,
      ),
    );
  }
  if (result.inputs.conditions.kind === 'constant-volume' && result.pressure > PRESSURE_CAUTION_PA) {
    const vesselLine = batch.node.properties.find((p) => p.type === 'property' && p.keyText === 'vessel');
    const where = vesselLine && vesselLine.type === 'property' ? (vesselLine.value ?? vesselLine) : header;
    out.push(
      diagnostic(
        'pressure-caution',
        `the closed vessel reaches ${Number((result.pressure / 1e5).toPrecision(4))} bar at equilibrium (ideal-gas estimate). Check the vessel's rated pressure and its relief before running this; follow local codes and your site's process-safety review.`,
        where.start,
        where.end,
      ),
    );
  }
  return out;
}
