// Document symbols for the outline: species, reactions and batches, each with
// the range of its whole statement and the range of its name.
import type { Analysis } from './analysis';

export interface NotebookSymbol {
  readonly name: string;
  readonly detail: string;
  readonly kind: 'species' | 'reaction' | 'batch';
  readonly start: number;
  readonly end: number;
  readonly selectionStart: number;
  readonly selectionEnd: number;
}

export function documentSymbols(analysis: Analysis): NotebookSymbol[] {
  const out: NotebookSymbol[] = [];
  const { text } = analysis;
  for (const s of analysis.syntax.tree.statements) {
    const at = analysis.statementAt(s.start);
    if (!at) continue;
    if (at.kind === 'species' && s.type === 'species' && s.name) {
      const f = s.formula ? `${s.formula.text}${s.phase ? ` ${s.phase.text}` : ''}` : '';
      out.push({ name: s.name.text, detail: f, kind: 'species', start: s.start, end: trimEnd(text, s.end), selectionStart: s.name.start, selectionEnd: s.name.end });
    } else if (at.kind === 'reaction') {
      const r = at.item;
      const sel = r.node.label ?? r.node.arrow;
      out.push({
        name: r.label,
        detail: text.slice(r.equationStart, r.equationEnd),
        kind: 'reaction',
        start: s.start,
        end: trimEnd(text, s.end),
        selectionStart: sel.start,
        selectionEnd: sel.end,
      });
    } else if (at.kind === 'batch' && at.item.node.name) {
      const b = at.item;
      const name = b.node.name!;
      out.push({
        name: b.name,
        detail: text.slice(b.node.at?.end ?? name.end, lineEnd(text, name.end)).replace(/#.*/, '').trim(),
        kind: 'batch',
        start: s.start,
        end: trimEnd(text, s.end),
        selectionStart: name.start,
        selectionEnd: name.end,
      });
    }
  }
  return out;
}

/** A statement's range without its final line break, so the outline does not spill onto the next line. */
function trimEnd(text: string, end: number): number {
  let e = end;
  while (e > 0 && (text[e - 1] === '\n' || text[e - 1] === '\r')) e--;
  return e;
}

function lineEnd(text: string, from: number): number {
  const nl = text.indexOf('\n', from);
  return nl < 0 ? text.length : nl;
}
