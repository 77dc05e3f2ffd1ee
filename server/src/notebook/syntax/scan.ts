// Low-level scanning shared by the parser: splitting the text into physical
// lines, finding words, and assembling tokens into gap-free children lists so
// every node is lossless by construction.
import type { SyntaxElement, Token, TokenKind } from './tree';

/** A physical line: [start, end) without its line break; `breakEnd` includes it. */
export interface Line {
  readonly start: number;
  readonly end: number;
  readonly breakEnd: number;
}

export function splitLines(text: string): Line[] {
  const lines: Line[] = [];
  let start = 0;
  while (start < text.length) {
    const nl = text.indexOf('\n', start);
    if (nl < 0) {
      lines.push({ start, end: text.length, breakEnd: text.length });
      break;
    }
    const end = nl > start && text[nl - 1] === '\r' ? nl - 1 : nl;
    lines.push({ start, end, breakEnd: nl + 1 });
    start = nl + 1;
  }
  return lines;
}

/** A run of non-blank characters at [start, end). */
export interface Word {
  readonly start: number;
  readonly end: number;
  readonly text: string;
}

/** Space, tab and no-break space separate words; line breaks are handled by splitLines. */
export function isBlank(ch: string | undefined): boolean {
  return ch === ' ' || ch === '\t' || ch === '\u00a0';
}

/** The words of text[from, to). */
export function wordsIn(text: string, from: number, to: number): Word[] {
  const words: Word[] = [];
  let i = from;
  while (i < to) {
    while (i < to && isBlank(text[i])) i++;
    if (i >= to) break;
    const s = i;
    while (i < to && !isBlank(text[i])) i++;
    words.push({ start: s, end: i, text: text.slice(s, i) });
  }
  return words;
}

/** Moves `from` forward and `to` backward over blanks. */
export function trimRange(text: string, from: number, to: number): [number, number] {
  while (from < to && isBlank(text[from])) from++;
  while (to > from && isBlank(text[to - 1])) to--;
  return [from, to];
}

/**
 * A token keeps a reference to the source and slices its text on demand: a tree holds
 * one token per word and space, and most token texts are never read.
 */
class SourceToken implements Token {
  readonly type = 'token' as const;
  constructor(
    private readonly source: string,
    readonly kind: TokenKind,
    readonly start: number,
    readonly end: number,
  ) {}
  get text(): string {
    return this.source.slice(this.start, this.end);
  }
  toJSON(): Omit<Token, never> {
    return { type: this.type, kind: this.kind, start: this.start, end: this.end, text: this.text };
  }
}

export function token(text: string, kind: TokenKind, start: number, end: number): Token {
  return new SourceToken(text, kind, start, end);
}

/**
 * Orders `items` (which must not overlap) and fills every gap in [from, to)
 * with whitespace tokens (or error tokens where the gap is not blank), so the
 * result covers the range exactly.
 */
export function assemble(text: string, items: readonly SyntaxElement[], from: number, to: number): SyntaxElement[] {
  let inOrder = true;
  for (let i = 1; i < items.length && inOrder; i++) inOrder = items[i - 1].start <= items[i].start;
  const sorted = inOrder ? items : [...items].sort((a, b) => a.start - b.start);
  const out: SyntaxElement[] = [];
  let pos = from;
  const fill = (until: number): void => {
    let i = pos;
    while (i < until) {
      const s = i;
      const blank = isBlank(text[i]);
      while (i < until && isBlank(text[i]) === blank) i++;
      out.push(token(text, blank ? 'whitespace' : 'error', s, i));
    }
  };
  for (const item of sorted) {
    if (item.start < pos) continue; // defensive: overlapping items are dropped, never duplicated
    fill(item.start);
    out.push(item);
    pos = item.end;
  }
  fill(to);
  return out;
}
