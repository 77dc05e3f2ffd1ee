// Targets: `target conversion of acid = 95 % by EtOH from 1 to 20 equiv`
// finds the value of one variable (T, P, vessel or an amount) at which a
// batch meets a goal (a conversion, a product's yield, or a closed vessel's
// pressure). Method: scan the range on an even grid for sign changes of
// (quantity − goal), then bisect each bracket; report every value found, or,
// when the goal is out of reach, the best value in the range.
import { parseNumber, parseUnit, type Dimension } from '../../chem/units';
import type { TargetNode } from '../syntax/tree';
import { diagnostic, type Diagnostic } from './codes';
import type { BatchModel, NotebookModel } from './model';
import { batchInputs, type SourceState } from './batch-inputs';
import { solveBatch, type BatchResult, type SolveCache } from './batch-results';
import { readQuantity } from './properties';
import { pointInputs, resolveVariable, type SweepVariable } from './sweeps';

/** Points of the scan for brackets, and bisection steps per bracket. */
const SCAN_POINTS = 41;
const BISECTION_STEPS = 60;

export interface TargetModel {
  readonly node: TargetNode;
  readonly goal: 'conversion' | 'yield' | 'pressure';
  readonly species?: string;
  /** fraction for conversion and yield; Pa for pressure */
  readonly value: number;
  readonly variable: SweepVariable;
  readonly label: string;
  readonly unitText: string;
  readonly dimension: Dimension;
  /** The range in written units and its conversion to SI. */
  readonly from: number;
  readonly to: number;
  readonly toSI: (v: number) => number;
}

export interface TargetResult {
  readonly target: TargetModel;
  /** Values (written units) where the goal is met, in order. */
  readonly values: readonly number[];
  /** When unreachable: the value in the range that comes closest, and what it reaches there. */
  readonly best?: { readonly value: number; readonly reached: number };
  /** The batch solved at the first value found. */
  readonly result?: BatchResult;
}

/** Default range when none is written: these factors around the batch's own value (amounts, vessel). */
const DEFAULT_LOW_FACTOR = 0.1;
const DEFAULT_HIGH_FACTOR = 10;

function quantityOf(t: TargetModel, r: BatchResult): number | undefined {
  if (r.status !== 'converged') return undefined;
  if (t.goal === 'pressure') return r.pressure;
  const i = r.inputs.species.findIndex((s) => s.label === t.species);
  if (i < 0) return undefined;
  if (t.goal === 'conversion') {
    const c = r.charged[i];
    return c > 0 ? (c - r.equilibrium[i]) / c : undefined;
  }
  const y = r.yields.find((x) => x.index === i);
  const start = r.afterOneWay[i];
  return y && y.theoretical > start ? (y.formed - start) / (y.theoretical - start) : undefined;
}

export function batchTargets(batch: BatchModel, model: NotebookModel, cache: SolveCache, source?: SourceState): { targets: TargetResult[]; diagnostics: Diagnostic[] } {
  const diagnostics: Diagnostic[] = [];
  const targets: TargetResult[] = [];
  for (const line of batch.node.properties) {
    if (line.type !== 'target') continue;
    const t = readTarget(line, batch, diagnostics);
    if (t) targets.push(solveTarget(t, batch, model, cache, source));
  }
  return { targets, diagnostics };
}

function readTarget(node: TargetNode, batch: BatchModel, out: Diagnostic[]): TargetModel | undefined {
  if (!node.goal || !node.value || !node.variable) return undefined;
  const goal = node.goal.text as TargetModel['goal'];
  const q = readQuantity(node.value, goal === 'pressure' ? ['pressure'] : ['percent'], `the target ${goal}`);
  out.push(...q.diagnostics.map((d) => ({ ...d, code: 'bad-target' as const })));
  if (q.value === undefined) return undefined;
  if (goal !== 'pressure' && (q.value <= 0 || q.value >= 1)) {
    out.push(diagnostic('bad-target', `a target ${goal} must be more than 0 % and less than 100 %`, node.value.start, node.value.end));
    return undefined;
  }
  if (goal === 'pressure' && (q.value <= 0 || batch.vessel === undefined)) {
    out.push(diagnostic('bad-target', batch.vessel === undefined ? 'a target pressure is for a batch in a closed `vessel`' : 'a target pressure must be positive', node.value.start, node.value.end));
    return undefined;
  }
  if (node.species && !batch.amounts.some((a) => a.node.species.text === node.species!.text) && goal === 'conversion') {
    out.push(diagnostic('bad-target', `\`${node.species.text}\` has no amount in this batch, so it has no conversion`, node.species.start, node.species.end));
    return undefined;
  }
  const v = node.variable;
  const resolved = resolveVariable(v.text, batch);
  if (!resolved) {
    out.push(diagnostic('bad-target', `\`${v.text}\` is neither T, P, vessel nor a species with an amount in this batch`, v.start, v.end));
    return undefined;
  }
  const { variable, expected } = resolved;
  let dimension: Dimension;
  let unitText: string;
  let toSI: (x: number) => number;
  let from: number;
  let to: number;
  if (node.from && node.to) {
    if (!node.unit) {
      out.push(diagnostic('bad-target', `the range needs a unit after its numbers`, node.to.start, node.to.end));
      return undefined;
    }
    const u = parseUnit(node.unit.text);
    if (!u.ok || !expected.includes(u.dimension)) {
      out.push(diagnostic('bad-target', u.ok ? `\`${node.unit.text}\` does not fit \`${v.text}\`` : u.message, node.unit.start, node.unit.end));
      return undefined;
    }
    const a = parseNumber(node.from.text);
    const b = parseNumber(node.to.text);
    if (!a.ok || !b.ok || a.value === b.value) {
      out.push(diagnostic('bad-target', 'the range needs two different numbers', node.from.start, node.to.end));
      return undefined;
    }
    dimension = u.dimension;
    unitText = node.unit.text;
    toSI = u.toSI;
    from = Math.min(a.value, b.value);
    to = Math.max(a.value, b.value);
  } else {
    // No range written: around the batch's own value, in SI-friendly lab units.
    const own = ownValue(batch, variable);
    if (own === undefined) {
      out.push(diagnostic('bad-target', `write the range to search, e.g. \`from 1 to 10 …\``, v.start, v.end));
      return undefined;
    }
    dimension = own.dimension;
    unitText = own.unitText;
    toSI = own.toSI;
    from = own.value * DEFAULT_LOW_FACTOR;
    to = own.value * DEFAULT_HIGH_FACTOR;
  }
  return { node, goal, species: node.species?.text, value: q.value, variable, label: v.text, unitText, dimension, from, to, toSI };
}

function ownValue(batch: BatchModel, variable: SweepVariable): { value: number; dimension: Dimension; unitText: string; toSI: (x: number) => number } | undefined {
  switch (variable.kind) {
    case 'temperature':
      return batch.temperature !== undefined ? { value: batch.temperature, dimension: 'temperature', unitText: 'K', toSI: (x) => x } : undefined;
    case 'pressure':
      return { value: batch.pressure / 1e5, dimension: 'pressure', unitText: 'bar', toSI: (x) => x * 1e5 };
    case 'vessel':
      return batch.vessel !== undefined ? { value: batch.vessel * 1000, dimension: 'volume', unitText: 'L', toSI: (x) => x / 1000 } : undefined;
    case 'amount': {
      const a = variable.amount;
      if (a.value === undefined || !a.dimension || a.value <= 0) return undefined;
      return { value: a.value, dimension: a.dimension, unitText: a.node.value?.unit?.text ?? '', toSI: (x) => x };
    }
  }
}

function solveTarget(t: TargetModel, batch: BatchModel, model: NotebookModel, cache: SolveCache, source?: SourceState): TargetResult {
  const base = batchInputs(batch, model, source).inputs;
  const at = (x: number): { result?: BatchResult; q?: number } => {
    const inputs = base ? pointInputs(base, batch, t.variable, t.dimension, t.toSI(x), model, source) : undefined;
    if (!inputs) return {};
    const result = solveBatch(inputs, cache);
    return { result, q: quantityOf(t, result) };
  };
  const xs: number[] = [];
  const fs: (number | undefined)[] = [];
  for (let k = 0; k < SCAN_POINTS; k++) {
    const x = t.from + ((t.to - t.from) * k) / (SCAN_POINTS - 1);
    xs.push(x);
    const q = at(x).q;
    fs.push(q === undefined ? undefined : q - t.value);
  }
  const values: number[] = [];
  for (let k = 0; k + 1 < SCAN_POINTS; k++) {
    const fa = fs[k];
    const fb = fs[k + 1];
    if (fa === undefined || fb === undefined) continue;
    if (fa === 0) {
      values.push(xs[k]);
      continue;
    }
    if (fa * fb > 0) continue;
    let lo = xs[k];
    let hi = xs[k + 1];
    let flo = fa;
    for (let step = 0; step < BISECTION_STEPS && hi - lo > 1e-12 * Math.max(1, Math.abs(hi)); step++) {
      const mid = (lo + hi) / 2;
      const q = at(mid).q;
      if (q === undefined) break;
      const fm = q - t.value;
      if (fm === 0) {
        lo = hi = mid;
        break;
      }
      if (fm * flo < 0) hi = mid;
      else {
        lo = mid;
        flo = fm;
      }
    }
    values.push((lo + hi) / 2);
  }
  if (fs[SCAN_POINTS - 1] === 0 && !values.includes(xs[SCAN_POINTS - 1])) values.push(xs[SCAN_POINTS - 1]);
  if (values.length > 0) return { target: t, values, result: at(values[0]).result };
  let bestK = -1;
  for (let k = 0; k < SCAN_POINTS; k++) {
    const f = fs[k];
    if (f !== undefined && (bestK < 0 || Math.abs(f) < Math.abs(fs[bestK]!))) bestK = k;
  }
  return { target: t, values: [], best: bestK >= 0 ? { value: xs[bestK], reached: fs[bestK]! + t.value } : undefined };
}
