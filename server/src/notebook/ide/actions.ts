// Code actions: the quick fixes attached to diagnostics that overlap a range
// (the balance rewrite, the two readings of an ambiguous charge).
import type { Diagnostic, Fix } from '../semantic/codes';
import type { Analysis } from './analysis';

export interface CodeAction extends Fix {
  /** The diagnostic this action fixes. */
  readonly diagnostic: Diagnostic;
}

/** Fixes for diagnostics that touch [start, end] (an empty range touches what contains it). */
export function codeActions(analysis: Analysis, start: number, end: number): CodeAction[] {
  const out: CodeAction[] = [];
  for (const d of analysis.diagnostics) {
    if (d.fixes.length === 0) continue;
    if (d.end < start || d.start > end) continue;
    for (const f of d.fixes) out.push({ ...f, diagnostic: d });
  }
  return out;
}
