// What the editor commands compute: every equation's balance fix at once,
// a batch's results as a Markdown table for a lab record, and a short summary
// of the notebook for the status bar. Plain data; the protocol layer applies it.
import type { TextEdit } from '../semantic/codes';
import type { Analysis } from './analysis';
import { batchReport, ESTIMATE_NOTE } from './batch-report';
import { markdownTable } from './tables';

/** The preferred balance fix of every unbalanced equation that has a unique balance. */
export function balanceAllEdits(analysis: Analysis): TextEdit[] {
  const edits: TextEdit[] = [];
  const seen = new Set<number>();
  for (const d of analysis.diagnostics) {
    for (const f of d.fixes) {
      if (!f.preferred) continue;
      for (const e of f.edits) {
        if (seen.has(e.start)) continue;
        seen.add(e.start);
        edits.push(e);
      }
    }
  }
  return edits.sort((a, b) => a.start - b.start);
}

/** A batch's results as Markdown: conditions, the tables, the summary and the assumptions. */
export function batchMarkdown(analysis: Analysis, name: string): string | undefined {
  const batch = analysis.model.batches.find((b) => b.name === name);
  if (!batch) return undefined;
  const r = batchReport(analysis, batch);
  const parts: string[] = [`### ${r.title}`, '', ...r.conditions.map((c) => `${c}  `)];
  if (!r.solved) return [...parts, '', r.problem ?? 'Not solved.'].join('\n');
  parts.push('', `_${ESTIMATE_NOTE}_`);
  for (const c of r.cautions) parts.push('', `Caution: ${c}`);
  if (r.species) parts.push('', markdownTable(r.species));
  if (r.reactions && r.reactions.rows.length > 0) parts.push('', markdownTable(r.reactions));
  if (r.summary.length > 0) parts.push('', ...r.summary.map((x) => `- ${x}`));
  if (r.assumptions.length > 0) parts.push('', `_Assumptions: ${r.assumptions.join('; ')}._`);
  return parts.join('\n');
}

export interface NotebookSummary {
  readonly reactions: number;
  readonly batches: number;
  readonly errors: number;
  readonly warnings: number;
}

export function summary(analysis: Analysis): NotebookSummary {
  return {
    reactions: analysis.model.reactions.length,
    batches: analysis.model.batches.length,
    errors: analysis.diagnostics.filter((d) => d.severity === 'error').length,
    warnings: analysis.diagnostics.filter((d) => d.severity === 'warning').length,
  };
}

export interface CodeLens {
  readonly start: number;
  readonly end: number;
  readonly title: string;
  readonly batch: string;
  /** What clicking does: copy the batch's results, or show the chart of its sweep number `sweep`. */
  readonly action: 'copy' | 'chart';
  readonly sweep?: number;
}

/** Above each batch: its headline result and the offer to copy its results. */
export function codeLenses(analysis: Analysis): CodeLens[] {
  const out: CodeLens[] = [];
  for (const b of analysis.model.batches) {
    if (!b.node.name) continue;
    const r = batchReport(analysis, b);
    const headline = r.solved ? (r.headline ?? 'solved') : 'not solved';
    out.push({ start: b.node.start, end: b.node.name.end, title: `${headline} · copy results`, batch: b.name, action: 'copy' });
    let sweep = 0;
    for (const line of b.node.properties) {
      if (line.type !== 'sweep') continue;
      const solved = analysis.sweeps.get(b)?.[sweep] !== undefined;
      if (solved) out.push({ start: line.start, end: line.end, title: 'show equilibrium chart', batch: b.name, action: 'chart', sweep });
      if (solved) sweep++;
    }
  }
  return out;
}
