// Parser tests (server/src/notebook/syntax/parser.ts): losslessness as a property
// over hand-written, generated and random junk inputs (the tokens spell out the
// input, ranges are contiguous and nested, parse never throws), and structural
// assertions for each statement kind.
import { readdirSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { analyse } from '../../server/src/notebook/ide/analysis';
import { codeActions } from '../../server/src/notebook/ide/actions';
import { hover } from '../../server/src/notebook/ide/hover';
import { documentSymbols } from '../../server/src/notebook/ide/symbols';
import { parse } from '../../server/src/notebook/syntax/parser';
import {
  tokensOf,
  type BatchNode,
  type FileNode,
  type PropertyNode,
  type ReactionNode,
  type SpeciesNode,
  type StatementNode,
  type SyntaxElement,
  type TermNode,
  type Token,
} from '../../server/src/notebook/syntax/tree';
import { REPO_ROOT, loadDiagnosticFixtures, toCrlf } from '../support/fixtures';
import { Random } from '../support/random';

// ---- inputs ----------------------------------------------------------------------------------

const HAND_WRITTEN: readonly string[] = [
  '',
  '\n',
  '\r\n',
  '\r',
  '#',
  '# only a note',
  '   ',
  '\t\t\n\t',
  'species',
  'species ',
  'species x',
  'species x =',
  'species x = H2O (l) (g) extra',
  'batch',
  'batch b at',
  'batch b at 25 °C, ',
  'batch b at 25 °C,,,',
  'batch b at ,',
  '->',
  ' -> ',
  'a -> b -> c <=> d ⇌ e → f',
  'H2 + + + -> + +',
  '+',
  'lbl:',
  'lbl: ',
  'lbl:#',
  'x:y:z -> w',
  ':',
  '2',
  '2 -> 3',
  '1/2O2 + 2H2O(l) -> 3/4 X (aq)',
  'H2O(l)(g) -> H2O',
  'K = 4 at',
  '  K = 4 at 25 °C',
  'R1: A -> B\n  K = \n  K\n  log K =\n  log\n  =\n  uses ,,,\n',
  'batch b at 25 °C\n  basis\n  basis ,\n  uses a,,b, ,c\n  x\n  x (g)\n  x(g) 1\n  (g) 1 mol\n',
  'species a = b\n\n\n# x\n  density\n#\n\tpurity 5 %\n',
  '#species a = H2O\nspecies b = H2O#(l)\n',
  'Fe³⁺ + e⁻ → Fe²⁺\r\n\r\n  K = 1 at 25 °C\r\n',
  'species 😀 = H2O\n😀 -> 😀\nbatch 😀 at 25 😀\n  😀 1 😀\n',
  'a\u00a0->\u00a0b\n\u00a0 K = 1 at 1 K\n',
  'x'.repeat(4001),
  `${'y'.repeat(4100)}\n  ${'z'.repeat(4100)}\r\n# ${'n'.repeat(5000)}`,
];

function allInputs(): [string, string][] {
  const out: [string, string][] = HAND_WRITTEN.map((t, i) => [`hand-written #${i}`, t]);
  for (const f of loadDiagnosticFixtures()) {
    out.push([f.name, f.text], [`${f.name} (CRLF)`, toCrlf(f.text)]);
  }
  const examples = join(REPO_ROOT, 'examples');
  for (const name of readdirSync(examples).filter((n) => n.endsWith('.eqnb'))) {
    out.push([`examples/${name}`, readFileSync(join(examples, name), 'utf8')]);
  }
  return out;
}

/** Pieces that random texts are made of: language fragments, Unicode, line breaks, junk. */
const PIECES = [
  'species ', 'batch ', ' at ', 'at', '=', ' + ', '+', '->', '<=>', '⇌', '→', '#', '# note', '\n', '\r\n', '\r', '\t', ' ', '  ',
  'H2O', '(l)', '(aq)', ' (g)', '(xyz)', '(', ')', '[', ']', 'Fe³⁺', 'SO₄²⁻', '·', '2', '1/2', '0.5', '-', '−', ',', ':', 'K = ',
  'log K', 'mol', '°C', 'g/mL', '%', 'equiv', 'uses ', 'basis ', 'vessel ', 'x', 'R1', 'lbl:', '1e400', 'NaN', 'é', '😀', '\u00a0',
  'e-', '^', '^2+', '\u200b', '\ufeff', '\ud800', '\udc00', '\0', '\\', '"', '`',
];

function randomPieces(random: Random): string {
  let s = '';
  for (let n = random.int(0, 40); n > 0; n--) s += random.pick(PIECES);
  return s;
}

/** Random UTF-16 code units, lone surrogates included. */
function randomCodeUnits(random: Random): string {
  const units: number[] = [];
  for (let n = random.int(0, 60); n > 0; n--) {
    units.push(random.chance(0.5) ? random.pick([10, 13, 9, 32, 35, 40, 41, 43, 45, 58, 61, 62]) : random.int(0, 0xffff));
  }
  return String.fromCharCode(...units);
}

/** A fixture line with a few random characters deleted, duplicated or replaced. */
function mutatedNotebook(random: Random, base: string): string {
  let s = base;
  for (let n = random.int(1, 6); n > 0; n--) {
    const at = random.int(0, s.length);
    const op = random.int(0, 2);
    if (op === 0) s = s.slice(0, at) + s.slice(at + random.int(1, 5));
    else if (op === 1) s = s.slice(0, at) + random.pick(PIECES) + s.slice(at);
    else s = s.slice(0, at) + s.slice(at, at + 3) + s.slice(at);
  }
  return s;
}

function generatedInputs(): [string, string][] {
  const out: [string, string][] = [];
  const bases = loadDiagnosticFixtures().map((f) => f.text);
  for (let seed = 1; seed <= 400; seed++) {
    const random = new Random(seed);
    out.push([`pieces seed ${seed}`, randomPieces(random)]);
    out.push([`code units seed ${seed}`, randomCodeUnits(random)]);
    if (seed <= 150) out.push([`mutated seed ${seed}`, mutatedNotebook(random, random.pick(bases))]);
  }
  return out;
}

// ---- structural checks -------------------------------------------------------------------------

/** Problems with the tree of `text`; empty when the tree is lossless and well nested. */
function losslessProblems(text: string, tree: FileNode): string[] {
  const problems: string[] = [];
  if (tree.start !== 0 || tree.end !== text.length) problems.push(`file covers ${tree.start}-${tree.end}, text is 0-${text.length}`);
  let joined = '';
  let pos = 0;
  for (const t of tokensOf(tree)) {
    if (t.start !== pos) problems.push(`token ${t.kind} starts at ${t.start}, previous ended at ${pos}`);
    if (t.end < t.start) problems.push(`token ${t.kind} ends before it starts`);
    if (t.text !== text.slice(t.start, t.end)) problems.push(`token ${t.kind} at ${t.start} has text ${JSON.stringify(t.text)}`);
    joined += t.text;
    pos = t.end;
  }
  if (pos !== text.length) problems.push(`tokens end at ${pos}, text at ${text.length}`);
  if (joined !== text) problems.push('the tokens do not spell out the text');
  const walk = (node: SyntaxElement): void => {
    if (node.type === 'token') return;
    let at = node.start;
    for (const child of node.children) {
      if (child.start !== at) problems.push(`${node.type} ${node.start}-${node.end}: child ${child.type} starts at ${child.start}, expected ${at}`);
      at = child.end;
      walk(child);
    }
    if (at !== node.end) problems.push(`${node.type} ${node.start}-${node.end}: children end at ${at}`);
  };
  walk(tree);
  // Named fields point at elements that are in the tree.
  const inTree = new Set<SyntaxElement>();
  const collect = (e: SyntaxElement): void => {
    inTree.add(e);
    if (e.type !== 'token') e.children.forEach(collect);
  };
  collect(tree);
  for (const s of tree.statements) if (!tree.children.includes(s)) problems.push(`statement ${s.type} at ${s.start} is not a child of the file`);
  for (const s of tree.statements) {
    if (s.type === 'reaction') {
      for (const t of [...s.left, ...s.right, s.arrow, s.label, s.colon]) if (t && !inTree.has(t)) problems.push(`reaction field at ${t.start} is not in the tree`);
    }
    if (s.type === 'species' || s.type === 'reaction' || s.type === 'batch') {
      for (const p of s.properties) if (!inTree.has(p)) problems.push(`property line at ${p.start} is not in the tree`);
    }
  }
  return problems;
}

describe('parse is lossless and never throws', () => {
  const inputs = [...allInputs(), ...generatedInputs()];

  it(`for ${inputs.length} hand-written, fixture, example, generated and random junk inputs`, () => {
    const failures: string[] = [];
    for (const [name, text] of inputs) {
      let problems: string[];
      try {
        const { tree } = parse(text);
        problems = losslessProblems(text, tree);
      } catch (e) {
        problems = [`threw ${e instanceof Error ? e.message : String(e)}`];
      }
      if (problems.length > 0) failures.push(`${name} ${JSON.stringify(text.slice(0, 80))}: ${problems.slice(0, 3).join('; ')}`);
    }
    expect(failures).toEqual([]);
  });

  it('the whole analysis (model, diagnostics, outline) never throws on the same inputs', () => {
    const failures: string[] = [];
    for (const [name, text] of inputs) {
      try {
        const a = analyse(text);
        documentSymbols(a);
        codeActions(a, 0, text.length);
      } catch (e) {
        failures.push(`${name} ${JSON.stringify(text.slice(0, 80))}: ${e instanceof Error ? e.message : String(e)}`);
      }
    }
    expect(failures).toEqual([]);
  });

  it('hover and code actions never throw at any offset of a sample of inputs', () => {
    const random = new Random(7);
    const sample = random.sample(
      inputs.filter(([, t]) => t.length < 3000),
      60,
    );
    const failures: string[] = [];
    for (const [name, text] of sample) {
      const a = analyse(text);
      for (let offset = 0; offset <= text.length; offset++) {
        try {
          hover(a, offset);
          codeActions(a, offset, offset);
        } catch (e) {
          failures.push(`${name} at ${offset}: ${e instanceof Error ? e.message : String(e)}`);
          break;
        }
      }
    }
    expect(failures).toEqual([]);
  });

  it('no token is empty (every token holds at least one character)', () => {
    const failures: string[] = [];
    for (const [name, text] of inputs) {
      const empty = tokensOf(parse(text).tree).filter((t) => t.start === t.end);
      if (empty.length > 0) failures.push(`${name} ${JSON.stringify(text.slice(0, 60))}: empty ${empty[0].kind} token at ${empty[0].start}`);
    }
    expect(failures).toEqual([]);
  });

  it('syntax errors lie inside the text', () => {
    for (const [name, text] of inputs) {
      for (const e of parse(text).errors) {
        expect(0 <= e.start && e.start <= e.end && e.end <= text.length, `${name}: ${e.start}-${e.end}`).toBe(true);
      }
    }
  });
});

// ---- statements ------------------------------------------------------------------------------

function only<T extends StatementNode['type']>(text: string, type: T): Extract<StatementNode, { type: T }> {
  const { tree } = parse(text);
  const found = tree.statements.filter((s) => s.type === type);
  expect(found).toHaveLength(1);
  return found[0] as Extract<StatementNode, { type: T }>;
}

function kinds(node: SyntaxElement): string[] {
  return tokensOf(node).map((t) => `${t.kind}:${t.text}`);
}

function termSummary(t: TermNode): { coefficient?: string; species: string; phase?: string } {
  return {
    ...(t.coefficient ? { coefficient: t.coefficient.text } : {}),
    species: t.species.text,
    ...(t.phase ? { phase: t.phase.text } : {}),
  };
}

describe('species declarations', () => {
  it('reads name, formula and a detached phase', () => {
    const s: SpeciesNode = only('species water = H2O (l)\n', 'species');
    expect(s.keyword.text).toBe('species');
    expect(s.name?.text).toBe('water');
    expect(s.equals?.text).toBe('=');
    expect(s.formula?.kind).toBe('formula');
    expect(s.formula?.text).toBe('H2O');
    expect(s.phase?.text).toBe('(l)');
    expect(s.properties).toEqual([]);
  });

  it('reads a phase attached to the formula, and keeps a trailing note out of the formula', () => {
    const s: SpeciesNode = only('species ferric = Fe³⁺(aq)# iron(III)\n', 'species');
    expect(s.formula?.text).toBe('Fe³⁺');
    expect(s.phase?.text).toBe('(aq)');
    expect(kinds(s)).toContain('comment:# iron(III)');
  });

  it('has no phase when none is written', () => {
    const s: SpeciesNode = only('species salt = CuSO4·5H2O\n', 'species');
    expect(s.formula?.text).toBe('CuSO4·5H2O');
    expect(s.phase).toBeUndefined();
  });

  it('attaches indented property lines, across notes and blank lines, with keys and values', () => {
    const text = 'species ester = C8H16O2 (l)\n# a note\n\n  density 0.87 g/mL   # measured\n\tpurity 98 %\nspecies water = H2O (l)\n  density 1.0 g/mL\n';
    const { tree } = parse(text);
    const [ester, water] = tree.statements as SpeciesNode[];
    expect(ester.properties.map((p) => (p as PropertyNode).keyText)).toEqual(['density', 'purity']);
    const density = ester.properties[0] as PropertyNode;
    expect(density.value?.number.text).toBe('0.87');
    expect(density.value?.unit?.text).toBe('g/mL');
    const purity = ester.properties[1] as PropertyNode;
    expect(purity.value?.number.text).toBe('98');
    expect(purity.value?.unit?.text).toBe('%');
    expect(water.properties.map((p) => (p as PropertyNode).keyText)).toEqual(['density']);
    // The note and blank line between the header and its properties belong to the statement.
    expect(ester.start).toBe(0);
    expect(ester.end).toBe(text.indexOf('species water'));
  });
});

describe('reactions', () => {
  it('reads a label, its colon, the arrow and the terms', () => {
    const r: ReactionNode = only('esterify: acid + EtOH <=> ester + water\n', 'reaction');
    expect(r.label?.text).toBe('esterify');
    expect(r.colon?.text).toBe(':');
    expect(r.arrow.text).toBe('<=>');
    expect(r.left.map(termSummary)).toEqual([{ species: 'acid' }, { species: 'EtOH' }]);
    expect(r.right.map(termSummary)).toEqual([{ species: 'ester' }, { species: 'water' }]);
  });

  it('reads a label with `-`, `_` and a space before the colon; no label without a colon', () => {
    expect(only('step_2-b : A -> B\n', 'reaction').label?.text).toBe('step_2-b');
    const r: ReactionNode = only('H2 + O2 -> H2O\n', 'reaction');
    expect(r.label).toBeUndefined();
    expect(r.colon).toBeUndefined();
  });

  it.each([
    ['->', '->'],
    ['<=>', '<=>'],
    ['⇌', '⇌'],
    ['→', '→'],
  ])('reads the arrow %s', (arrow, text) => {
    expect(only(`A ${arrow} B\n`, 'reaction').arrow.text).toBe(text);
  });

  it('reads coefficients detached, attached, as fractions and as decimals', () => {
    const r: ReactionNode = only('2 H2 + 2H2O + 1/2 O2 + 1/2O2 + 0.5 N2 + .5Cl2 + −2 Ar -> X\n', 'reaction');
    expect(r.left.map(termSummary)).toEqual([
      { coefficient: '2', species: 'H2' },
      { coefficient: '2', species: 'H2O' },
      { coefficient: '1/2', species: 'O2' },
      { coefficient: '1/2', species: 'O2' },
      { coefficient: '0.5', species: 'N2' },
      { coefficient: '.5', species: 'Cl2' },
      { coefficient: '−2', species: 'Ar' },
    ]);
    for (const t of r.left) expect(t.coefficient?.kind).toBe('coefficient');
  });

  it('does not take the digits of a formula as a coefficient', () => {
    const r: ReactionNode = only('H2O2 -> H2O + O2\n', 'reaction');
    expect(r.left.map(termSummary)).toEqual([{ species: 'H2O2' }]);
  });

  it('reads phases attached and detached, and a coefficient with both', () => {
    const r: ReactionNode = only('2 H2O(l) + 3 CO2 (g) + NaCl (aq) -> Y(s)\n', 'reaction');
    expect(r.left.map(termSummary)).toEqual([
      { coefficient: '2', species: 'H2O', phase: '(l)' },
      { coefficient: '3', species: 'CO2', phase: '(g)' },
      { species: 'NaCl', phase: '(aq)' },
    ]);
    expect(r.right.map(termSummary)).toEqual([{ species: 'Y', phase: '(s)' }]);
    // A term node covers its coefficient, species and phase, spaces between included.
    const co2 = r.left[1];
    expect(tokensOf(co2).map((t) => t.text).join('')).toBe('3 CO2 (g)');
  });

  it('reads an electron and charges as species', () => {
    const r: ReactionNode = only('MnO4^-(aq) + 8 H^+(aq) + 5 e- -> Mn^2+(aq) + 4 H2O(l)\n', 'reaction');
    expect(r.left.map(termSummary)).toEqual([
      { species: 'MnO4^-', phase: '(aq)' },
      { coefficient: '8', species: 'H^+', phase: '(aq)' },
      { coefficient: '5', species: 'e-' },
    ]);
  });

  it('attaches K lines (and log K as a two-word key) to the reaction above, across notes', () => {
    const text = 'loop: N2(g) + 3 H2(g) ⇌ 2 NH3(g)\n# data\n  K = 6.0e5 at 25 °C\n\n  log K = 5.78 at 25 °C\n';
    const r: ReactionNode = only(text, 'reaction');
    const [k, logK] = r.properties as PropertyNode[];
    expect(k.key.map((t) => t.text)).toEqual(['K']);
    expect(k.equals?.text).toBe('=');
    expect(k.value?.number.text).toBe('6.0e5');
    expect(k.value?.unit).toBeUndefined();
    expect(k.at?.text).toBe('at');
    expect(k.temperature?.number.text).toBe('25');
    expect(k.temperature?.unit?.text).toBe('°C');
    expect(logK.key.map((t) => t.text)).toEqual(['log', 'K']);
    expect(logK.keyText).toBe('log K');
    expect(logK.value?.number.text).toBe('5.78');
  });

  it('a property line belongs to the nearest statement above it, not to an earlier one', () => {
    const text = 'A -> B\n  K = 1 at 25 °C\nspecies s = NaCl (s)\n  density 2.16 g/mL\nC -> D\n# note\n  K = 2 at 30 °C\n';
    const { tree } = parse(text);
    const shape = tree.statements.map((s) => `${s.type}:${'properties' in s ? s.properties.map((p) => (p.type === 'property' ? p.keyText : p.type)).join(',') : ''}`);
    expect(shape).toEqual(['reaction:K', 'species:density', 'reaction:K']);
    const last = tree.statements[2] as ReactionNode;
    expect((last.properties[0] as PropertyNode).value?.number.text).toBe('2');
  });
});

describe('batches', () => {
  it('reads a header with temperature and pressure', () => {
    const b: BatchNode = only('batch trial-1 at 60 °C, 1 atm   # first pass\n', 'batch');
    expect(b.keyword.text).toBe('batch');
    expect(b.name?.text).toBe('trial-1');
    expect(b.at?.text).toBe('at');
    expect(b.temperature?.number.text).toBe('60');
    expect(b.temperature?.unit?.text).toBe('°C');
    expect(b.pressure?.number.text).toBe('1');
    expect(b.pressure?.unit?.text).toBe('atm');
  });

  it('reads a header without pressure, and a unit glued to its number', () => {
    const b: BatchNode = only('batch trial-2 at 75°C\n', 'batch');
    expect(b.pressure).toBeUndefined();
    expect(b.temperature?.number.text).toBe('75');
    expect(b.temperature?.unit?.text).toBe('°C');
  });

  it('reads amount lines (with and without phase) and keyword lines', () => {
    const text = 'batch b at 25 °C, 2 bar\n  acid 1.0 mol\n  H2O(l) 3 equiv\n  CO2 (g) 0.5 bar\n  volume 300 mL\n  vessel 1 L\n  basis acid\n  uses esterify, R2\n';
    const b: BatchNode = only(text, 'batch');
    const amounts = b.properties.filter((p) => p.type === 'amount');
    expect(
      amounts.map((a) => (a.type === 'amount' ? [a.species.text, a.phase?.text, a.value?.number.text, a.value?.unit?.text] : [])),
    ).toEqual([
      ['acid', undefined, '1.0', 'mol'],
      ['H2O', '(l)', '3', 'equiv'],
      ['CO2', '(g)', '0.5', 'bar'],
    ]);
    const props = b.properties.filter((p): p is PropertyNode => p.type === 'property');
    expect(props.map((p) => p.keyText)).toEqual(['volume', 'vessel', 'basis', 'uses']);
    expect(props[2].names.map((n) => n.text)).toEqual(['acid']);
    expect(props[3].names.map((n) => n.text)).toEqual(['esterify', 'R2']);
    expect(props[3].value).toBeUndefined();
  });

  it('a batch name may not contain spaces; a missing `at` is a syntax error', () => {
    expect(parse('batch run 3 at 25 °C\n').errors.map((e) => e.code)).toEqual(['syntax']);
    expect(parse('batch run-3\n').errors.map((e) => e.code)).toEqual(['syntax']);
  });
});

describe('lines that are not statements', () => {
  it('keeps an unreadable line as an error node and goes on with the next line', () => {
    const { tree, errors } = parse('this is prose\nH2 + O2 -> H2O\n');
    expect(tree.statements.map((s) => s.type)).toEqual(['error-line', 'reaction']);
    expect(errors).toHaveLength(1);
    expect(errors[0].code).toBe('syntax');
  });

  it('reads note lines and blank lines as trivia: no statements, no errors', () => {
    const { tree, errors } = parse('# a\n\n   # b\n\t\n#^^^ not a statement\n');
    expect(tree.statements).toEqual([]);
    expect(errors).toEqual([]);
    expect(new Set(tokensOf(tree).map((t) => t.kind))).toEqual(new Set(['comment', 'newline', 'whitespace']));
  });

  it('splits CRLF: the newline token is `\\r\\n` and notes and values do not include the `\\r`', () => {
    const { tree } = parse('A -> B # n\r\n  K = 4 at 25 °C\r\n');
    const tokens: Token[] = tokensOf(tree);
    expect(tokens.filter((t) => t.kind === 'newline').map((t) => t.text)).toEqual(['\r\n', '\r\n']);
    expect(tokens.find((t) => t.kind === 'comment')?.text).toBe('# n');
    expect(tokens.find((t) => t.kind === 'unit')?.text).toBe('°C');
  });

  it('a label with nothing after it: one syntax error, not on the note, and no empty token', () => {
    const text = 'step1:   # to be written\n';
    const { tree, errors } = parse(text);
    expect(errors).toHaveLength(1);
    expect(errors[0].end).toBeLessThanOrEqual(text.indexOf('#'));
    expect(tokensOf(tree).filter((t) => t.start === t.end)).toEqual([]);
  });
});
