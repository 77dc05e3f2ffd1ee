// The analysis of one notebook text: parse, build the semantic model, and
// collect every diagnostic in source order. Both the language server and the
// CLI call this; neither re-parses nor re-checks on their own.
import { parse } from '../syntax/parser';
import type { ParseResult, StatementNode } from '../syntax/tree';
import { BalanceCache, buildModel } from '../semantic/build';
import { diagnostic, type Diagnostic } from '../semantic/codes';
import type { BatchModel, NotebookModel, ReactionModel, SpeciesDecl } from '../semantic/model';
import { batchInputs, type SourceState } from '../semantic/batch-inputs';
import { resultDiagnostics, SolveCache, solveBatch, type BatchResult } from '../semantic/batch-results';
import { batchSweeps, type SweepResult } from '../semantic/sweeps';
import { batchTargets, type TargetResult } from '../semantic/targets';
import { LineIndex } from './line-index';
import { applyAcceptances } from './suppression';

export interface Analysis {
  readonly text: string;
  readonly syntax: ParseResult;
  readonly model: NotebookModel;
  /** Syntax and semantic diagnostics, sorted by start offset. */
  readonly diagnostics: readonly Diagnostic[];
  readonly lines: LineIndex;
  /** Each batch's equilibrium result, when its inputs were complete. */
  readonly results: ReadonlyMap<BatchModel, BatchResult>;
  /** Each batch's sweeps (`vary` lines), solved point by point. */
  readonly sweeps: ReadonlyMap<BatchModel, readonly SweepResult[]>;
  /** Each batch's targets (`target` lines), with the values that meet them. */
  readonly targets: ReadonlyMap<BatchModel, readonly TargetResult[]>;
  /** The statement at an offset (binary search), with its model item when it has one. */
  statementAt(offset: number): StatementAt | undefined;
}

export type StatementAt =
  | { readonly node: StatementNode; readonly kind: 'species'; readonly item?: SpeciesDecl }
  | { readonly node: StatementNode; readonly kind: 'reaction'; readonly item: ReactionModel }
  | { readonly node: StatementNode; readonly kind: 'batch'; readonly item: BatchModel }
  | { readonly node: StatementNode; readonly kind: 'error' };

/** Caches shared across the analyses of one session: unchanged reactions and batches are not re-solved. */
export interface AnalysisCaches {
  readonly solves: SolveCache;
  readonly balances: BalanceCache;
}

export function createCaches(): AnalysisCaches {
  return { solves: new SolveCache(), balances: new BalanceCache() };
}

export function analyse(text: string, caches: AnalysisCaches = createCaches()): Analysis {
  const cache = caches.solves;
  const syntax = parse(text);
  const model = buildModel(syntax.tree, syntax.errors, caches.balances);
  const batchDiagnostics: Diagnostic[] = [];
  const results = new Map<BatchModel, BatchResult>();
  const sweeps = new Map<BatchModel, readonly SweepResult[]>();
  const targets = new Map<BatchModel, readonly TargetResult[]>();
  // Batches by name (the first of a duplicated name), so a follow-on finds its source.
  const byName = new Map<string, BatchModel>();
  for (const b of model.batches) if (b.node.name && !byName.has(b.name)) byName.set(b.name, b);
  const done = new Map<BatchModel, SourceState | undefined>();
  /** Whether following `from` from this batch comes back to a batch already seen. */
  const loops = (batch: BatchModel): boolean => {
    const seen = new Set<BatchModel>();
    for (let at: BatchModel | undefined = batch; at; at = at.source !== undefined ? byName.get(at.source) : undefined) {
      if (seen.has(at)) return true;
      seen.add(at);
    }
    return false;
  };
  // Solves a batch once, its source first (chains of any length; a loop is an error from build.ts and is not followed).
  const solve = (batch: BatchModel, chain: readonly BatchModel[]): SourceState | undefined => {
    if (done.has(batch)) return done.get(batch);
    let source: SourceState | undefined;
    if (batch.source !== undefined) {
      const from = byName.get(batch.source);
      if (!from || chain.includes(from) || from === batch) {
        done.set(batch, undefined);
        return undefined;
      }
      source = solve(from, [...chain, batch]);
      if (!source) {
        const at = batch.node.source ?? batch.node.keyword;
        // A chain that loops has its batch-cycle errors; any other unsolved source gets its reason here.
        if (!loops(from)) batchDiagnostics.push(diagnostic('missing-data', `\`${from.name}\` cannot be solved (see its errors), so this batch cannot start from it`, at.start, at.end));
        done.set(batch, undefined);
        return undefined;
      }
    }
    const inputs = batchInputs(batch, model, source);
    batchDiagnostics.push(...inputs.diagnostics);
    if (!inputs.inputs) {
      done.set(batch, undefined);
      return undefined;
    }
    const result = solveBatch(inputs.inputs, cache);
    results.set(batch, result);
    batchDiagnostics.push(...resultDiagnostics(batch, result));
    if (batch.node.properties.some((p) => p.type === 'sweep')) {
      const s = batchSweeps(batch, model, cache, source);
      batchDiagnostics.push(...s.diagnostics);
      sweeps.set(batch, s.sweeps);
    }
    if (batch.node.properties.some((p) => p.type === 'target')) {
      const t = batchTargets(batch, model, cache, source);
      batchDiagnostics.push(...t.diagnostics);
      targets.set(batch, t.targets);
    }
    const state: SourceState = { name: batch.name, inputs: inputs.inputs, equilibrium: result.equilibrium, converged: result.status === 'converged' };
    done.set(batch, state);
    return state;
  };
  for (const batch of model.batches) solve(batch, []);
  const lines = new LineIndex(text);
  const diagnostics = applyAcceptances(
    [...syntax.errors.map((e) => diagnostic(e.code, e.message, e.start, e.end)), ...model.diagnostics, ...batchDiagnostics],
    syntax.tree,
    text,
    lines,
  );
  const items = new Map<StatementNode, StatementAt>();
  for (const d of model.speciesList) items.set(d.node, { node: d.node, kind: 'species', item: d });
  for (const r of model.reactions) items.set(r.node, { node: r.node, kind: 'reaction', item: r });
  for (const b of model.batches) items.set(b.node, { node: b.node, kind: 'batch', item: b });
  const statements = syntax.tree.statements;
  const statementAt = (offset: number): StatementAt | undefined => {
    let lo = 0;
    let hi = statements.length - 1;
    while (lo <= hi) {
      const mid = (lo + hi) >> 1;
      const s = statements[mid];
      if (offset < s.start) hi = mid - 1;
      else if (offset >= s.end && !(offset === s.end && mid === statements.length - 1)) lo = mid + 1;
      else {
        const found = items.get(s);
        if (found) return found;
        return s.type === 'species' ? { node: s, kind: 'species' } : { node: s, kind: 'error' };
      }
    }
    return undefined;
  };
  return { text, syntax, model, diagnostics, lines, results, sweeps, targets, statementAt };
}
