// Formatting: one canonical layout that never changes meaning. Statements get
// single spaces around `=`, ` + ` and arrows and between a coefficient and its
// species; property lines are indented two spaces, with the values of a
// statement's properties aligned in one column, and a batch's amounts aligned
// in columns. Notes stay, two spaces after the text they follow.
// A line with a syntax error is left exactly as written.
import type { QuantityNode, SpeciesNode, StatementNode, Token, TermNode } from '../syntax/tree';
import type { TextEdit } from '../semantic/codes';
import type { Analysis } from './analysis';

/** Indentation of property lines. */
const INDENT = '  ';
/** Spaces between a statement's text and a note after it. */
const NOTE_GAP = '  ';

interface LineText {
  /** [start, end) of the line without its line break. */
  readonly start: number;
  readonly end: number;
  /** The new text of the line, before any note. */
  readonly body: string;
  readonly note?: string;
}

/** Edits that format the whole document, or only the lines touching [start, end]. */
export function formatting(analysis: Analysis, start = 0, end = analysis.text.length): TextEdit[] {
  const { text } = analysis;
  const edits: TextEdit[] = [];
  const broken = errorLines(analysis);
  for (const s of analysis.syntax.tree.statements) {
    if (s.end < start || s.start > end) continue;
    for (const line of statementLines(analysis, s)) {
      if (line.end < start || line.start > end) continue;
      if (broken.has(analysis.lines.position(line.start).line)) continue;
      const newText = line.note !== undefined ? `${line.body}${line.body.trim() === '' ? '' : NOTE_GAP}${line.note}` : line.body;
      if (newText !== text.slice(line.start, line.end)) edits.push({ start: line.start, end: line.end, newText });
    }
  }
  return edits;
}

/** 0-based numbers of lines with a syntax error: formatting leaves them alone. */
function errorLines(analysis: Analysis): Set<number> {
  const out = new Set<number>();
  for (const e of analysis.syntax.errors) {
    const a = analysis.lines.position(e.start).line;
    const b = analysis.lines.position(Math.max(e.start, e.end - 1)).line;
    for (let l = a; l <= b; l++) out.add(l);
  }
  return out;
}

function lineBounds(analysis: Analysis, offset: number): { start: number; end: number } {
  const { text } = analysis;
  const start = text.lastIndexOf('\n', offset - 1) + 1;
  let end = text.indexOf('\n', offset);
  if (end < 0) end = text.length;
  if (end > start && text[end - 1] === '\r') end--;
  return { start, end };
}

function noteOf(analysis: Analysis, bounds: { start: number; end: number }): string | undefined {
  const hash = analysis.text.indexOf('#', bounds.start);
  return hash >= 0 && hash < bounds.end ? analysis.text.slice(hash, bounds.end).trimEnd() : undefined;
}

function quantityText(q: QuantityNode | undefined): string {
  if (!q) return '';
  return q.unit ? `${q.number.text} ${q.unit.text}` : q.number.text;
}

function termText(t: TermNode): string {
  const coefficient = t.coefficient ? `${t.coefficient.text} ` : '';
  const phase = t.phase ? (t.phase.start === t.species.end ? t.phase.text : ` ${t.phase.text}`) : '';
  return `${coefficient}${t.species.text}${phase}`;
}

function speciesHeader(s: SpeciesNode): string {
  const phase = s.phase ? (s.formula && s.phase.start === s.formula.end ? s.phase.text : ` ${s.phase.text}`) : '';
  return `species ${s.name?.text ?? ''} = ${s.formula?.text ?? ''}${phase}`;
}

function statementLines(analysis: Analysis, s: StatementNode): LineText[] {
  if (s.type === 'error-line') return [];
  const out: LineText[] = [];
  const header = lineBounds(analysis, s.start);
  const note = noteOf(analysis, header);
  let body: string | undefined;
  if (s.type === 'species' && s.name && s.formula) body = speciesHeader(s);
  if (s.type === 'reaction') {
    const side = (terms: readonly TermNode[]): string => terms.map(termText).join(' + ');
    body = `${s.label ? `${s.label.text}: ` : ''}${side(s.left)} ${s.arrow.text} ${side(s.right)}`;
  }
  if (s.type === 'batch' && s.name && (s.temperature || (s.from && s.source && !s.at))) {
    const from = s.from && s.source ? ` from ${s.source.text}` : '';
    const at = s.temperature ? ` at ${quantityText(s.temperature)}${s.pressure ? `, ${quantityText(s.pressure)}` : ''}` : '';
    body = `batch ${s.name.text}${from}${at}`;
  }
  if (body !== undefined) out.push({ ...header, body, note });

  // Property lines, aligned within the statement.
  const props = s.properties;
  const keyOf = (p: (typeof props)[number]): string => {
    if (p.type === 'property') return p.key.map((k: Token) => k.text).join(' ');
    if (p.type === 'operation') return '';
    if (p.type === 'amount') return `${p.species.text}${p.phase ? (p.phase.start === p.species.end ? p.phase.text : ` ${p.phase.text}`) : ''}`;
    return '';
  };
  const width = (x: string): number => Array.from(x).length;
  const keyWidth = Math.max(0, ...props.filter((p) => p.type === 'property' || p.type === 'amount').map((p) => width(keyOf(p))));
  const numberWidth = Math.max(0, ...props.map((p) => (p.type === 'amount' && p.value ? width(p.value.number.text) : 0)));
  for (const p of props) {
    // A sweep line keeps its own layout (its words are already single-spaced by convention).
    if (p.type === 'error-line' || p.type === 'sweep' || p.type === 'target') continue;
    const bounds = lineBounds(analysis, p.children.find((c) => c.type !== 'token' || (c.kind !== 'whitespace' && c.kind !== 'newline'))?.start ?? p.start);
    const key = keyOf(p);
    const pad = ' '.repeat(keyWidth - width(key));
    let line: string;
    if (p.type === 'operation') {
      const phase = p.phase ? (p.species && p.phase.start === p.species.end ? p.phase.text : ` ${p.phase.text}`) : '';
      const what = p.species ? ` ${p.species.text}${phase}` : '';
      line = `${INDENT}${p.keyword.text}${what}${p.to ? ' to' : ''}${p.value ? ` ${quantityText(p.value)}` : ''}`;
    } else if (p.type === 'amount') {
      const n = p.value ? p.value.number.text : '';
      const amount = p.value ? `${' '.repeat(numberWidth - width(n))}${n}${p.value.unit ? ` ${p.value.unit.text}` : ''}` : '';
      line = `${INDENT}${key}${amount ? `${pad} ${amount}` : ''}`;
    } else {
      const value = p.names.length > 0 ? p.names.map((n) => n.text).join(', ') : quantityText(p.value);
      const at = p.temperature ? ` at ${quantityText(p.temperature)}` : '';
      line = `${INDENT}${key}${pad}${p.equals ? ' =' : ''}${value ? ` ${value}` : ''}${at}`;
    }
    out.push({ ...bounds, body: line, note: noteOf(analysis, bounds) });
  }
  return out;
}
