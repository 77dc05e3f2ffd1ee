// Sweeps: `vary T from 40 to 120 °C step 10` (or `vary EtOH in 1, 2, 3 equiv`)
// under a batch re-solves the batch at each value of one variable — the
// temperature, the pressure, the vessel volume, or one species' amount — and
// tabulates the headline quantities. Each point is an ordinary batch solve, so
// it goes through the same inputs, solver and memoised cache.
import { parseNumber, parseUnit, type Dimension } from '../../chem/units';
import type { SweepNode } from '../syntax/tree';
import { diagnostic, type Diagnostic } from './codes';
import type { BatchAmount, BatchModel, NotebookModel } from './model';
import { batchInputs, enthalpyOf, kAt, type BatchInputs, type ReversibleInput, type SourceState } from './batch-inputs';
import { solveBatch, type BatchResult, type SolveCache } from './batch-results';

/** Most points one sweep may have. */
export const MAX_SWEEP_POINTS = 1000;

export type SweepVariable =
  | { readonly kind: 'temperature' }
  | { readonly kind: 'pressure' }
  | { readonly kind: 'vessel' }
  | { readonly kind: 'amount'; readonly amount: BatchAmount };

export interface SweepModel {
  readonly node: SweepNode;
  readonly variable: SweepVariable;
  /** How the variable is shown: `T`, `P`, `vessel`, or the species as written. */
  readonly label: string;
  readonly unitText: string;
  readonly dimension: Dimension;
  /** The values as written (in `unitText`) and in SI. */
  readonly written: readonly number[];
  readonly values: readonly number[];
}

const AMOUNT_DIMENSIONS: readonly Dimension[] = ['amount', 'mass', 'volume', 'equivalents', 'concentration', 'pressure'];

/** T, P, vessel, or a species with an amount line, with the units that fit it. */
export function resolveVariable(name: string, batch: { amounts: readonly BatchAmount[] }): { variable: SweepVariable; expected: readonly Dimension[] } | undefined {
  if (name === 'T') return { variable: { kind: 'temperature' }, expected: ['temperature'] };
  if (name === 'P') return { variable: { kind: 'pressure' }, expected: ['pressure'] };
  if (name === 'vessel') return { variable: { kind: 'vessel' }, expected: ['volume'] };
  const amount = batch.amounts.find((a) => a.node.species.text === name);
  return amount ? { variable: { kind: 'amount', amount }, expected: AMOUNT_DIMENSIONS } : undefined;
}

/** Reads a `vary` line into a sweep, or reports what is wrong with it on the exact text. */
export function readSweep(node: SweepNode, batch: { amounts: readonly BatchAmount[]; volume?: number }): { sweep?: SweepModel; diagnostics: Diagnostic[] } {
  const out: Diagnostic[] = [];
  const fail = (message: string, at: { start: number; end: number }): { diagnostics: Diagnostic[] } => {
    out.push(diagnostic('bad-sweep', message, at.start, at.end));
    return { diagnostics: out };
  };
  const v = node.variable;
  // A line without its numbers already has a syntax error; nothing more to say about it.
  if (!v || (node.list.length === 0 && !(node.from && node.to && node.step))) return { diagnostics: out };
  const resolved = resolveVariable(v.text, batch);
  if (!resolved) return fail(`\`${v.text}\` is neither T, P, vessel nor a species with an amount in this batch`, v);
  const { variable, expected } = resolved;
  if (!node.unit) return fail(`a sweep of \`${v.text}\` needs a unit after its numbers (e.g. \`${expected[0] === 'temperature' ? '°C' : expected[0] === 'pressure' ? 'bar' : expected[0] === 'volume' ? 'L' : 'mol'}\`)`, v);
  const unit = parseUnit(node.unit.text);
  if (!unit.ok) return fail(unit.message, node.unit);
  if (!expected.includes(unit.dimension)) return fail(`\`${node.unit.text}\` does not fit \`${v.text}\``, node.unit);
  const number = (t: { text: string; start: number; end: number }): number | undefined => {
    const n = parseNumber(t.text);
    if (!n.ok) {
      out.push(diagnostic('bad-sweep', n.message, t.start, t.end));
      return undefined;
    }
    return n.value;
  };
  const written: number[] = [];
  if (node.list.length > 0) {
    for (const t of node.list) {
      const n = number(t);
      if (n === undefined) return { diagnostics: out };
      written.push(n);
    }
  } else if (node.from && node.to && node.step) {
    const a = number(node.from);
    const b = number(node.to);
    const s = number(node.step);
    if (a === undefined || b === undefined || s === undefined) return { diagnostics: out };
    if (s <= 0) return fail('the step must be positive', node.step);
    const count = Math.floor((Math.abs(b - a) + 1e-9 * s) / s) + 1;
    if (count > MAX_SWEEP_POINTS) return fail(`this sweep has ${count} points; at most ${MAX_SWEEP_POINTS} are allowed`, node.step);
    const direction = b >= a ? 1 : -1;
    for (let i = 0; i < count; i++) written.push(a + direction * i * s);
  } else {
    return { diagnostics: out };
  }
  const values = written.map((w) => unit.toSI(w));
  for (let i = 0; i < values.length; i++) {
    const bad =
      (variable.kind === 'temperature' && values[i] <= 0) ||
      ((variable.kind === 'pressure' || variable.kind === 'vessel') && values[i] <= 0) ||
      (variable.kind === 'vessel' && batch.volume !== undefined && values[i] <= batch.volume) ||
      (variable.kind === 'amount' && values[i] < 0);
    if (bad) {
      return fail(
        variable.kind === 'temperature'
          ? 'a temperature in the sweep is at or below absolute zero'
          : variable.kind === 'amount'
            ? 'an amount in the sweep is negative'
            : variable.kind === 'vessel' && batch.volume !== undefined
              ? 'a vessel in the sweep is no larger than the liquid volume'
              : 'a value in the sweep is not positive',
        node.list[i] ?? node.from ?? v,
      );
    }
  }
  return { sweep: { node, variable, label: v.text, unitText: node.unit.text, dimension: unit.dimension, written, values }, diagnostics: out };
}

export interface SweepPoint {
  readonly written: number;
  readonly result?: BatchResult;
}

export interface SweepResult {
  readonly sweep: SweepModel;
  readonly points: readonly SweepPoint[];
}

/** The batch as it would be with the variable at `value` (SI, in `dimension`). */
export function variant(batch: BatchModel, sweep: { variable: SweepVariable; dimension: Dimension }, value: number): BatchModel {
  switch (sweep.variable.kind) {
    case 'temperature':
      return { ...batch, temperature: value };
    case 'pressure':
      return { ...batch, pressure: value, pressureIsDefault: false };
    case 'vessel':
      return { ...batch, vessel: value };
    case 'amount': {
      const target = sweep.variable.amount;
      return { ...batch, amounts: batch.amounts.map((a) => (a === target ? { ...a, value, dimension: sweep.dimension } : a)) };
    }
  }
}

/** Reads a batch's `vary` lines, and solves the batch at every point of each readable one. */
export function batchSweeps(batch: BatchModel, model: NotebookModel, cache: SolveCache, source?: SourceState): { sweeps: SweepResult[]; diagnostics: Diagnostic[] } {
  const diagnostics: Diagnostic[] = [];
  const sweeps: SweepModel[] = [];
  for (const line of batch.node.properties) {
    if (line.type !== 'sweep') continue;
    const r = readSweep(line, batch);
    diagnostics.push(...r.diagnostics);
    if (r.sweep) sweeps.push(r.sweep);
  }
  return { sweeps: solveSweeps(batch, sweeps, model, cache, source), diagnostics };
}

/**
 * The batch's solver inputs with the variable at `value`, derived from the batch's own inputs
 * where only one thing changes (temperature: each K and ΔH° again; pressure; vessel; an amount
 * in mol), so a long sweep does not redo the whole batch reading at every point. Other amount
 * units (mass, equiv, ...) go through the full reading, since they feed into other amounts.
 */
export function pointInputs(
  base: BatchInputs,
  batch: BatchModel,
  variable: SweepVariable,
  dimension: Dimension,
  value: number,
  model: NotebookModel,
  source?: SourceState,
): BatchInputs | undefined {
  switch (variable.kind) {
    case 'temperature': {
      const reversible: ReversibleInput[] = [];
      for (const r of base.reversible) {
        const k = kAt(r.reaction, model, value);
        if (!k) return undefined;
        reversible.push({ ...r, lnK: k.lnK, source: k.source, dH: enthalpyOf(r.reaction, value) });
      }
      const oneWay = base.oneWay.map((r) => ({ ...r, dH: enthalpyOf(r.reaction, value) }));
      return { ...base, temperature: value, reversible, oneWay };
    }
    case 'pressure':
      return base.conditions.kind === 'constant-pressure' ? { ...base, conditions: { kind: 'constant-pressure', P: value } } : batchInputs(variant(batch, { variable, dimension }, value), model, source).inputs;
    case 'vessel':
      return base.conditions.kind === 'constant-volume' && batch.volume === undefined
        ? { ...base, conditions: { kind: 'constant-volume', gasVolume: value } }
        : batchInputs(variant(batch, { variable, dimension }, value), model, source).inputs;
    case 'amount': {
      const label = variable.amount.node.species.text;
      const i = base.species.findIndex((s) => s.label === label);
      const isBasis = base.basis === i;
      if (dimension !== 'amount' || i < 0 || isBasis) return batchInputs(variant(batch, { variable, dimension }, value), model, source).inputs;
      return { ...base, species: base.species.map((s, k) => (k === i ? { ...s, charged: value, chargedFrom: undefined } : s)) };
    }
  }
}

/** Solves the batch at every point of each sweep. */
export function solveSweeps(batch: BatchModel, sweeps: readonly SweepModel[], model: NotebookModel, cache: SolveCache, source?: SourceState): SweepResult[] {
  const base = batchInputs(batch, model, source).inputs;
  return sweeps.map((sweep) => {
    // Each point starts from the previous point's equilibrium (a warm start; the solver uses it
    // only where it conserves the same amounts, as it does when T, P or the vessel changes).
    let previous: readonly number[] | undefined;
    return {
      sweep,
      points: sweep.values.map((value, i) => {
        const inputs = base ? pointInputs(base, batch, sweep.variable, sweep.dimension, value, model, source) : undefined;
        const result = inputs ? solveBatch(inputs, cache, previous) : undefined;
        previous = result?.status === 'converged' ? result.equilibrium : undefined;
        return { written: sweep.written[i], result };
      }),
    };
  });
}
