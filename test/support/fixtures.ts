// Test helper for "tests as data": notebooks whose expected diagnostics are written
// inside them as marker notes, cursor fixtures for hover (`$0`), and Markdown
// snapshots that `UPDATE_SNAPSHOTS=1` rewrites.
//
// Marker format. A marker is a note line (it starts with `#` in column 0, so the
// notebook language reads it as trivia) about the nearest previous line that is
// not itself a marker line (the "target"). Stack several marker lines to mark
// several diagnostics on one target. Two forms:
//
//     combust: C3H8(g) + O2(g) -> CO2(g) + H2O(g)
//     #        ^^^^^^^^^^^^^^^^^^^^^^^^^^^^^^^^^^ unbalanced-elements
//     #@ 0-7 unknown-species
//
// - Caret form `#  ^^^ CODE`: the carets stand under exactly the columns the
//   diagnostic covers on the target line (start column = first caret, end column
//   = one past the last caret).
// - Explicit form `#@ START-END CODE`: columns written as numbers, for what carets
//   cannot show: a range starting in column 0 (the `#` is there) or an empty range.
//
// Columns are 0-based UTF-16 code units, the unit of offsets and of the Language
// Server Protocol; they equal characters for every fixture here (no characters
// outside the Basic Multilingual Plane are marked). END is exclusive.
//
// Multi-line diagnostics: there is no marker form for them, on purpose. A
// diagnostic is about text on one line (the language is line based), and
// diagnostics.test.ts checks that none contains a line break. A diagnostic that
// does span lines can never match a marker, so the fixture comparison reports it
// with its full range (`L3 [0,L4:0)`).
//
// A note whose text starts with `^` or `@` is always read as a marker and must be
// well formed; any other note is an ordinary note.
import { existsSync, readFileSync, readdirSync, writeFileSync } from 'node:fs';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';

export const REPO_ROOT = resolve(dirname(fileURLToPath(import.meta.url)), '..', '..');
export const FIXTURES_DIR = join(REPO_ROOT, 'test', 'fixtures');

/** One expected or actual diagnostic position. Lines 0-based; columns 0-based UTF-16, end exclusive. */
export interface MarkedRange {
  readonly line: number;
  readonly start: number;
  /** Equal to `line` for every marker; an actual diagnostic may end on a later line. */
  readonly endLine: number;
  readonly end: number;
  readonly code: string;
}

export interface DiagnosticFixture {
  /** File name without the directory, e.g. `balance.eqnb`. */
  readonly name: string;
  readonly path: string;
  /** The notebook text exactly as checked in (markers included). */
  readonly text: string;
  readonly markers: readonly MarkedRange[];
}

const CARET_MARKER = /^#( *)(\^+) +([a-z][a-z-]*) *$/;
const EXPLICIT_MARKER = /^#@ (\d+)-(\d+) +([a-z][a-z-]*) *$/;
const MARKER_START = /^#\s*[\^@]/;

/** The lines of a text without their line breaks (`\n` or `\r\n`). */
export function splitTextLines(text: string): string[] {
  return text.split('\n').map((l) => (l.endsWith('\r') ? l.slice(0, -1) : l));
}

export function isMarkerLine(line: string): boolean {
  return MARKER_START.test(line);
}

/** Reads the markers of a fixture text; throws (naming the line) on a malformed or misplaced marker. */
export function parseMarkers(text: string, name = 'fixture'): MarkedRange[] {
  const lines = splitTextLines(text);
  const markers: MarkedRange[] = [];
  let target = -1;
  lines.forEach((line, i) => {
    if (!isMarkerLine(line)) {
      target = i;
      return;
    }
    const where = `${name}:${i + 1}`;
    if (target < 0) throw new Error(`${where}: a marker line needs a line above it to mark`);
    let start: number;
    let end: number;
    let code: string;
    const caret = CARET_MARKER.exec(line);
    const explicit = EXPLICIT_MARKER.exec(line);
    if (caret) {
      start = 1 + caret[1].length;
      end = start + caret[2].length;
      code = caret[3];
    } else if (explicit) {
      start = Number(explicit[1]);
      end = Number(explicit[2]);
      code = explicit[3];
    } else {
      throw new Error(`${where}: malformed marker line ${JSON.stringify(line)}; expected \`#   ^^^ CODE\` or \`#@ START-END CODE\``);
    }
    const targetLength = lines[target].length;
    if (end < start || end > targetLength) {
      throw new Error(`${where}: marker columns ${start}-${end} do not fit line ${target + 1} (length ${targetLength})`);
    }
    markers.push({ line: target, start, endLine: target, end, code });
  });
  return markers;
}

/** Positions of diagnostics given as offsets into `text`. */
export function rangesOf(text: string, diagnostics: readonly { start: number; end: number; code: string }[]): MarkedRange[] {
  const lineStarts = [0];
  for (let i = 0; i < text.length; i++) if (text[i] === '\n') lineStarts.push(i + 1);
  const position = (offset: number): { line: number; column: number } => {
    let lo = 0;
    let hi = lineStarts.length - 1;
    while (lo < hi) {
      const mid = (lo + hi + 1) >> 1;
      if (lineStarts[mid] <= offset) lo = mid;
      else hi = mid - 1;
    }
    return { line: lo, column: offset - lineStarts[lo] };
  };
  return diagnostics.map((d) => {
    const s = position(d.start);
    const e = position(d.end);
    return { line: s.line, start: s.column, endLine: e.line, end: e.column, code: d.code };
  });
}

/** `L12 [4,9) code` (line 1-based as editors show it, columns 0-based as the markers count them). */
export function describeRange(r: MarkedRange): string {
  const end = r.endLine === r.line ? `${r.end}` : `L${r.endLine + 1}:${r.end}`;
  return `L${r.line + 1} [${r.start},${end}) ${r.code}`;
}

/** Sorted descriptions, so two lists compare as multisets with a readable diff. */
export function describeRanges(ranges: readonly MarkedRange[]): string[] {
  const key = (r: MarkedRange): number[] => [r.line, r.start, r.endLine, r.end];
  return [...ranges]
    .sort((a, b) => {
      const ka = key(a);
      const kb = key(b);
      for (let i = 0; i < ka.length; i++) if (ka[i] !== kb[i]) return ka[i] - kb[i];
      return a.code < b.code ? -1 : a.code > b.code ? 1 : 0;
    })
    .map(describeRange);
}

/**
 * The text with its marker lines replaced by markers for `ranges`: what the fixture
 * would look like if the actual diagnostics were the expected ones. Printed when a
 * fixture fails, so a reviewer sees the difference in place.
 */
export function renderWithMarkers(text: string, ranges: readonly MarkedRange[]): string {
  const lines = splitTextLines(text);
  const out: string[] = [];
  lines.forEach((line, i) => {
    if (isMarkerLine(line)) return;
    out.push(line);
    for (const r of ranges.filter((x) => x.line === i)) {
      if (r.endLine !== r.line) out.push(`#@ ${r.start}-? ${r.code}   <- spans to line ${r.endLine + 1}, column ${r.end}`);
      else if (r.start >= 1 && r.end > r.start) out.push(`#${' '.repeat(r.start - 1)}${'^'.repeat(r.end - r.start)} ${r.code}`);
      else out.push(`#@ ${r.start}-${r.end} ${r.code}`);
    }
  });
  return out.join('\n');
}

/** The text without its marker lines, and for each kept line its line number in the original. */
export function stripMarkerLines(text: string): { text: string; originalLine: number[] } {
  const raw = text.split('\n');
  const kept: string[] = [];
  const originalLine: number[] = [];
  raw.forEach((line, i) => {
    const bare = line.endsWith('\r') ? line.slice(0, -1) : line;
    if (isMarkerLine(bare)) return;
    kept.push(line);
    originalLine.push(i);
  });
  return { text: kept.join('\n'), originalLine };
}

/** The same text with every line break written `\r\n`. */
export function toCrlf(text: string): string {
  return text.replace(/\r?\n/g, '\r\n');
}

export function loadDiagnosticFixtures(dir: string = join(FIXTURES_DIR, 'diagnostics')): DiagnosticFixture[] {
  return readdirSync(dir)
    .filter((f) => f.endsWith('.eqnb'))
    .sort()
    .map((name) => {
      const path = join(dir, name);
      const text = readFileSync(path, 'utf8');
      return { name, path, text, markers: parseMarkers(text, name) };
    });
}

// ---- cursor fixtures and snapshots ---------------------------------------------------------

export const CURSOR = '$0';

/** Removes the one `$0` cursor marker from a text and returns the text and the cursor offset. */
export function extractCursor(raw: string, name = 'fixture'): { text: string; offset: number } {
  const at = raw.indexOf(CURSOR);
  if (at < 0) throw new Error(`${name}: no ${CURSOR} cursor marker`);
  if (raw.indexOf(CURSOR, at + 1) >= 0) throw new Error(`${name}: more than one ${CURSOR} cursor marker`);
  return { text: raw.slice(0, at) + raw.slice(at + CURSOR.length), offset: at };
}

export function updatingSnapshots(): boolean {
  return process.env.UPDATE_SNAPSHOTS === '1';
}

/**
 * Compares `actual` with the snapshot file, or (with UPDATE_SNAPSHOTS=1) rewrites the file.
 * Returns the expected text to compare against; a missing snapshot is an error unless updating.
 */
export function snapshotFor(path: string, actual: string): string {
  if (updatingSnapshots()) {
    writeFileSync(path, actual);
    return actual;
  }
  if (!existsSync(path)) throw new Error(`snapshot ${path} is missing: run the tests with UPDATE_SNAPSHOTS=1 and check the new file by hand`);
  return readFileSync(path, 'utf8');
}
