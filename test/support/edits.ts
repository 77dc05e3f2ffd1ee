// Applies LSP-style text edits (line/character ranges) to a text, for tests
// that check what a quick fix does to the document.

export interface LspPosition {
  line: number;
  character: number;
}
export interface LspTextEdit {
  range: { start: LspPosition; end: LspPosition };
  newText: string;
}

function offsetOf(text: string, p: LspPosition): number {
  let line = 0;
  let i = 0;
  while (line < p.line) {
    const nl = text.indexOf('\n', i);
    if (nl < 0) return text.length;
    i = nl + 1;
    line++;
  }
  return Math.min(i + p.character, text.length);
}

export function applyEdits(text: string, edits: readonly LspTextEdit[]): string {
  const withOffsets = edits
    .map((e) => ({ start: offsetOf(text, e.range.start), end: offsetOf(text, e.range.end), newText: e.newText }))
    .sort((a, b) => b.start - a.start);
  let out = text;
  for (const e of withOffsets) out = out.slice(0, e.start) + e.newText + out.slice(e.end);
  return out;
}
