// Fixture-driven diagnostics tests: every notebook in test/fixtures/diagnostics/
// states its expected diagnostics as marker notes (format: test/support/fixtures.ts),
// and the set of actual (line, columns, code) must equal the set of markers, with
// LF and with CRLF line endings. Also: marker lines are trivia, every code is
// covered, ranges stay on one line, examples are clean, and one bad line never
// hides the diagnostics of another (a seeded property test).
import { readdirSync, readFileSync } from 'node:fs';
import { join, relative } from 'node:path';
import { describe, expect, it } from 'vitest';
import { analyse } from '../../server/src/notebook/ide/analysis';
import { DIAGNOSTIC_CODES, type Diagnostic } from '../../server/src/notebook/semantic/codes';
import { MAX_LINE_LENGTH } from '../../server/src/notebook/syntax/parser';
import { tokensOf, type Token } from '../../server/src/notebook/syntax/tree';
import {
  REPO_ROOT,
  describeRanges,
  isMarkerLine,
  loadDiagnosticFixtures,
  parseMarkers,
  rangesOf,
  renderWithMarkers,
  splitTextLines,
  stripMarkerLines,
  toCrlf,
  type MarkedRange,
} from '../support/fixtures';
import { Random } from '../support/random';

const fixtures = loadDiagnosticFixtures();

/** Compares the actual diagnostics of `text` with `markers`; the failure shows the fixture as it would have to be. */
function expectMarkersMatch(name: string, text: string, markers: readonly MarkedRange[]): void {
  const actual = rangesOf(text, analyse(text).diagnostics);
  const hint = `${name}: actual diagnostics, written as markers:\n${renderWithMarkers(text, actual)}\n`;
  expect(describeRanges(actual), hint).toEqual(describeRanges(markers));
}

// ---- the marker format itself ------------------------------------------------------------

describe('marker format (test/support/fixtures.ts)', () => {
  it('reads caret and explicit markers, stacked under one target line', () => {
    const text = ['H2 + O2 -> H2O', '#@ 0-14 unbalanced-elements', '#    ^^ syntax', '# an ordinary note', 'x'].join('\n');
    expect(parseMarkers(text)).toEqual([
      { line: 0, start: 0, endLine: 0, end: 14, code: 'unbalanced-elements' },
      { line: 0, start: 5, endLine: 0, end: 7, code: 'syntax' },
    ]);
  });

  it('marks the nearest previous line that is not a marker, and handles CRLF', () => {
    const text = toCrlf(['a', 'bcdef', '#  ^^ x-y', 'g'].join('\n'));
    expect(parseMarkers(text)).toEqual([{ line: 1, start: 3, endLine: 1, end: 5, code: 'x-y' }]);
  });

  it('rejects malformed, misplaced and out-of-line markers', () => {
    expect(() => parseMarkers('#  ^^ code')).toThrow(/needs a line above/);
    expect(() => parseMarkers('abc\n#  ^^ Code!')).toThrow(/malformed/);
    expect(() => parseMarkers('abc\n#@ 1-9 code')).toThrow(/do not fit/);
    expect(() => parseMarkers('abc\n#@ 2-1 code')).toThrow(/do not fit/);
  });

  it('describes a multi-line range so that it can never equal a marker', () => {
    const text = 'ab\ncd\n';
    const [r] = rangesOf(text, [{ start: 1, end: 3, code: 'syntax' }]);
    expect(r).toEqual({ line: 0, start: 1, endLine: 1, end: 0, code: 'syntax' });
    expect(describeRanges([r])).toEqual(['L1 [1,L2:0) syntax']);
  });
});

// ---- the fixtures ------------------------------------------------------------------------

describe('diagnostic fixtures', () => {
  it('there are fixtures to check', () => {
    expect(fixtures.length).toBeGreaterThanOrEqual(15);
  });

  for (const f of fixtures) {
    it(`${f.name}: the diagnostics are exactly the markers`, () => {
      expectMarkersMatch(f.name, f.text, f.markers);
    });

    it(`${f.name}: the same with CRLF line endings`, () => {
      expectMarkersMatch(`${f.name} (CRLF)`, toCrlf(f.text), f.markers);
    });

    it(`${f.name}: marker lines are notes (trivia): one comment token each, and they change no diagnostic`, () => {
      const analysis = analyse(f.text);
      const lines = splitTextLines(f.text);
      const tokensByLine = new Map<number, Token[]>();
      for (const t of tokensOf(analysis.syntax.tree)) {
        const line = analysis.lines.position(t.start).line;
        const list = tokensByLine.get(line);
        if (list) list.push(t);
        else tokensByLine.set(line, [t]);
      }
      lines.forEach((line, i) => {
        if (!isMarkerLine(line)) return;
        const kinds = (tokensByLine.get(i) ?? []).map((t) => t.kind);
        expect(kinds.filter((k) => k !== 'newline'), `${f.name}:${i + 1}`).toEqual(['comment']);
        expect(tokensByLine.get(i)?.[0].text, `${f.name}:${i + 1}`).toBe(line);
      });
      // Analysing the notebook without its marker lines gives the same diagnostics: same code, same
      // start (line mapped back), same text covered.
      const stripped = stripMarkerLines(f.text);
      const summarise = (text: string, ds: readonly Diagnostic[], lineMap: (l: number) => number): string[] =>
        rangesOf(text, ds)
          .map((r, i) => `L${lineMap(r.line) + 1}:${r.start} ${r.code} ${JSON.stringify(text.slice(ds[i].start, ds[i].end))}`)
          .sort();
      expect(summarise(stripped.text, analyse(stripped.text).diagnostics, (l) => stripped.originalLine[l])).toEqual(
        summarise(f.text, analysis.diagnostics, (l) => l),
      );
    });
  }

  it('clean-*.eqnb fixtures have no markers (they are the zero-diagnostic cases)', () => {
    const clean = fixtures.filter((f) => f.name.startsWith('clean-'));
    expect(clean.length).toBeGreaterThanOrEqual(3);
    for (const f of clean) expect(f.markers, f.name).toEqual([]);
  });

  it('every diagnostic code of the notebook language (parser and semantic checks) is marked in some fixture', () => {
    const marked = new Set([...fixtures.flatMap((f) => f.markers.map((m) => m.code)), ...LONG_LINE_MARKER_CODES]);
    expect([...marked].filter((c) => !(c in DIAGNOSTIC_CODES))).toEqual([]);
    for (const c of LANGUAGE_CODES) expect(DIAGNOSTIC_CODES).toHaveProperty([c]);
    expect(LANGUAGE_CODES.filter((c) => !marked.has(c))).toEqual([]);
  });
});

/**
 * The codes the parser and the semantic checks produce. Codes added to DIAGNOSTIC_CODES for
 * later stages (the equilibrium solve) are not listed here; their fixtures belong with them.
 */
const LANGUAGE_CODES: readonly string[] = [
  'syntax', 'line-too-long', 'unknown-element', 'bad-formula', 'ambiguous-charge', 'unknown-species', 'unknown-phase',
  'phase-mismatch', 'bad-coefficient', 'unbalanced-elements', 'unbalanced-charge', 'no-balance', 'several-balances',
  'bad-quantity', 'unknown-property', 'missing-temperature', 'duplicate-name', 'duplicate-label', 'duplicate-property',
  'reserved-name', 'unknown-label', 'bad-basis', 'same-species-both-sides',
];

// ---- long lines (generated: a 4,001-character line does not belong in a checked-in file) -----

const LONG_LINE_MARKER_CODES = ['line-too-long', 'unbalanced-elements'];

describe('line-too-long', () => {
  const tooLong = MAX_LINE_LENGTH + 1;
  // The notebook is built line by line with its markers, then checked like a fixture.
  const reactionAtLimit = '2 H2 + O2 -> 2 H2O   # ';
  const lines = [
    'species water = H2O (l)',
    'x'.repeat(tooLong), // a statement line one character over the limit
    `#@ 0-${tooLong} line-too-long`,
    'water -> H2O(l)', // still read after the long line
    `  ${'y'.repeat(tooLong)}`, // an over-long property line
    `#@ 0-${tooLong + 2} line-too-long`,
    reactionAtLimit + 'n'.repeat(MAX_LINE_LENGTH - reactionAtLimit.length), // exactly at the limit: read
    'H2 + O2 -> H2O',
    '#@ 0-14 unbalanced-elements',
    '',
  ];
  const text = lines.join('\n');

  it('reports a line over the limit, once, and reads the lines after it', () => {
    expect(lines[6].length).toBe(MAX_LINE_LENGTH);
    expectMarkersMatch('long lines', text, parseMarkers(text, 'long lines'));
  });

  it('the same with CRLF line endings', () => {
    const crlf = toCrlf(text);
    expectMarkersMatch('long lines (CRLF)', crlf, parseMarkers(crlf, 'long lines'));
  });

  it('a note line of any length is a note (the line-too-long message itself says to make a long line a note)', () => {
    const note = `# ${'pasted data '.repeat(Math.ceil(tooLong / 12))}`;
    expect(note.length).toBeGreaterThan(MAX_LINE_LENGTH);
    const notebook = ['H2 + O2 -> H2O', note, '2 H2 + O2 -> 2 H2O', ''].join('\n');
    expect(describeRanges(rangesOf(notebook, analyse(notebook).diagnostics))).toEqual(['L1 [0,14) unbalanced-elements']);
  });
});

// ---- invariants over every fixture and some awkward inputs -----------------------------------

const AWKWARD_INPUTS: readonly [string, string][] = [
  ['a label with nothing after it', 'step1:\n'],
  ['a label then a note', 'step1: # nothing yet\nH2 -> H2\n'],
  ['a label at the end of the text', 'species w = H2O (l)\nstep1:'],
  ['an orphan indented line', '  density 1 g/mL\n'],
  ['an orphan indented line, CRLF', '  density 1 g/mL\r\nH2 -> H2\r\n'],
  ['an over-long line followed by more text', `${'z'.repeat(MAX_LINE_LENGTH + 5)}\nH2 + O2 -> H2O\n`],
  ['bad values on property lines', 'species s = NaCl (s)\n  density -1 g/mL\n  purity 150 %\nbatch b at 25 °C\n  s 2 equiv\n  vessel 1 L\n  volume 2 L\n'],
];

describe('diagnostic ranges', () => {
  const inputs: [string, string][] = [
    ...fixtures.flatMap((f): [string, string][] => [
      [f.name, f.text],
      [`${f.name} (CRLF)`, toCrlf(f.text)],
    ]),
    ...AWKWARD_INPUTS,
  ];

  /** Problems with one diagnostic's range; empty when it is fine. */
  function rangeProblems(text: string, d: Diagnostic, comments: readonly Token[]): string[] {
    const out: string[] = [];
    const covered = text.slice(d.start, d.end);
    if (!(0 <= d.start && d.start <= d.end && d.end <= text.length)) out.push('range outside the text');
    if (/[\r\n]/.test(covered)) out.push(`spans a line break: ${JSON.stringify(covered.slice(0, 60))}`);
    // Only the diagnostics about an `accept:` note itself belong inside a note.
    const aboutANote = d.code === 'unknown-code' || d.code === 'unused-accept';
    if (!aboutANote && comments.some((c) => c.start <= d.start && d.start < c.end)) out.push('starts inside a note');
    return out.map((p) => `${d.code} at ${d.start}-${d.end}: ${p}`);
  }

  for (const [name, text] of inputs) {
    it(`${name}: every diagnostic lies on one line, inside the text, and not in a note`, () => {
      const analysis = analyse(text);
      const commentTokens = [...tokensOf(analysis.syntax.tree)].filter((t) => t.kind === 'comment');
      const problems = analysis.diagnostics.flatMap((d) => rangeProblems(text, d, commentTokens));
      expect(problems).toEqual([]);
    });
  }

  it('diagnostics come sorted by start offset, each with its default severity', () => {
    for (const f of fixtures) {
      const ds = analyse(f.text).diagnostics;
      for (let i = 1; i < ds.length; i++) expect(ds[i].start).toBeGreaterThanOrEqual(ds[i - 1].start);
      for (const d of ds) expect(d.severity, `${f.name} ${d.code}`).toBe(DIAGNOSTIC_CODES[d.code].severity);
    }
  });
});

// ---- messages where the content is the point ------------------------------------------------

describe('balance messages give the per-element numbers', () => {
  it('names each element that is off, with its left and right totals', () => {
    // combustion of propane, standard general-chemistry textbook example, written unbalanced:
    // C3H8 + O2 -> CO2 + H2O has C 3/1, H 8/2, O 2/3 (counted by hand).
    const a = analyse('C3H8(g) + O2(g) -> CO2(g) + H2O(g)\n');
    const d = a.diagnostics.find((x) => x.code === 'unbalanced-elements');
    expect(d?.message).toContain('C: 3 left, 1 right');
    expect(d?.message).toContain('H: 8 left, 2 right');
    expect(d?.message).toContain('O: 2 left, 3 right');
  });

  it('gives the charge on each side with its sign', () => {
    // copper plating half-reaction, standard general-chemistry textbook example, written with one
    // electron: Cu^2+ + e- -> Cu has charge +2 - 1 = +1 on the left and 0 on the right.
    const a = analyse('Cu^2+(aq) + e- -> Cu(s)\n');
    const d = a.diagnostics.find((x) => x.code === 'unbalanced-charge');
    expect(d?.message).toContain('+1 left, 0 right');
    expect(a.diagnostics.map((x) => x.code)).toEqual(['unbalanced-charge']);
  });
});

// ---- the examples --------------------------------------------------------------------------

describe('examples/', () => {
  const examplesDir = join(REPO_ROOT, 'examples');
  const all: string[] = [];
  const walk = (dir: string): void => {
    for (const e of readdirSync(dir, { withFileTypes: true })) {
      const p = join(dir, e.name);
      if (e.isDirectory()) walk(p);
      else if (e.name.endsWith('.eqnb')) all.push(p);
    }
  };
  walk(examplesDir);
  // examples/with-mistakes/ holds the demo draft that is wrong on purpose; every other example is clean.
  const clean = all.filter((p) => !relative(examplesDir, p).startsWith('with-mistakes'));
  const withMistakes = all.filter((p) => relative(examplesDir, p).startsWith('with-mistakes'));

  it('has clean examples to check', () => {
    expect(clean.length).toBeGreaterThanOrEqual(3);
  });

  for (const p of clean) {
    it(`${relative(REPO_ROOT, p)} analyses with no diagnostics but the cautions its notes announce`, () => {
      const text = readFileSync(p, 'utf8');
      const lines = text.split(/\r?\n/);
      // A pressure, gas or heat caution is the point of some examples (a closed autoclave); such a line says
      // "caution" in its note. Anything else is a defect in the example.
      const unexpected = rangesOf(text, analyse(text).diagnostics).filter(
        (r) => !((r.code === 'pressure-caution' || r.code === 'gas-caution' || r.code === 'heat-caution') && /#.*caution/i.test(lines[r.line] ?? '')),
      );
      expect(describeRanges(unexpected)).toEqual([]);
    });
  }

  for (const p of withMistakes) {
    it(`${relative(REPO_ROOT, p)}: exactly the lines noted "mistake" have diagnostics`, () => {
      const text = readFileSync(p, 'utf8');
      const lines = splitTextLines(text);
      const flagged = new Set(rangesOf(text, analyse(text).diagnostics).map((r) => r.line + 1));
      const noted = new Set(lines.flatMap((l, i) => (/#.*\bmistake\b/.test(l) && !l.startsWith('#') ? [i + 1] : [])));
      expect(noted.size).toBeGreaterThan(0);
      expect([...flagged].sort((a, b) => a - b)).toEqual([...noted].sort((a, b) => a - b));
    });
  }
});

// ---- error recovery: a seeded property test --------------------------------------------------

/** Declarations every snippet may use. */
const PREAMBLE = ['species acid = C2H4O2 (l)', 'species water = H2O (l)', '# esterification, standard general-chemistry textbook example', 'esterify: acid + C2H6O(l) <=> C4H8O2(l) + water', '  K = 4.0 at 25 °C'];

/** Independent blocks (distinct names and labels, no automatic labels referenced); `bad` ones must report something. */
const SNIPPETS: readonly { bad: boolean; lines: readonly string[] }[] = [
  { bad: true, lines: ['specie oops = H2O'] },
  { bad: true, lines: ['this line is prose'] },
  { bad: true, lines: ['species bad-name = NaCl (s)'] },
  { bad: true, lines: ['species badel = Zz2 (l)'] },
  { bad: true, lines: ['species amb = Fe3+ (aq)'] },
  { bad: true, lines: ['species crys = NaCl (cr)'] },
  { bad: true, lines: ['H2(g) + O2(g) -> H2O(l)'] },
  { bad: true, lines: ['0 H2 + O2 -> H2O'] },
  { bad: true, lines: ['acid + nothing -> water'] },
  { bad: true, lines: ['lbl-a: H2 + + O2 -> H2O'] },
  { bad: true, lines: ['species lye = NaOH (s)', '  colour white', '  density -1 g/mL'] },
  { bad: true, lines: ['lbl-b: 2 H2(g) + O2(g) -> 2 H2O(l)', '  K = 5'] },
  { bad: true, lines: ['batch bad-1 at -300 °C', '  acid -1 mol', '  uses esterify, nothere'] },
  { bad: true, lines: ['batch at 25 °C'] },
  { bad: true, lines: ['species batch = NaCl (s)'] },
  { bad: true, lines: ['water(g) -> H2O(g)'] },
  { bad: true, lines: ['Fe^2+ -> Fe^3+'] },
  { bad: false, lines: ['species salt = NaCl (s)', '  density 2.16 g/mL'] },
  { bad: false, lines: ['lbl-c: 2 H2(g) + O2(g) -> 2 H2O(l)', '  K = 1e40 at 25 °C'] },
  { bad: false, lines: ['batch good-1 at 25 °C, 1 atm', '  acid 1 mol', '  water 2 equiv', '  uses esterify'] },
  { bad: false, lines: ['# a note'] },
  { bad: false, lines: [''] },
];

/** Diagnostics of the lines [from, from + count), as (line relative to `from`, columns, code). */
function diagnosticsOfBlock(all: readonly MarkedRange[], from: number, count: number): string[] {
  return describeRanges(
    all.filter((r) => r.line >= from && r.line < from + count).map((r) => ({ ...r, line: r.line - from, endLine: r.endLine - from })),
  );
}

function rangesOfText(text: string): MarkedRange[] {
  return rangesOf(text, analyse(text).diagnostics);
}

describe('error recovery: one bad line never hides the diagnostics of another', () => {
  const alone = SNIPPETS.map((s) => diagnosticsOfBlock(rangesOfText([...PREAMBLE, ...s.lines, ''].join('\n')), PREAMBLE.length, s.lines.length));

  it('each snippet on its own: the bad ones report something, the good ones nothing', () => {
    SNIPPETS.forEach((s, i) => {
      if (s.bad) expect(alone[i].length, s.lines.join(' / ')).toBeGreaterThan(0);
      else expect(alone[i], s.lines.join(' / ')).toEqual([]);
    });
  });

  it('in 150 random orders and selections, every snippet reports exactly what it reports alone', () => {
    for (let seed = 1; seed <= 150; seed++) {
      const random = new Random(seed);
      const chosen = random.sample([...SNIPPETS.keys()], random.int(2, SNIPPETS.length));
      const lines = [...PREAMBLE];
      const starts: number[] = [];
      for (const i of chosen) {
        starts.push(lines.length);
        lines.push(...SNIPPETS[i].lines);
      }
      const text = (random.chance(0.5) ? toCrlf : (t: string) => t)(`${lines.join('\n')}\n`);
      const all = rangesOfText(text);
      chosen.forEach((i, k) => {
        const got = diagnosticsOfBlock(all, starts[k], SNIPPETS[i].lines.length);
        expect(got, `seed ${seed}, snippet ${JSON.stringify(SNIPPETS[i].lines)}`).toEqual(alone[i]);
      });
      // Nothing is reported outside the snippets (the preamble stays clean).
      expect(diagnosticsOfBlock(all, 0, PREAMBLE.length), `seed ${seed}`).toEqual([]);
    }
  });
});
