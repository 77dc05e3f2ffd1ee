// Inlay hints: the headline result of each solved batch (e.g. the conversion of
// its basis species), shown at the end of the batch's header line.
import type { Analysis } from './analysis';
import { batchReport } from './batch-report';

export interface InlayHint {
  /** Offset the hint is shown at (end of the batch header's text, before any note). */
  readonly offset: number;
  readonly label: string;
  readonly tooltip: string;
}

/** Hints for batches whose header lies in [start, end]. */
export function inlayHints(analysis: Analysis, start = 0, end = Number.MAX_SAFE_INTEGER): InlayHint[] {
  const out: InlayHint[] = [];
  for (const batch of analysis.model.batches) {
    const node = batch.node;
    if (node.start > end || node.end < start) continue;
    if (!analysis.results.has(batch)) continue;
    const report = batchReport(analysis, batch);
    if (!report.solved || !report.headline) continue;
    const last = node.pressure ?? node.temperature ?? node.at ?? node.name ?? node.keyword;
    out.push({ offset: last.end, label: `⇒ ${report.headline}`, tooltip: 'Equilibrium estimate; hover the batch name for the full table.' });
  }
  return out;
}
