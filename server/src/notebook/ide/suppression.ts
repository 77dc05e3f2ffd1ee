// Per-line acceptance of diagnostics, written as a note so it travels with the
// notebook and works in every editor and in the CLI:
//   vessel 2 L          # about 90 bar expected; accept: pressure-caution
//   # accept: k-extrapolated
//   batch quick at 30 °C
// A note with `accept: CODE[, CODE]` silences those codes on its own line; a
// note that fills its line applies to the next line that is not a note. An
// unknown code, or an acceptance that silences nothing, is itself reported.
import { forEachToken } from '../syntax/tree';
import { DIAGNOSTIC_CODES, diagnostic, type Diagnostic, type DiagnosticCode } from '../semantic/codes';
import type { LineIndex } from './line-index';
import type { FileNode } from '../syntax/tree';

const ACCEPT = /\baccept:\s*([a-z][a-z0-9-]*(?:\s*,\s*[a-z][a-z0-9-]*)*)/;

interface Acceptance {
  /** 0-based line whose diagnostics it silences. */
  readonly line: number;
  readonly codes: readonly { code: string; start: number; end: number }[];
}

function acceptances(tree: FileNode, text: string, lines: LineIndex): Acceptance[] {
  const out: Acceptance[] = [];
  forEachToken(tree, (t) => {
    if (t.kind !== 'comment') return;
    const m = ACCEPT.exec(t.text);
    if (!m) return;
    const listStart = t.start + m.index + m[0].length - m[1].length;
    const codes: { code: string; start: number; end: number }[] = [];
    const re = /[a-z][a-z0-9-]*/g;
    for (let c = re.exec(m[1]); c; c = re.exec(m[1])) codes.push({ code: c[0], start: listStart + c.index, end: listStart + c.index + c[0].length });
    const own = lines.position(t.start).line;
    const lineStart = lines.lineStart(own);
    const wholeLine = text.slice(lineStart, t.start).trim() === '';
    let target = own;
    if (wholeLine) {
      // The next line that is neither blank nor only a note.
      target = own + 1;
      while (target < lines.lineCount) {
        const s = lines.lineStart(target);
        const e = target + 1 < lines.lineCount ? lines.lineStart(target + 1) : text.length;
        const content = text.slice(s, e).trim();
        if (content !== '' && !content.startsWith('#')) break;
        target++;
      }
    }
    out.push({ line: target, codes });
  });
  return out;
}

/** Removes accepted diagnostics and reports unknown or unused acceptances. */
export function applyAcceptances(diagnostics: readonly Diagnostic[], tree: FileNode, text: string, lines: LineIndex): Diagnostic[] {
  const list = acceptances(tree, text, lines);
  if (list.length === 0) return [...diagnostics].sort((x, y) => x.start - y.start || x.end - y.end);
  const used = new Set<string>();
  const kept = diagnostics.filter((d) => {
    const line = lines.position(d.start).line;
    for (const a of list) {
      if (a.line !== line) continue;
      const hit = a.codes.find((c) => c.code === d.code);
      if (hit) {
        used.add(`${hit.start}`);
        return false;
      }
    }
    return true;
  });
  for (const a of list) {
    for (const c of a.codes) {
      if (!(c.code in DIAGNOSTIC_CODES)) {
        kept.push(diagnostic('unknown-code', `\`${c.code}\` is not a diagnostic code; see the list in docs/notebook-format.md`, c.start, c.end));
      } else if (!used.has(`${c.start}`)) {
        kept.push(diagnostic('unused-accept', `nothing with code \`${c.code as DiagnosticCode}\` to accept on line ${a.line + 1}`, c.start, c.end));
      }
    }
  }
  return kept.sort((x, y) => x.start - y.start || x.end - y.end);
}
