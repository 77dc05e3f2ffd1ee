// Folding: each statement with property lines folds to its header line.
import type { Analysis } from './analysis';

export interface FoldingRange {
  /** 0-based lines, inclusive. */
  readonly startLine: number;
  readonly endLine: number;
}

export function foldingRanges(analysis: Analysis): FoldingRange[] {
  const out: FoldingRange[] = [];
  for (const s of analysis.syntax.tree.statements) {
    const props = 'properties' in s ? (s.properties as readonly { end: number }[]) : [];
    if (props.length === 0) continue;
    const last = props[props.length - 1];
    const startLine = analysis.lines.position(s.start).line;
    const endLine = analysis.lines.position(Math.max(last.end - 1, s.start)).line;
    if (endLine > startLine) out.push({ startLine, endLine });
  }
  return out;
}
