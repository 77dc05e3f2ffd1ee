// The notebook parser: text -> (lossless tree, syntax errors). It never fails.
// The language is line based: a line in column 0 starts a statement (species,
// reaction or batch); indented lines are properties of the statement above.
// A line it cannot read becomes an error node, and parsing goes on with the
// next line, so one bad line never hides the problems of the others.
import {
  assemble as assembleTokens,
  isBlank,
  splitLines,
  token,
  trimRange,
  wordsIn,
  type Line,
  type Word,
} from './scan';
import type {
  AmountNode,
  BatchNode,
  ErrorLineNode,
  OperationNode,
  FileNode,
  ParseResult,
  PropertyLine,
  PropertyNode,
  QuantityNode,
  ReactionNode,
  SpeciesNode,
  StatementNode,
  SweepNode,
  TargetNode,
  SyntaxElement,
  SyntaxError,
  TermNode,
  Token,
} from './tree';

/** Lines longer than this are not parsed: almost surely pasted data, and costly to analyse. */
export const MAX_LINE_LENGTH = 4000;

const BYTE_ORDER_MARK = 0xfeff;

export const STATEMENT_KEYWORDS = ['species', 'batch'] as const;
/** Batch property keywords; any other first word on a batch line names a species amount. */
export const BATCH_KEYWORDS = ['vessel', 'volume', 'basis', 'uses', 'heat', 'vary', 'target', 'add', 'remove', 'vent'] as const;
/** Operation lines of a follow-on batch (`batch B from A`). */
export const OPERATION_KEYWORDS = ['add', 'remove', 'vent'] as const;
/** Property keys written as two words: the first word, and the word that must follow it. */
const TWO_WORD_KEYS: Readonly<Record<string, string>> = { log: 'K', heat: 'capacity' };
/** Words that cannot be species names: they would read as statement or batch keywords. */
export const RESERVED_WORDS: ReadonlySet<string> = new Set<string>(['species', 'batch', 'at', 'from', 'vessel', 'volume', 'basis', 'uses', 'heat', 'vary', 'target', 'add', 'remove', 'vent']);
/** Property keys whose value is a comma-separated list of names rather than a quantity. */
export const NAME_LIST_KEYS: ReadonlySet<string> = new Set(['basis', 'uses']);

export const IDENTIFIER = /^[A-Za-z_][A-Za-z0-9_]*/;
/** Batch names and reaction labels may also contain `-` (`trial-1`). */
export const LABEL_NAME = /^[A-Za-z_][A-Za-z0-9_-]*/;
export const ARROWS = /<=>|⇌|->|→/g;
const PHASE_WORD = /^\([a-z]{1,4}\)$/;
const PHASE_SUFFIX = /\([a-z]{1,4}\)$/;
const COEFFICIENT_WORD = /^[+\-−]?(?:\d+\/\d+|\d+(?:\.\d+)?(?:[eE][+\-−]?\d+)?|\.\d+)$/;
const COEFFICIENT_PREFIX = /^[+\-−]?(?:\d+\/\d+|\d+(?:\.\d+)?|\.\d+)(?=[A-Za-z[(])/;
const NUMBER_PREFIX = /^[+\-−]?(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][+\-−]?\d+)?/;

type OpenStatement = {
  kind: 'species' | 'reaction' | 'batch' | 'error';
  /** Elements of the header line (already assembled, line break included). */
  header: SyntaxElement[];
  build: (children: SyntaxElement[], properties: PropertyLine[]) => StatementNode;
  lines: SyntaxElement[];
  properties: PropertyLine[];
};

export function parse(text: string): ParseResult {
  return new Parser(text).run();
}

class Parser {
  private readonly errors: SyntaxError[] = [];
  private readonly errorOffsets = new Set<number>();
  private readonly errorTokens: Token[] = [];
  private readonly fileChildren: SyntaxElement[] = [];
  private readonly statements: StatementNode[] = [];
  private open: OpenStatement | undefined;
  /** Blank and note-only lines not yet known to belong to the open statement or the file. */
  private pendingTrivia: SyntaxElement[] = [];

  constructor(private readonly text: string) {}

  run(): ParseResult {
    const lines = splitLines(this.text);
    if (this.text.charCodeAt(0) === BYTE_ORDER_MARK && lines.length > 0) {
      // A byte order mark is not part of the first statement: keep it as trivia.
      this.fileChildren.push(token(this.text, 'whitespace', 0, 1));
      lines[0] = { ...lines[0], start: 1 };
    }
    for (const line of lines) this.line(line);
    this.closeStatement();
    this.fileChildren.push(...this.pendingTrivia);
    const tree: FileNode = {
      type: 'file',
      start: 0,
      end: this.text.length,
      children: this.fileChildren,
      statements: this.statements,
    };
    this.reportStrayErrorTokens();
    return { tree, errors: this.errors };
  }

  private error(message: string, start: number, end: number, code: SyntaxError['code'] = 'syntax'): void {
    if (this.errorOffsets.has(start)) return; // at most one problem per offset
    this.errorOffsets.add(start);
    this.errors.push({ code, message, start, end: Math.max(end, start + 1) > this.text.length ? Math.max(end, start) : Math.max(end, start + 1) });
  }

  private line(line: Line): void {
    const { text } = this;
    let indentEnd = line.start;
    while (indentEnd < line.end && isBlank(text[indentEnd])) indentEnd++;
    let commentStart = indentEnd;
    while (commentStart < line.end && text[commentStart] !== '#') commentStart++;
    if (commentStart - line.start > MAX_LINE_LENGTH) {
      // Only the text before a note counts: a note of any length is fine.
      this.error(
        `line is ${commentStart - line.start} characters long; lines longer than ${MAX_LINE_LENGTH} are not read (split it, or make it a note)`,
        line.start,
        commentStart,
        'line-too-long',
      );
      const items: Token[] = [token(text, 'error', line.start, commentStart)];
      if (commentStart < line.end) items.push(token(text, 'comment', commentStart, line.end));
      if (line.breakEnd > line.end) items.push(token(text, 'newline', line.end, line.breakEnd));
      const node = this.errorLine(items, line);
      if (isBlank(text[line.start])) this.addProperty(node, { start: line.start, end: commentStart });
      else this.startStatement({ kind: 'error', header: [...node.children], build: errorStatement, lines: [], properties: [] });
      return;
    }
    const [cs, ce] = trimRange(text, indentEnd, commentStart);
    const tail: Token[] = [];
    if (commentStart < line.end) tail.push(token(text, 'comment', commentStart, line.end));
    if (line.breakEnd > line.end) tail.push(token(text, 'newline', line.end, line.breakEnd));

    if (cs === ce) {
      this.pendingTrivia.push(...this.assemble(tail, line.start, line.breakEnd));
      return;
    }
    if (indentEnd > line.start) {
      const items = this.propertyLine(cs, ce);
      const children = this.assemble([...items.children, ...tail], line.start, line.breakEnd);
      const node = items.build(children, line);
      this.addProperty(node, { start: cs, end: ce });
      return;
    }
    this.closeStatement();
    this.fileChildren.push(...this.pendingTrivia);
    this.pendingTrivia = [];
    this.topLevel(cs, ce, tail, line);
  }

  /** `content` is the line's text without indentation and note, for the orphan-line error. */
  private addProperty(node: PropertyLine, content: { start: number; end: number }): void {
    if (!this.open) {
      this.error(
        'an indented line must belong to a species, reaction or batch above it; remove the indentation to start a statement',
        content.start,
        content.end,
      );
      this.fileChildren.push(...this.pendingTrivia, node);
      this.pendingTrivia = [];
      return;
    }
    this.open.lines.push(...this.pendingTrivia, node);
    this.pendingTrivia = [];
    this.open.properties.push(node);
  }

  private startStatement(open: OpenStatement): void {
    this.closeStatement();
    this.open = open;
  }

  private closeStatement(): void {
    const open = this.open;
    if (!open) return;
    this.open = undefined;
    const node = open.build([...open.header, ...open.lines], open.properties);
    this.fileChildren.push(node);
    this.statements.push(node);
  }

  // ---- top-level statements -------------------------------------------------------------

  private topLevel(cs: number, ce: number, tail: Token[], line: Line): void {
    const first = wordsIn(this.text, cs, ce)[0];
    const firstName = IDENTIFIER.exec(first.text)?.[0] ?? '';
    if (firstName === 'species' && (first.text.length === 7 || isBlank(this.text[cs + 7]))) {
      this.species(cs, ce, tail, line);
    } else if (firstName === 'batch' && (first.text.length === 5 || isBlank(this.text[cs + 5]))) {
      this.batch(cs, ce, tail, line);
    } else if (!this.hasArrow(cs, ce) && looksLikeMisspelledKeyword(first.text)) {
      const kw = looksLikeMisspelledKeyword(first.text);
      this.error(`unknown statement \`${first.text}\`; did you mean \`${kw}\`?`, first.start, first.end);
      const children = this.assemble([token(this.text, 'error', cs, ce), ...tail], line.start, line.breakEnd);
      this.startStatement({ kind: 'error', header: children, build: errorStatement, lines: [], properties: [] });
    } else {
      this.reaction(cs, ce, tail, line);
    }
  }

  private hasArrow(cs: number, ce: number): boolean {
    ARROWS.lastIndex = 0;
    const m = ARROWS.exec(this.text.slice(cs, ce));
    return m !== null;
  }

  private species(cs: number, ce: number, tail: Token[], line: Line): void {
    const { text } = this;
    const items: Token[] = [token(text, 'keyword', cs, cs + 7)];
    let pos = skipBlank(text, cs + 7, ce);
    let name: Token | undefined;
    let equals: Token | undefined;
    let formula: Token | undefined;
    let phase: Token | undefined;
    // The name runs to the next blank or `=`; anything there that is not an identifier is reported
    // as a bad name, and parsing goes on with `= FORMULA`.
    let nameEnd = pos;
    while (nameEnd < ce && !isBlank(text[nameEnd]) && text[nameEnd] !== '=') nameEnd++;
    const nameText = text.slice(pos, nameEnd);
    if (nameText.length === 0) {
      this.error('expected a species name after `species` (letters, digits and `_`, not starting with a digit)', pos < ce ? pos : cs, pos < ce ? pos + 1 : cs + 7);
    } else if (IDENTIFIER.exec(nameText)?.[0] !== nameText) {
      this.error(`\`${nameText}\` is not a valid species name: use letters, digits and \`_\`, not starting with a digit`, pos, nameEnd);
      items.push(token(text, 'error', pos, nameEnd));
      pos = skipBlank(text, nameEnd, ce);
    } else {
      name = token(text, 'name', pos, nameEnd);
      items.push(name);
      pos = skipBlank(text, name.end, ce);
    }
    if (pos < ce && text[pos] === '=') {
      equals = token(text, 'equals', pos, pos + 1);
      items.push(equals);
      pos = skipBlank(text, pos + 1, ce);
    } else if (pos > cs + 7) {
      const anchor = name ?? { start: cs, end: cs + 7 };
      this.error('expected `=` and a formula after the species name, as in `species water = H2O (l)`', pos < ce ? pos : anchor.start, pos < ce ? ce : anchor.end);
      if (pos < ce) items.push(token(text, 'error', pos, ce));
      pos = ce;
    }
    if (equals) {
      const words = wordsIn(text, pos, ce);
      if (words.length === 0) {
        this.error('expected a formula after `=`', equals.start, equals.end);
      } else {
        const split = splitPhase(text, words[0]);
        formula = split.species;
        formula = token(text, 'formula', formula.start, formula.end);
        items.push(formula);
        if (split.phase) phase = split.phase;
        let rest = words.slice(1);
        if (!phase && rest.length > 0 && PHASE_WORD.test(rest[0].text)) {
          phase = token(text, 'phase', rest[0].start, rest[0].end);
          rest = rest.slice(1);
        }
        if (phase) items.push(phase);
        if (rest.length > 0) {
          const junkStart = rest[0].start;
          this.error(
            `unexpected \`${text.slice(junkStart, ce)}\` after the formula; a formula has no spaces, a phase is written (g), (l), (s) or (aq), and a note starts with \`#\``,
            junkStart,
            ce,
          );
          items.push(token(text, 'error', junkStart, ce));
        }
      }
    }
    const header = this.assemble([...items, ...tail], line.start, line.breakEnd);
    const keyword = items[0];
    this.startStatement({
      kind: 'species',
      header,
      lines: [],
      properties: [],
      build: (children, properties): SpeciesNode => ({
        type: 'species',
        start: children[0].start,
        end: children[children.length - 1].end,
        children,
        keyword,
        name,
        equals,
        formula,
        phase,
        properties,
      }),
    });
  }

  private batch(cs: number, ce: number, tail: Token[], line: Line): void {
    const { text } = this;
    const keyword = token(text, 'keyword', cs, cs + 5);
    const items: SyntaxElement[] = [keyword];
    let pos = skipBlank(text, cs + 5, ce);
    let name: Token | undefined;
    let at: Token | undefined;
    let temperature: QuantityNode | undefined;
    let pressure: QuantityNode | undefined;
    let from: Token | undefined;
    let source: Token | undefined;
    const words = wordsIn(text, pos, ce);
    const atIndex = words.findIndex((w) => w.text === 'at');
    const nameWord = atIndex === 0 || words[0]?.text === 'from' ? undefined : words[0];
    const fromIndex = words.findIndex((w, k) => w.text === 'from' && (atIndex < 0 || k < atIndex));
    if (!nameWord) {
      this.error('expected a batch name after `batch`, as in `batch trial-1 at 25 °C`', keyword.start, keyword.end);
    } else {
      const m = LABEL_NAME.exec(nameWord.text);
      if (m && m[0].length === nameWord.text.length) {
        name = token(text, 'name', nameWord.start, nameWord.end);
        items.push(name);
      } else {
        this.error(
          `\`${nameWord.text}\` is not a valid batch name (letters, digits, \`_\` and \`-\`, not starting with a digit)`,
          nameWord.start,
          nameWord.end,
        );
        items.push(token(text, 'error', nameWord.start, nameWord.end));
      }
      pos = nameWord.end;
    }
    if (fromIndex >= 0) {
      // A follow-on batch: `from SOURCE`, then an optional `at T[, P]`.
      if (fromIndex > 1) {
        const junk = words[nameWord ? 1 : 0];
        this.error('a batch name has no spaces; expected `from` after it', junk.start, words[fromIndex - 1].end);
        items.push(token(text, 'error', junk.start, words[fromIndex - 1].end));
      }
      const fromWord = words[fromIndex];
      from = token(text, 'keyword', fromWord.start, fromWord.end);
      items.push(from);
      const sourceWord = words[fromIndex + 1];
      const m = sourceWord && sourceWord.text !== 'at' ? LABEL_NAME.exec(sourceWord.text) : null;
      if (sourceWord && m && m[0].length === sourceWord.text.length) {
        source = token(text, 'name', sourceWord.start, sourceWord.end);
        items.push(source);
      } else {
        this.error('expected the name of the batch to start from after `from`, as in `batch dried from trial-1`', from.start, sourceWord && sourceWord.text !== 'at' ? sourceWord.end : from.end);
        if (sourceWord && sourceWord.text !== 'at') items.push(token(text, 'error', sourceWord.start, sourceWord.end));
      }
      const extraEnd = atIndex >= 0 ? atIndex : words.length;
      if (fromIndex + 2 < extraEnd) {
        const junk = words[fromIndex + 2];
        this.error('expected `at` and a temperature (or nothing) after the source batch', junk.start, words[extraEnd - 1].end);
        items.push(token(text, 'error', junk.start, words[extraEnd - 1].end));
      }
    }
    if (atIndex < 0 && fromIndex >= 0) {
      // No `at`: the follow-on keeps its source's temperature and pressure.
    } else if (atIndex < 0) {
      const after = words[nameWord ? 1 : 0];
      this.error(
        'expected `at` and a temperature after the batch name, as in `batch trial-1 at 25 °C, 1 atm`',
        after ? after.start : (name ?? keyword).start,
        after ? ce : (name ?? keyword).end,
      );
      if (after) items.push(token(text, 'error', after.start, ce));
    } else {
      if (atIndex > 1 && fromIndex < 0) {
        const junk = words[1];
        this.error('a batch name has no spaces; expected `at` after it', junk.start, words[atIndex - 1].end);
        items.push(token(text, 'error', junk.start, words[atIndex - 1].end));
      }
      const atWord = words[atIndex];
      at = token(text, 'keyword', atWord.start, atWord.end);
      items.push(at);
      pos = atWord.end;
      const comma = text.indexOf(',', pos);
      const tEnd = comma >= 0 && comma < ce ? comma : ce;
      temperature = this.quantity(pos, tEnd, 'a temperature after `at`, as in `at 60 °C`', at);
      if (temperature) items.push(temperature);
      if (tEnd < ce) {
        items.push(token(text, 'comma', tEnd, tEnd + 1));
        const comma2 = text.indexOf(',', tEnd + 1);
        const pEnd = comma2 >= 0 && comma2 < ce ? comma2 : ce;
        pressure = this.quantity(tEnd + 1, pEnd, 'a pressure after the comma, as in `, 1 atm`', token(text, 'comma', tEnd, tEnd + 1));
        if (pressure) items.push(pressure);
        if (pEnd < ce) {
          this.error('a batch line has a temperature and at most one pressure', pEnd, ce);
          items.push(token(text, 'error', pEnd, ce));
        }
      }
    }
    const header = this.assemble([...items, ...tail], line.start, line.breakEnd);
    this.startStatement({
      kind: 'batch',
      header,
      lines: [],
      properties: [],
      build: (children, properties): BatchNode => ({
        type: 'batch',
        start: children[0].start,
        end: children[children.length - 1].end,
        children,
        keyword,
        name,
        from,
        source,
        at,
        temperature,
        pressure,
        properties,
      }),
    });
  }

  private reaction(cs: number, ce: number, tail: Token[], line: Line): void {
    const { text } = this;
    const items: SyntaxElement[] = [];
    let pos = cs;
    let label: Token | undefined;
    let colon: Token | undefined;
    const labelMatch = /^([A-Za-z_][A-Za-z0-9_-]*)[ \t]*:/.exec(text.slice(cs, ce));
    if (labelMatch) {
      label = token(text, 'label', cs, cs + labelMatch[1].length);
      const colonAt = cs + labelMatch[0].length - 1;
      colon = token(text, 'colon', colonAt, colonAt + 1);
      items.push(label, colon);
      pos = skipBlank(text, colonAt + 1, ce);
    }
    const arrows: { start: number; end: number }[] = [];
    const body = text.slice(pos, ce);
    ARROWS.lastIndex = 0;
    for (let m = ARROWS.exec(body); m; m = ARROWS.exec(body)) {
      arrows.push({ start: pos + m.index, end: pos + m.index + m[0].length });
    }
    let arrow: Token | undefined;
    let left: { terms: TermNode[]; pluses: Token[] } = { terms: [], pluses: [] };
    let right: { terms: TermNode[]; pluses: Token[] } = { terms: [], pluses: [] };
    if (arrows.length === 0 && label && pos === ce) {
      this.error('expected an equation after the label, as in `esterify: acid + EtOH <=> ester + H2O(l)`', label.start, colon!.end);
    } else if (arrows.length === 0) {
      this.error(
        'expected a statement: `species NAME = FORMULA`, `batch NAME at TEMPERATURE`, or a reaction with an arrow (`<=>`, `⇌`, `->` or `→`)',
        pos,
        ce,
      );
      if (pos < ce) items.push(token(text, 'error', pos, ce));
    } else {
      const a = arrows[0];
      arrow = token(text, 'arrow', a.start, a.end);
      const rightEnd = arrows.length > 1 ? arrows[1].start : ce;
      if (arrows.length > 1) {
        this.error('a reaction has exactly one arrow; write each step as its own reaction', arrows[1].start, ce);
        items.push(token(text, 'error', arrows[1].start, ce));
      }
      left = this.side(pos, a.start, 'left', a);
      right = this.side(a.end, rightEnd, 'right', a);
      items.push(arrow);
    }
    items.push(...left.terms, ...left.pluses, ...right.terms, ...right.pluses);
    const header = this.assemble([...items, ...tail], line.start, line.breakEnd);
    if (!arrow) {
      this.startStatement({ kind: 'error', header, build: errorStatement, lines: [], properties: [] });
      return;
    }
    const theArrow = arrow;
    this.startStatement({
      kind: 'reaction',
      header,
      lines: [],
      properties: [],
      build: (children, properties): ReactionNode => ({
        type: 'reaction',
        start: children[0].start,
        end: children[children.length - 1].end,
        children,
        label,
        colon,
        left: left.terms,
        arrow: theArrow,
        right: right.terms,
        properties,
      }),
    });
  }

  /** Terms of one side of a reaction, separated by ` + ` words. */
  private side(from: number, to: number, which: 'left' | 'right', arrow?: { start: number; end: number }): { terms: TermNode[]; pluses: Token[] } {
    const words = wordsIn(this.text, from, to);
    if (words.length === 0) {
      const at = arrow ?? { start: from, end: to };
      this.error(`expected at least one term ${which === 'left' ? 'before' : 'after'} the arrow`, at.start, at.end);
      return { terms: [], pluses: [] };
    }
    const terms: TermNode[] = [];
    let group: Word[] = [];
    const pluses: Token[] = [];
    const flush = (plusAfter?: Word): void => {
      if (group.length === 0) {
        const where = plusAfter ?? words[words.length - 1];
        this.error(
          plusAfter ? 'expected a term before ` + `' : 'expected a term after ` + `',
          where.start,
          where.end,
        );
        return;
      }
      terms.push(this.term(group));
      group = [];
    };
    for (const w of words) {
      if (w.text === '+') {
        flush(w);
        pluses.push(token(this.text, 'plus', w.start, w.end));
      } else {
        group.push(w);
      }
    }
    flush();
    return { terms, pluses };
  }

  private term(words: Word[]): TermNode {
    const { text } = this;
    const items: Token[] = [];
    let coefficient: Token | undefined;
    let rest = words;
    const first = words[0];
    if (COEFFICIENT_WORD.test(first.text) && words.length > 1) {
      coefficient = token(text, 'coefficient', first.start, first.end);
      rest = words.slice(1);
    } else {
      const m = COEFFICIENT_PREFIX.exec(first.text);
      if (m) {
        coefficient = token(text, 'coefficient', first.start, first.start + m[0].length);
        rest = [{ start: coefficient.end, end: first.end, text: first.text.slice(m[0].length) }, ...words.slice(1)];
      }
    }
    if (coefficient) items.push(coefficient);
    const speciesWord = rest[0];
    if (COEFFICIENT_WORD.test(speciesWord.text) && rest.length === 1 && !coefficient) {
      this.error(`expected a species or formula after the coefficient \`${speciesWord.text}\``, speciesWord.start, speciesWord.end);
    }
    const split = splitPhase(text, speciesWord);
    items.push(split.species);
    let phase = split.phase;
    let extra = rest.slice(1);
    if (!phase && extra.length > 0 && PHASE_WORD.test(extra[0].text)) {
      phase = token(text, 'phase', extra[0].start, extra[0].end);
      extra = extra.slice(1);
    }
    if (phase) items.push(phase);
    if (extra.length > 0) {
      const s = extra[0].start;
      const e = extra[extra.length - 1].end;
      this.error(
        `expected \` + \` or the arrow before \`${text.slice(s, e)}\`; terms are separated by \` + \` with spaces on both sides`,
        s,
        e,
      );
      items.push(token(text, 'error', s, e));
    }
    const start = items[0].start;
    const end = items[items.length - 1].end;
    return {
      type: 'term',
      start,
      end,
      children: this.assemble(items, start, end),
      coefficient,
      species: split.species,
      phase,
    };
  }

  // ---- property lines -------------------------------------------------------------------

  private propertyLine(cs: number, ce: number): { children: SyntaxElement[]; build: (children: SyntaxElement[], line: Line) => PropertyLine } {
    const { text } = this;
    const context = this.open?.kind;
    const words = wordsIn(text, cs, ce);
    const first = words[0];
    const keyWord = /^[^\s=]+/.exec(first.text)?.[0] ?? first.text;
    if (context === 'batch' && !(BATCH_KEYWORDS as readonly string[]).includes(keyWord)) {
      return this.amountLine(cs, ce, words);
    }
    if (context === 'batch' && keyWord === 'vary' && first.text === 'vary') return this.sweepLine(words);
    if (context === 'batch' && keyWord === 'target' && first.text === 'target') return this.targetLine(words, ce);
    if (context === 'batch' && (OPERATION_KEYWORDS as readonly string[]).includes(first.text)) return this.operationLine(words, ce);
    const key: Token[] = [];
    const second = TWO_WORD_KEYS[keyWord];
    if (second !== undefined && words[1]?.text.startsWith(second)) {
      const secondEnd = words[1].start + (/^[^\s=]+/.exec(words[1].text)?.[0].length ?? second.length);
      key.push(token(text, 'keyword', first.start, first.start + keyWord.length), token(text, 'keyword', words[1].start, secondEnd));
    } else {
      key.push(token(text, 'keyword', first.start, first.start + keyWord.length));
    }
    const keyText = key.map((k) => k.text).join(' ');
    const items: SyntaxElement[] = [...key];
    let pos = skipBlank(text, key[key.length - 1].end, ce);
    let equals: Token | undefined;
    if (pos < ce && text[pos] === '=') {
      equals = token(text, 'equals', pos, pos + 1);
      items.push(equals);
      pos = skipBlank(text, pos + 1, ce);
    }
    const valueWords = wordsIn(text, pos, ce);
    const atWord = valueWords.find((w) => w.text === 'at');
    const valueEnd = atWord ? atWord.start : ce;
    let value: QuantityNode | undefined;
    const names: Token[] = [];
    let at: Token | undefined;
    let temperature: QuantityNode | undefined;
    if (NAME_LIST_KEYS.has(keyText)) {
      this.nameList(pos, valueEnd, keyText, key[0], items, names);
    } else {
      value = this.quantity(pos, valueEnd, `a value after \`${keyText}\``, key[key.length - 1]);
      if (value) items.push(value);
    }
    if (atWord) {
      at = token(text, 'keyword', atWord.start, atWord.end);
      items.push(at);
      temperature = this.quantity(atWord.end, ce, 'a temperature after `at`, as in `at 25 °C`', at);
      if (temperature) items.push(temperature);
    }
    return {
      children: items,
      build: (children): PropertyNode => ({
        type: 'property',
        start: children[0].start,
        end: children[children.length - 1].end,
        children,
        key,
        keyText,
        equals,
        value,
        names,
        at,
        temperature,
      }),
    };
  }

  private nameList(from: number, to: number, keyText: string, key: Token, items: SyntaxElement[], names: Token[]): void {
    const { text } = this;
    const [s, e] = trimRange(text, from, to);
    if (s === e) {
      this.error(`expected ${keyText === 'uses' ? 'one or more reaction labels' : 'a species name'} after \`${keyText}\``, key.start, key.end);
      return;
    }
    let pos = s;
    while (pos < e) {
      const comma = text.indexOf(',', pos);
      const partEnd = comma >= 0 && comma < e ? comma : e;
      const [ps, pe] = trimRange(text, pos, partEnd);
      const m = LABEL_NAME.exec(text.slice(ps, pe));
      if (ps === pe) {
        this.error('expected a name between commas', pos, Math.max(partEnd, pos + 1));
      } else if (!m || m[0].length !== pe - ps) {
        this.error(`\`${text.slice(ps, pe)}\` is not a name (letters, digits, \`_\` and \`-\`); separate names with commas`, ps, pe);
        items.push(token(text, 'error', ps, pe));
      } else {
        const t = token(text, 'name', ps, pe);
        names.push(t);
        items.push(t);
      }
      if (partEnd < e) items.push(token(text, 'comma', partEnd, partEnd + 1));
      pos = partEnd + 1;
    }
    if (text[e - 1] === ',') this.error('expected a name after the comma', e - 1, e);
    if (keyText === 'basis' && names.length > 1) {
      this.error('`basis` names one species', names[1].start, names[names.length - 1].end);
    }
  }

  /** `vary VARIABLE from A to B [UNIT] step S` | `vary VARIABLE in A, B, C [UNIT]`. */
  private sweepLine(words: Word[]): { children: SyntaxElement[]; build: (children: SyntaxElement[], line: Line) => PropertyLine } {
    const { text } = this;
    const keyword = token(text, 'keyword', words[0].start, words[0].end);
    const items: SyntaxElement[] = [keyword];
    const usage = 'expected `vary VARIABLE from A to B step S` or `vary VARIABLE in A, B, C`, with VARIABLE one of T, P, vessel or a species of the batch';
    const variable = words[1] ? token(text, 'name', words[1].start, words[1].end) : undefined;
    if (!variable) this.error(usage, keyword.start, keyword.end);
    else items.push(variable);
    let from: Token | undefined;
    let to: Token | undefined;
    let step: Token | undefined;
    let unit: Token | undefined;
    const list: Token[] = [];
    const rest = words.slice(2);
    const isNumber = (w: Word): boolean => NUMBER_PREFIX.exec(w.text.replace(/,$/, ''))?.[0].length === w.text.replace(/,$/, '').length;
    const unitParts: Word[] = [];
    if (rest[0]?.text === 'from') {
      items.push(token(text, 'keyword', rest[0].start, rest[0].end));
      let i = 1;
      const takeNumber = (): Token | undefined => {
        const w = rest[i];
        if (!w || !isNumber(w)) return undefined;
        i++;
        return token(text, 'number', w.start, w.end);
      };
      from = takeNumber();
      if (rest[i]?.text === 'to') items.push(token(text, 'keyword', rest[i].start, rest[i++].end));
      to = takeNumber();
      while (rest[i] && rest[i].text !== 'step') unitParts.push(rest[i++]);
      if (rest[i]?.text === 'step') {
        items.push(token(text, 'keyword', rest[i].start, rest[i++].end));
        step = takeNumber();
      }
      if (i < rest.length) {
        this.error(`unexpected \`${text.slice(rest[i].start, rest[rest.length - 1].end)}\`; ${usage}`, rest[i].start, rest[rest.length - 1].end);
        items.push(token(text, 'error', rest[i].start, rest[rest.length - 1].end));
      }
      if (!from || !to || !step) this.error(`a range needs numbers after \`from\`, \`to\` and \`step\`; ${usage}`, (variable ?? keyword).start, words[words.length - 1].end);
    } else if (rest[0]?.text === 'in') {
      items.push(token(text, 'keyword', rest[0].start, rest[0].end));
      let i = 1;
      for (; i < rest.length && isNumber(rest[i]); i++) {
        const w = rest[i];
        const bare = w.text.endsWith(',') ? w.end - 1 : w.end;
        const t = token(text, 'number', w.start, bare);
        list.push(t);
        items.push(t);
        if (bare < w.end) items.push(token(text, 'comma', bare, w.end));
      }
      while (i < rest.length) unitParts.push(rest[i++]);
      if (list.length === 0) this.error(`a list needs numbers after \`in\`; ${usage}`, rest[0].start, rest[0].end);
    } else if (variable) {
      this.error(usage, variable.start, words[words.length - 1].end);
      if (rest.length > 0) items.push(token(text, 'error', rest[0].start, rest[rest.length - 1].end));
    }
    if (unitParts.length > 0) {
      unit = token(text, 'unit', unitParts[0].start, unitParts[unitParts.length - 1].end);
      items.push(unit);
    }
    for (const t of [from, to, step]) if (t) items.push(t);
    return {
      children: items,
      build: (children): SweepNode => ({
        type: 'sweep',
        start: children[0].start,
        end: children[children.length - 1].end,
        children,
        keyword,
        variable,
        from,
        to,
        step,
        list,
        unit,
      }),
    };
  }

  /** `target GOAL [of SPECIES] = X UNIT by VARIABLE [from A to B UNIT]`. */
  private targetLine(words: Word[], ce: number): { children: SyntaxElement[]; build: (children: SyntaxElement[], line: Line) => PropertyLine } {
    const { text } = this;
    const usage =
      'expected `target conversion of SPECIES = X % by VARIABLE [from A to B UNIT]`, `target yield of PRODUCT = X % by …` or `target pressure = X bar by …`';
    const keyword = token(text, 'keyword', words[0].start, words[0].end);
    const items: SyntaxElement[] = [keyword];
    let i = 1;
    const goalWord = words[i];
    let goal: Token | undefined;
    let species: Token | undefined;
    let value: QuantityNode | undefined;
    let variable: Token | undefined;
    let from: Token | undefined;
    let to: Token | undefined;
    let unit: Token | undefined;
    const bad = (at: Word | undefined): void => {
      const s = at ? at.start : keyword.start;
      this.error(usage, s, at ? ce : keyword.end);
      if (at) items.push(token(text, 'error', at.start, ce));
    };
    const build = (children: SyntaxElement[]): TargetNode => ({
      type: 'target',
      start: children[0].start,
      end: children[children.length - 1].end,
      children,
      keyword,
      goal,
      species,
      value,
      variable,
      from,
      to,
      unit,
    });
    if (!goalWord || !['conversion', 'yield', 'pressure'].includes(goalWord.text)) {
      bad(goalWord);
      return { children: items, build };
    }
    goal = token(text, 'keyword', goalWord.start, goalWord.end);
    items.push(goal);
    i++;
    if (goal.text !== 'pressure') {
      if (words[i]?.text !== 'of' || !words[i + 1]) {
        bad(words[i]);
        return { children: items, build };
      }
      items.push(token(text, 'keyword', words[i].start, words[i].end));
      species = token(text, 'name', words[i + 1].start, words[i + 1].end);
      items.push(species);
      i += 2;
    }
    if (words[i]?.text !== '=') {
      bad(words[i]);
      return { children: items, build };
    }
    items.push(token(text, 'equals', words[i].start, words[i].end));
    i++;
    const byIndex = words.findIndex((w, k) => k >= i && w.text === 'by');
    if (byIndex < 0 || byIndex === i || !words[byIndex + 1]) {
      bad(words[i]);
      return { children: items, build };
    }
    value = this.quantity(words[i].start, words[byIndex - 1].end, 'the target value', words[i]);
    if (value) items.push(value);
    items.push(token(text, 'keyword', words[byIndex].start, words[byIndex].end));
    variable = token(text, 'name', words[byIndex + 1].start, words[byIndex + 1].end);
    items.push(variable);
    i = byIndex + 2;
    if (i < words.length) {
      const isNumber = (w: Word | undefined): boolean => w !== undefined && NUMBER_PREFIX.exec(w.text)?.[0].length === w.text.length;
      if (words[i].text === 'from' && isNumber(words[i + 1]) && words[i + 2]?.text === 'to' && isNumber(words[i + 3])) {
        items.push(token(text, 'keyword', words[i].start, words[i].end));
        from = token(text, 'number', words[i + 1].start, words[i + 1].end);
        items.push(from, token(text, 'keyword', words[i + 2].start, words[i + 2].end));
        to = token(text, 'number', words[i + 3].start, words[i + 3].end);
        items.push(to);
        if (words[i + 4]) {
          unit = token(text, 'unit', words[i + 4].start, words[words.length - 1].end);
          items.push(unit);
        }
      } else {
        bad(words[i]);
      }
    }
    return { children: items, build };
  }

  /** `add SPECIES AMOUNT`, `remove SPECIES AMOUNT|PERCENT`, `vent [to PRESSURE]`. */
  private operationLine(words: Word[], ce: number): { children: SyntaxElement[]; build: (children: SyntaxElement[], line: Line) => PropertyLine } {
    const { text } = this;
    const keyword = token(text, 'keyword', words[0].start, words[0].end);
    const operation = keyword.text as OperationNode['operation'];
    const items: SyntaxElement[] = [keyword];
    let species: Token | undefined;
    let phase: Token | undefined;
    let value: QuantityNode | undefined;
    let to: Token | undefined;
    if (operation === 'vent') {
      if (words[1]?.text === 'to') {
        to = token(text, 'keyword', words[1].start, words[1].end);
        items.push(to);
        value = this.quantity(words[1].end, ce, 'a pressure after `vent to`, as in `vent to 2 bar`', to);
        if (value) items.push(value);
      } else if (words[1]) {
        this.error('expected `vent` alone (down to 1 atm) or `vent to PRESSURE`', words[1].start, ce);
        items.push(token(text, 'error', words[1].start, ce));
      }
    } else if (!words[1]) {
      this.error(`expected a species and an amount after \`${operation}\`, as in \`${operation} H2O ${operation === 'add' ? '0.5 mol' : '90 %'}\``, keyword.start, keyword.end);
    } else {
      const named = speciesAndPhase(text, words[1], words[2]);
      species = named.species;
      phase = named.phase;
      items.push(species, ...(phase ? [phase] : []));
      value = this.quantity(named.end, ce, `an amount after \`${species.text}\`, as in \`${operation} ${species.text} ${operation === 'add' ? '0.5 mol' : '90 %'}\``, species);
      if (value) items.push(value);
    }
    return {
      children: items,
      build: (children): OperationNode => ({
        type: 'operation',
        start: children[0].start,
        end: children[children.length - 1].end,
        children,
        keyword,
        operation,
        species,
        phase,
        value,
        to,
      }),
    };
  }

  private amountLine(cs: number, ce: number, words: Word[]): { children: SyntaxElement[]; build: (children: SyntaxElement[], line: Line) => PropertyLine } {
    const { text } = this;
    const split = speciesAndPhase(text, words[0], words[1]);
    const items: SyntaxElement[] = [split.species];
    const phase = split.phase;
    const pos = split.end;
    if (phase) items.push(phase);
    const value = this.quantity(pos, ce, `an amount after \`${split.species.text}\`, as in \`${split.species.text} 1.0 mol\` (or a batch keyword: vessel, volume, basis, uses, heat capacity)`, split.species);
    if (value) items.push(value);
    return {
      children: items,
      build: (children): AmountNode => ({
        type: 'amount',
        start: children[0].start,
        end: children[children.length - 1].end,
        children,
        species: split.species,
        phase,
        value,
      }),
    };
  }

  /** `NUMBER [UNIT]` in text[from, to); undefined (with an error) when there is no number. */
  private quantity(from: number, to: number, what: string, anchor: { start: number; end: number }): QuantityNode | undefined {
    const { text } = this;
    const [s, e] = trimRange(text, from, to);
    if (s === e) {
      this.error(`expected ${what}`, anchor.start, anchor.end);
      return undefined;
    }
    const firstWord = wordsIn(text, s, e)[0];
    const m = NUMBER_PREFIX.exec(firstWord.text);
    // A number glued to its unit (`60°C`, `2.5L`) is split; anything else keeps the whole word as
    // the number token and the semantic layer explains what is wrong with it.
    const numberEnd = m && m[0].length < firstWord.text.length && !/[\d.]/.test(firstWord.text[m[0].length]) ? s + m[0].length : firstWord.end;
    const number = token(text, 'number', s, numberEnd);
    const [us, ue] = trimRange(text, numberEnd, e);
    const unit = us < ue ? token(text, 'unit', us, ue) : undefined;
    const items: Token[] = unit ? [number, unit] : [number];
    return { type: 'quantity', start: s, end: unit ? unit.end : number.end, children: this.assemble(items, s, unit ? unit.end : number.end), number, unit };
  }

  private errorLine(items: SyntaxElement[], line: Line): ErrorLineNode {
    const children = this.assemble(items, line.start, line.breakEnd);
    return { type: 'error-line', start: line.start, end: line.breakEnd, children };
  }

  /** assemble() that also remembers the error tokens it places, for the safety net below. */
  private assemble(items: readonly SyntaxElement[], from: number, to: number): SyntaxElement[] {
    const children = assembleTokens(this.text, items, from, to);
    for (const c of children) if (c.type === 'token' && c.kind === 'error') this.errorTokens.push(c);
    return children;
  }

  /** Safety net: any error token without a syntax error over it gets a generic one. */
  private reportStrayErrorTokens(): void {
    if (this.errorTokens.length === 0) return;
    const covered = [...this.errors].sort((a, b) => a.start - b.start);
    for (const t of this.errorTokens) {
      if (covered.some((e) => e.start <= t.start && t.start < Math.max(e.end, e.start + 1))) continue;
      this.error(`unexpected \`${t.text.slice(0, 40)}\``, t.start, t.end);
    }
  }
}

function errorStatement(children: SyntaxElement[]): ErrorLineNode {
  return { type: 'error-line', start: children[0].start, end: children[children.length - 1].end, children };
}

function skipBlank(text: string, pos: number, end: number): number {
  while (pos < end && isBlank(text[pos])) pos++;
  return pos;
}

/** Splits a trailing `(g)`-like phase off a word: `H2O(l)` -> `H2O`, `(l)`. */
/** A species word with its phase, glued (`H2O(l)`) or as the next word (`H2O (l)`), and where they end. */
function speciesAndPhase(text: string, word: Word, next: Word | undefined): { species: Token; phase?: Token; end: number } {
  const split = splitPhase(text, word);
  if (split.phase || !next || !PHASE_WORD.test(next.text)) return { ...split, end: word.end };
  return { species: split.species, phase: token(text, 'phase', next.start, next.end), end: next.end };
}

function splitPhase(text: string, word: Word): { species: Token; phase?: Token } {
  const m = PHASE_SUFFIX.exec(word.text);
  if (m && m.index > 0) {
    const at = word.start + m.index;
    return { species: token(text, 'species-ref', word.start, at), phase: token(text, 'phase', at, word.end) };
  }
  return { species: token(text, 'species-ref', word.start, word.end) };
}

function looksLikeMisspelledKeyword(word: string): string | undefined {
  const w = word.toLowerCase();
  for (const kw of STATEMENT_KEYWORDS) {
    if (w === kw) return kw;
    if (Math.abs(w.length - kw.length) <= 1 && distanceAtMost1(w, kw)) return kw;
  }
  return undefined;
}

function distanceAtMost1(a: string, b: string): boolean {
  if (a === b) return true;
  let i = 0;
  while (i < a.length && i < b.length && a[i] === b[i]) i++;
  return a.slice(i + 1) === b.slice(i + 1) || a.slice(i) === b.slice(i + 1) || a.slice(i + 1) === b.slice(i);
}
