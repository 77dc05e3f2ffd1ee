// Scope tests for the TextMate grammar (syntaxes/eqnb.tmLanguage.json) and checks of
// syntaxes/language-configuration.json. Expectations come from the notebook language spec.
//
// Scopes the grammar assigns (all end in `.eqnb`):
//   comment.line.number-sign            a note, `#` to end of line (whole-line or trailing)
//   punctuation.definition.comment      the `#` itself
//   keyword.other.species               `species` (column 0)
//   keyword.other.batch                 `batch` (column 0)
//   keyword.other.at                    `at` before a temperature / conditions
//   variable.other.property            property keywords on indented lines: K, log K, pK, Kp, Kc,
//                                       ΔG°/dG, ΔH°/dH, ΔS°/dS, ΔCp°/dCp, ΔfG°/dfG, ΔfH°/dfH, S°, Cp°,
//                                       density, purity, vessel, volume, basis, uses
//   entity.name.type.species            the name declared by `species NAME = ...`
//   entity.name.function.label          a reaction label (`esterify:`) and labels listed after `uses`
//   punctuation.separator.label         the `:` after a label
//   entity.name.section.batch           the batch name (`trial-1`)
//   keyword.operator.arrow              `<=>` `⇌` `->` `→`
//   keyword.operator.plus               ` + ` between terms
//   keyword.operator.assignment         `=`
//   constant.numeric.coefficient        a term's coefficient (`2`, `1/2`, `2H2O`) and a hydrate multiplier (`·5H2O`)
//   meta.formula                        a whole formula (only tokens built from real element symbols)
//   support.type.element                an element symbol inside a formula
//   constant.numeric.subscript          digits / Unicode subscripts inside a formula
//   constant.other.charge               `^3+`, `^-`, `²⁺`, bare trailing `+`/`-`
//   constant.language.electron          the electron `e-` / `e⁻`
//   punctuation.section.group.begin/end `(` `[` / `)` `]` inside a formula
//   punctuation.separator.hydrate       `·` `*` `.` inside a hydrate formula
//   storage.modifier.phase              `(g)` `(l)` `(s)` `(aq)`
//   variable.other.species              a term that is an identifier but not a plausible formula (`acid`, `EtOH`)
//   constant.numeric                    a number in a quantity (`0.87`, `-285.8`, `1e-5`)
//   keyword.other.unit                  its unit (`g/mL`, `°C`, `J/(mol K)`, `%`, `equiv`)
//   punctuation.separator.comma         `,`
//   meta.declaration.species, meta.reaction, meta.batch, meta.property, meta.property.batch:
//                                       line / block wrappers
import { readFileSync } from 'node:fs';
import { resolve } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import {
  GRAMMAR_PATH,
  LANGUAGE_CONFIGURATION_PATH,
  SCOPE_NAME,
  loadOnigLib,
  tokenizeLines,
  type ScopedToken,
} from '../support/tokenize';

interface Line {
  readonly text: string;
  readonly tokens: readonly ScopedToken[];
}

async function tokenize(text: string): Promise<Line[]> {
  const texts = text.split('\n');
  const tokens = await tokenizeLines(texts);
  return texts.map((t, i) => ({ text: t, tokens: tokens[i] }));
}

async function line(text: string): Promise<Line> {
  const [only] = await tokenize(text);
  return only;
}

function dump(l: Line): string {
  return [`line: ${JSON.stringify(l.text)}`, ...l.tokens.map((t) => `  ${JSON.stringify(t.text)} ${t.scopes.join(' ')}`)].join('\n');
}

/** Columns of the nth (1-based) occurrence of `sub` in the line. */
function locate(l: Line, sub: string, nth: number): { start: number; end: number } {
  let idx = -1;
  let from = 0;
  for (let i = 0; i < nth; i++) {
    idx = l.text.indexOf(sub, from);
    if (idx < 0) throw new Error(`occurrence ${nth} of ${JSON.stringify(sub)} not found in ${JSON.stringify(l.text)}`);
    from = idx + 1;
  }
  return { start: idx, end: idx + sub.length };
}

function covering(l: Line, sub: string, nth: number): readonly ScopedToken[] {
  const { start, end } = locate(l, sub, nth);
  return l.tokens.filter((t) => t.end > start && t.start < end);
}

/** `sub` (its nth occurrence) is made of whole tokens, each of which carries `scope`. */
function expectScope(l: Line, sub: string, scope: string, nth = 1): void {
  const { start, end } = locate(l, sub, nth);
  const toks = covering(l, sub, nth);
  const aligned = toks.length > 0 && toks[0].start === start && toks[toks.length - 1].end === end;
  expect(aligned, `${JSON.stringify(sub)} is not a whole number of tokens\n${dump(l)}`).toBe(true);
  for (const t of toks) {
    expect(t.scopes, `${JSON.stringify(sub)} (token ${JSON.stringify(t.text)}) lacks ${scope}\n${dump(l)}`).toContain(scope);
  }
}

/** Every token overlapping `sub` carries `scope` (token boundaries not checked: for meta scopes). */
function expectWithin(l: Line, sub: string, scope: string, nth = 1): void {
  for (const t of covering(l, sub, nth)) {
    expect(t.scopes, `${JSON.stringify(sub)} (token ${JSON.stringify(t.text)}) lacks ${scope}\n${dump(l)}`).toContain(scope);
  }
}

/** No token overlapping `sub` has a scope that starts with `scopePrefix`. */
function expectNoScope(l: Line, sub: string, scopePrefix: string, nth = 1): void {
  for (const t of covering(l, sub, nth)) {
    const hit = t.scopes.filter((s) => s.startsWith(scopePrefix));
    expect(hit, `${JSON.stringify(sub)} (token ${JSON.stringify(t.text)}) has ${scopePrefix}\n${dump(l)}`).toEqual([]);
  }
}

/** From `sub` to the end of the line everything is a note and nothing inside it is coloured as notebook syntax. */
function expectNote(l: Line, fromSub: string): void {
  const { start } = locate(l, fromSub, 1);
  const rest = l.tokens.filter((t) => t.end > start);
  expect(rest.length, dump(l)).toBeGreaterThan(0);
  expect(rest[0].start, `note does not start at ${JSON.stringify(fromSub)}\n${dump(l)}`).toBe(start);
  expect(rest[rest.length - 1].end).toBe(l.text.length);
  for (const t of rest) {
    expect(t.scopes, dump(l)).toContain('comment.line.number-sign.eqnb');
    const foreign = t.scopes.filter(
      (s) => s !== SCOPE_NAME && !s.startsWith('meta.') && s !== 'comment.line.number-sign.eqnb' && s !== 'punctuation.definition.comment.eqnb',
    );
    expect(foreign, `note text coloured as syntax\n${dump(l)}`).toEqual([]);
  }
  expectScope(l, '#', 'punctuation.definition.comment.eqnb', l.text.slice(0, start).split('#').length);
}

const SAMPLE = `species acid = C6H12O2 (l)          # a name for a formula, with its phase
species EtOH = C2H5OH (l)
species ester = C8H16O2 (l)
  density 0.87 g/mL                 # property of the species
  purity 98 %

esterify: acid + EtOH <=> ester + H2O(l)
  K = 4.0 at 60 °C
2 H2(g) + O2(g) -> 2 H2O(l)         # label optional
1/2 N2(g) + 3/2 H2(g) ⇌ NH3(g)
Fe^3+(aq) + e- → Fe^2+(aq)
MnO4^-(aq) + 5 Fe²⁺(aq) + 8 H^+(aq) -> Mn^2+(aq) + 5 Fe^3+(aq) + 4 H2O(l)
hydrate: CuSO4·5H2O(s) <=> CuSO4(s) + 5 H2O(g)

batch trial-1 at 60 °C, 1 atm       # a mixture at conditions
  acid 1.0 mol
  EtOH 3 equiv
  vessel 2.5 L
  volume 500 mL
  basis acid
  uses esterify, R2`;

let sample: Line[] = [];

function sampleLine(text: string): Line {
  const found = sample.find((l) => l.text === text);
  if (!found) throw new Error(`sample has no line ${JSON.stringify(text)}`);
  return found;
}

beforeAll(async () => {
  sample = await tokenize(SAMPLE);
});

type Json = null | boolean | number | string | Json[] | { [key: string]: Json };

function isObject(v: Json | undefined): v is { [key: string]: Json } {
  return typeof v === 'object' && v !== null && !Array.isArray(v);
}

function readJson(path: string): Json {
  return JSON.parse(readFileSync(path, 'utf8')) as Json;
}

/** Every regular expression in a grammar (match/begin/end/while), with where it sits. */
function grammarRegexes(node: Json, path: string, out: Array<{ path: string; source: string }>): void {
  if (Array.isArray(node)) {
    node.forEach((child, i) => grammarRegexes(child, `${path}[${i}]`, out));
  } else if (isObject(node)) {
    for (const [key, value] of Object.entries(node)) {
      if ((key === 'match' || key === 'begin' || key === 'end' || key === 'while') && typeof value === 'string') {
        out.push({ path: `${path}.${key}`, source: value });
      } else {
        grammarRegexes(value, `${path}.${key}`, out);
      }
    }
  }
}

function grammarIncludes(node: Json, out: string[]): void {
  if (Array.isArray(node)) node.forEach((child) => grammarIncludes(child, out));
  else if (isObject(node)) {
    for (const [key, value] of Object.entries(node)) {
      if (key === 'include' && typeof value === 'string') out.push(value);
      else grammarIncludes(value, out);
    }
  }
}

describe('grammar and configuration files', () => {
  it('grammar JSON parses and declares scopeName source.eqnb', () => {
    const grammar = readJson(GRAMMAR_PATH);
    expect(isObject(grammar)).toBe(true);
    if (!isObject(grammar)) return;
    expect(grammar.scopeName).toBe('source.eqnb');
    expect(Array.isArray(grammar.patterns)).toBe(true);
  });

  it('every #include names a rule in the repository', () => {
    const grammar = readJson(GRAMMAR_PATH);
    if (!isObject(grammar) || !isObject(grammar.repository)) throw new Error('grammar has no repository');
    const includes: string[] = [];
    grammarIncludes(grammar, includes);
    expect(includes.length).toBeGreaterThan(0);
    const repository = grammar.repository;
    const missing = includes.filter((inc) => !(inc.startsWith('#') && inc.slice(1) in repository));
    expect(missing).toEqual([]);
  });

  it('every regular expression compiles with oniguruma', async () => {
    const onig = await loadOnigLib();
    const regexes: Array<{ path: string; source: string }> = [];
    grammarRegexes(readJson(GRAMMAR_PATH), '$', regexes);
    expect(regexes.length).toBeGreaterThan(10);
    const broken: string[] = [];
    for (const { path, source } of regexes) {
      try {
        onig.createOnigScanner([source]);
      } catch (e) {
        broken.push(`${path}: ${e instanceof Error ? e.message : String(e)}`);
      }
    }
    expect(broken).toEqual([]);
  });

  it('package.json points at these files for language eqnb', () => {
    const pkg = readJson(resolve(GRAMMAR_PATH, '..', '..', 'package.json'));
    if (!isObject(pkg) || !isObject(pkg.contributes)) throw new Error('package.json has no contributes');
    const { grammars, languages } = pkg.contributes;
    expect(grammars).toContainEqual({ language: 'eqnb', scopeName: 'source.eqnb', path: './syntaxes/eqnb.tmLanguage.json' });
    expect(Array.isArray(languages) && languages.some((l) => isObject(l) && l.id === 'eqnb' && l.configuration === './syntaxes/language-configuration.json')).toBe(true);
  });

  it('language configuration JSON parses with # comments, brackets and pairs', () => {
    const conf = readJson(LANGUAGE_CONFIGURATION_PATH);
    if (!isObject(conf)) throw new Error('language configuration is not an object');
    expect(conf.comments).toEqual({ lineComment: '#' });
    expect(conf.brackets).toEqual([
      ['(', ')'],
      ['[', ']'],
    ]);
    expect(conf.autoClosingPairs).toEqual([
      { open: '(', close: ')' },
      { open: '[', close: ']' },
      { open: '"', close: '"' },
    ]);
    expect(conf.surroundingPairs).toEqual([
      ['(', ')'],
      ['[', ']'],
      ['"', '"'],
    ]);
  });
});

describe('language configuration behaviour', () => {
  function config(): { [key: string]: Json } {
    const conf = readJson(LANGUAGE_CONFIGURATION_PATH);
    if (!isObject(conf)) throw new Error('language configuration is not an object');
    return conf;
  }

  function words(text: string): string[] {
    const pattern = config().wordPattern;
    if (typeof pattern !== 'string') throw new Error('wordPattern is not a string');
    return text.match(new RegExp(pattern, 'g')) ?? [];
  }

  it('wordPattern keeps charged formulas, electrons and hyphenated names whole', () => {
    expect(words('Fe^3+(aq) + e- → Fe^2+(aq)')).toEqual(['Fe^3+', 'aq', 'e-', 'Fe^2+', 'aq']);
    expect(words('MnO4^-(aq) + 5 Fe²⁺(aq)')).toEqual(['MnO4^-', 'aq', '5', 'Fe²⁺', 'aq']);
    expect(words('batch trial-1 at 60 °C, 1 atm')).toEqual(['batch', 'trial-1', 'at', '60', '°C', '1', 'atm']);
    expect(words('hydrate: CuSO4·5H2O(s) <=> CuSO4.5H2O(s)')).toEqual(['hydrate', 'CuSO4·5H2O', 's', 'CuSO4.5H2O', 's']);
    expect(words('Na+ + Cl- -> H₂O')).toEqual(['Na+', 'Cl-', 'H₂O']);
  });

  it('wordPattern keeps signed and exponent numbers whole and stops at arrows and units', () => {
    expect(words('  ΔH° = -285.8 kJ/mol')).toEqual(['ΔH°', '-285.8', 'kJ', 'mol']);
    expect(words('  K = 1e-5, 2.5e3 Pa')).toEqual(['K', '1e-5', '2.5e3', 'Pa']);
    expect(words('acid->ester')).toEqual(['acid', 'ester']);
  });

  it('wordPattern never matches an empty string', () => {
    const pattern = config().wordPattern;
    if (typeof pattern !== 'string') throw new Error('wordPattern is not a string');
    for (const text of ['', ' ', '+', '->', '(', '#']) {
      const re = new RegExp(pattern, 'g');
      for (const m of text.matchAll(re)) expect(m[0].length, `empty match in ${JSON.stringify(text)}`).toBeGreaterThan(0);
    }
  });

  it('Enter after a column-0 batch line indents the next line by two spaces', () => {
    const rules = config().onEnterRules;
    if (!Array.isArray(rules)) throw new Error('onEnterRules missing');
    expect(rules).toHaveLength(1);
    const [rule] = rules;
    if (!isObject(rule) || typeof rule.beforeText !== 'string') throw new Error('onEnterRules[0].beforeText missing');
    expect(rule.action).toEqual({ indent: 'none', appendText: '  ' });
    const before = new RegExp(rule.beforeText);
    for (const text of ['batch trial-1 at 60 °C, 1 atm', 'batch', 'batch b2 # note']) expect(before.test(text), text).toBe(true);
    for (const text of ['  batch x', '  acid 1.0 mol', 'species acid = C6H12O2 (l)', 'batches: A -> B', 'batch: A -> B', 'esterify: acid <=> ester']) {
      expect(before.test(text), text).toBe(false);
    }
  });
});

describe('notes', () => {
  it('a whole-line note in column 0 is all comment, even when it looks like a reaction', async () => {
    const l = await line('# note: H2O(l) + Fe^3+ -> 2 acid at 60 °C, species batch K = 1');
    expectNote(l, '#');
    expectNoScope(l, 'H2O', 'support.type.element');
    expectNoScope(l, 'species', 'keyword');
  });

  it('an indented whole-line note is all comment', async () => {
    const l = await line('    # density 0.87 g/mL');
    expectNote(l, '#');
    expectNoScope(l, 'density', 'variable.other.property');
  });

  it('trailing notes after every kind of statement are comments and not formulas', async () => {
    const lines = await tokenize(
      [
        'species acid = C6H12O2 (l)   # acid is C6H12O2',
        'esterify: acid + EtOH <=> ester + H2O(l) # Fe^3+ + e- -> Fe^2+',
        '  K = 4.0 at 60 °C # at 25 °C it is 3.8',
        'batch trial-1 at 60 °C, 1 atm # H2O 1 mol',
        '  acid 1.0 mol # NaCl',
      ].join('\n'),
    );
    expectNote(lines[0], '# acid');
    expectScope(lines[0], '(l)', 'storage.modifier.phase.eqnb');
    expectNote(lines[1], '# Fe');
    expectScope(lines[1], 'H2O', 'meta.formula.eqnb');
    expectNote(lines[2], '# at');
    expectScope(lines[2], '°C', 'keyword.other.unit.eqnb');
    expectNote(lines[3], '# H2O');
    expectScope(lines[3], 'atm', 'keyword.other.unit.eqnb');
    expectNote(lines[4], '# NaCl');
    expectScope(lines[4], 'mol', 'keyword.other.unit.eqnb');
  });

  it('# starts a note even when attached to the text before it', async () => {
    const lines = await tokenize(['2 H2O(l)#liquid water', 'batch b#1', '  K = 4.0#guess'].join('\n'));
    expectScope(lines[0], '(l)', 'storage.modifier.phase.eqnb');
    expectNote(lines[0], '#liquid');
    expectScope(lines[1], 'b', 'entity.name.section.batch.eqnb', 2);
    expectNote(lines[1], '#1');
    expectScope(lines[2], '4.0', 'constant.numeric.eqnb');
    expectNote(lines[2], '#guess');
  });

  it('the sample notes are comments', () => {
    expectNote(sampleLine('species acid = C6H12O2 (l)          # a name for a formula, with its phase'), '# a name');
    expectNote(sampleLine('  density 0.87 g/mL                 # property of the species'), '# property');
    expectNote(sampleLine('2 H2(g) + O2(g) -> 2 H2O(l)         # label optional'), '# label');
    expectNote(sampleLine('batch trial-1 at 60 °C, 1 atm       # a mixture at conditions'), '# a mixture');
  });
});

describe('species declarations', () => {
  it('colours keyword, declared name, = and the formula with its spaced phase', () => {
    const l = sampleLine('species acid = C6H12O2 (l)          # a name for a formula, with its phase');
    expectScope(l, 'species', 'keyword.other.species.eqnb');
    expectScope(l, 'acid', 'entity.name.type.species.eqnb');
    expectNoScope(l, 'acid', 'variable.other.species');
    expectScope(l, '=', 'keyword.operator.assignment.eqnb');
    expectWithin(l, 'C6H12O2', 'meta.formula.eqnb');
    expectScope(l, 'C', 'support.type.element.eqnb');
    expectScope(l, '6', 'constant.numeric.subscript.eqnb');
    expectScope(l, 'H', 'support.type.element.eqnb');
    expectScope(l, '12', 'constant.numeric.subscript.eqnb');
    expectScope(l, '(l)', 'storage.modifier.phase.eqnb');
    expectNoScope(l, '(l)', 'meta.formula');
    expectWithin(l, 'species acid = C6H12O2 (l)', 'meta.declaration.species.eqnb');
  });

  it('a declared name that looks like a formula is still the declared name', () => {
    const l = sampleLine('species EtOH = C2H5OH (l)');
    expectScope(l, 'EtOH', 'entity.name.type.species.eqnb');
    expectNoScope(l, 'EtOH', 'support.type.element');
    expectScope(l, 'O', 'support.type.element.eqnb', 2);
  });

  it('accepts no spaces around = and an attached phase', async () => {
    const l = await line('species salt=NaCl(s)');
    expectScope(l, 'salt', 'entity.name.type.species.eqnb');
    expectScope(l, '=', 'keyword.operator.assignment.eqnb');
    expectScope(l, 'Na', 'support.type.element.eqnb');
    expectScope(l, 'Cl', 'support.type.element.eqnb');
    expectScope(l, '(s)', 'storage.modifier.phase.eqnb');
  });

  it('species properties on indented lines', async () => {
    const lines = await tokenize(
      [
        'species ester = C8H16O2 (l)',
        '  density 0.87 g/mL',
        '  purity 98 %',
        '  ΔfH° = -285.8 kJ/mol',
        '  dfH = -285.8 kJ/mol',
        '  ΔfG° = -237.1 kJ/mol',
        '  dfG -237.1 kJ/mol',
        '  S° = 70 J/(mol K)',
        '  Cp° = 75.3 J/(mol K)',
      ].join('\n'),
    );
    const [, density, purity, dfH1, dfH2, dfG1, dfG2, s, cp] = lines;
    expectScope(density, 'density', 'variable.other.property.eqnb');
    expectScope(density, '0.87', 'constant.numeric.eqnb');
    expectScope(density, 'g/mL', 'keyword.other.unit.eqnb');
    expectScope(purity, 'purity', 'variable.other.property.eqnb');
    expectScope(purity, '98', 'constant.numeric.eqnb');
    expectScope(purity, '%', 'keyword.other.unit.eqnb');
    expectScope(dfH1, 'ΔfH°', 'variable.other.property.eqnb');
    expectScope(dfH1, '-285.8', 'constant.numeric.eqnb');
    expectScope(dfH2, 'dfH', 'variable.other.property.eqnb');
    expectScope(dfG1, 'ΔfG°', 'variable.other.property.eqnb');
    expectScope(dfG2, 'dfG', 'variable.other.property.eqnb');
    expectScope(dfG2, 'kJ/mol', 'keyword.other.unit.eqnb');
    expectScope(s, 'S°', 'variable.other.property.eqnb');
    expectScope(s, 'J/(mol K)', 'keyword.other.unit.eqnb');
    expectScope(cp, 'Cp°', 'variable.other.property.eqnb');
    for (const l of lines.slice(1)) expectWithin(l, l.text, 'meta.property.eqnb');
  });
});

describe('reactions', () => {
  it('label, declared names, plus, reversible arrow, formula with attached phase', () => {
    const l = sampleLine('esterify: acid + EtOH <=> ester + H2O(l)');
    expectScope(l, 'esterify', 'entity.name.function.label.eqnb');
    expectScope(l, ':', 'punctuation.separator.label.eqnb');
    // `ester` first occurs inside the label `esterify`, so its term is the second occurrence.
    for (const [name, nth] of [['acid', 1], ['EtOH', 1], ['ester', 2]] as const) {
      expectScope(l, name, 'variable.other.species.eqnb', nth);
      expectNoScope(l, name, 'meta.formula', nth);
    }
    expectScope(l, '+', 'keyword.operator.plus.eqnb', 1);
    expectScope(l, '+', 'keyword.operator.plus.eqnb', 2);
    expectScope(l, '<=>', 'keyword.operator.arrow.eqnb');
    expectWithin(l, 'H2O', 'meta.formula.eqnb');
    expectScope(l, 'H', 'support.type.element.eqnb', 2);
    expectScope(l, '2', 'constant.numeric.subscript.eqnb');
    expectScope(l, 'O', 'support.type.element.eqnb', 2);
    expectScope(l, '(l)', 'storage.modifier.phase.eqnb');
    expectWithin(l, l.text, 'meta.reaction.eqnb');
  });

  it('unlabelled reaction with spaced coefficients and the one-way ASCII arrow', () => {
    const l = sampleLine('2 H2(g) + O2(g) -> 2 H2O(l)         # label optional');
    expectScope(l, '2', 'constant.numeric.coefficient.eqnb', 1);
    expectScope(l, 'H', 'support.type.element.eqnb', 1);
    expectScope(l, '2', 'constant.numeric.subscript.eqnb', 2);
    expectScope(l, '(g)', 'storage.modifier.phase.eqnb', 1);
    expectScope(l, 'O2', 'meta.formula.eqnb');
    expectScope(l, '(g)', 'storage.modifier.phase.eqnb', 2);
    expectScope(l, '->', 'keyword.operator.arrow.eqnb');
    expectNoScope(l, '->', 'constant.other.charge');
    expectScope(l, '2', 'constant.numeric.coefficient.eqnb', 4);
    expectScope(l, '2', 'constant.numeric.subscript.eqnb', 5);
    expectNoScope(l, 'H2(g)', 'entity.name.function.label');
  });

  it('fraction coefficients and the Unicode reversible arrow', () => {
    const l = sampleLine('1/2 N2(g) + 3/2 H2(g) ⇌ NH3(g)');
    expectScope(l, '1/2', 'constant.numeric.coefficient.eqnb');
    expectScope(l, '3/2', 'constant.numeric.coefficient.eqnb');
    expectScope(l, 'N', 'support.type.element.eqnb');
    expectScope(l, '⇌', 'keyword.operator.arrow.eqnb');
    expectWithin(l, 'NH3', 'meta.formula.eqnb');
    expectScope(l, '3', 'constant.numeric.subscript.eqnb', 2);
  });

  it('caret charges, the electron and the Unicode one-way arrow', () => {
    const l = sampleLine('Fe^3+(aq) + e- → Fe^2+(aq)');
    expectScope(l, 'Fe', 'support.type.element.eqnb', 1);
    expectScope(l, '^3+', 'constant.other.charge.eqnb');
    expectWithin(l, 'Fe^3+', 'meta.formula.eqnb');
    expectScope(l, '(aq)', 'storage.modifier.phase.eqnb', 1);
    expectScope(l, '+', 'keyword.operator.plus.eqnb', 2);
    expectScope(l, 'e-', 'constant.language.electron.eqnb');
    expectNoScope(l, 'e-', 'variable.other.species');
    expectScope(l, '→', 'keyword.operator.arrow.eqnb');
    expectScope(l, '^2+', 'constant.other.charge.eqnb');
    expectScope(l, '(aq)', 'storage.modifier.phase.eqnb', 2);
  });

  it('superscript charges, bare caret signs and coefficients in a long ionic equation', () => {
    const l = sampleLine('MnO4^-(aq) + 5 Fe²⁺(aq) + 8 H^+(aq) -> Mn^2+(aq) + 5 Fe^3+(aq) + 4 H2O(l)');
    expectScope(l, 'Mn', 'support.type.element.eqnb', 1);
    expectScope(l, '4', 'constant.numeric.subscript.eqnb', 1);
    expectScope(l, '^-', 'constant.other.charge.eqnb');
    expectScope(l, '5', 'constant.numeric.coefficient.eqnb', 1);
    expectScope(l, 'Fe', 'support.type.element.eqnb', 1);
    expectScope(l, '²⁺', 'constant.other.charge.eqnb');
    expectWithin(l, 'Fe²⁺', 'meta.formula.eqnb');
    expectScope(l, '8', 'constant.numeric.coefficient.eqnb');
    expectScope(l, '^+', 'constant.other.charge.eqnb');
    expectScope(l, '^2+', 'constant.other.charge.eqnb');
    expectScope(l, '4', 'constant.numeric.coefficient.eqnb', 2);
    expectScope(l, '(l)', 'storage.modifier.phase.eqnb');
  });

  it('hydrate dot, hydrate multiplier and a label', () => {
    const l = sampleLine('hydrate: CuSO4·5H2O(s) <=> CuSO4(s) + 5 H2O(g)');
    expectScope(l, 'hydrate', 'entity.name.function.label.eqnb');
    expectWithin(l, 'CuSO4·5H2O', 'meta.formula.eqnb');
    expectScope(l, 'Cu', 'support.type.element.eqnb');
    expectScope(l, 'S', 'support.type.element.eqnb');
    expectScope(l, '4', 'constant.numeric.subscript.eqnb');
    expectScope(l, '·', 'punctuation.separator.hydrate.eqnb');
    expectScope(l, '5', 'constant.numeric.coefficient.eqnb', 1);
    expectScope(l, '(s)', 'storage.modifier.phase.eqnb');
    expectScope(l, '5', 'constant.numeric.coefficient.eqnb', 2);
  });

  it('ASCII hydrate dots, Unicode subscripts, attached coefficients and bare trailing charges', async () => {
    const l = await line('2H2O + H₂O + CuSO4*5H2O + CuSO4.5H2O -> Na+ + Cl- + NH4+');
    expectScope(l, '2', 'constant.numeric.coefficient.eqnb', 1);
    expectScope(l, 'H', 'support.type.element.eqnb', 1);
    expectScope(l, '2', 'constant.numeric.subscript.eqnb', 2);
    expectScope(l, '₂', 'constant.numeric.subscript.eqnb');
    expectScope(l, '*', 'punctuation.separator.hydrate.eqnb');
    expectScope(l, '.', 'punctuation.separator.hydrate.eqnb');
    expectScope(l, 'Na', 'support.type.element.eqnb');
    expectScope(l, 'Na+', 'meta.formula.eqnb');
    expectScope(l, '+', 'keyword.operator.plus.eqnb', 3);
    expectScope(l, '+', 'constant.other.charge.eqnb', 4);
    expectScope(l, '+', 'keyword.operator.plus.eqnb', 5);
    expectScope(l, '-', 'constant.other.charge.eqnb', 2);
    expectScope(l, '+', 'keyword.operator.plus.eqnb', 6);
    expectScope(l, '+', 'constant.other.charge.eqnb', 7);
  });

  it('bracket groups and a caret charge on a complex ion', async () => {
    const l = await line('step-2: [Cu(NH3)4]^2+ + Ca(OH)2 (s) → Ca^2+ + 2 OH^-');
    expectScope(l, 'step-2', 'entity.name.function.label.eqnb');
    expectScope(l, '[', 'punctuation.section.group.begin.eqnb');
    expectScope(l, '(', 'punctuation.section.group.begin.eqnb');
    expectScope(l, ')', 'punctuation.section.group.end.eqnb');
    expectScope(l, ']', 'punctuation.section.group.end.eqnb');
    expectScope(l, '4', 'constant.numeric.subscript.eqnb');
    expectScope(l, '^2+', 'constant.other.charge.eqnb', 1);
    expectWithin(l, '[Cu(NH3)4]^2+', 'meta.formula.eqnb');
    expectScope(l, 'Ca', 'support.type.element.eqnb');
    expectScope(l, '(s)', 'storage.modifier.phase.eqnb');
    expectNoScope(l, '(s)', 'meta.formula');
    expectScope(l, '^-', 'constant.other.charge.eqnb');
  });

  it('identifiers that are not plausible formulas are species names; real symbols are formulas', async () => {
    const l = await line('Et2O + acid(aq) + Me + K(s) + Co + CO -> NaOH + xyz_1');
    for (const name of ['Et2O', 'acid', 'Me', 'xyz_1']) {
      expectScope(l, name, 'variable.other.species.eqnb');
      expectNoScope(l, name, 'support.type.element');
    }
    expectScope(l, '(aq)', 'storage.modifier.phase.eqnb');
    expectScope(l, 'K', 'support.type.element.eqnb');
    expectScope(l, 'Co', 'support.type.element.eqnb');
    expectScope(l, 'C', 'support.type.element.eqnb', 2);
    expectWithin(l, 'NaOH', 'meta.formula.eqnb');
  });

  it('arrows need no surrounding spaces', async () => {
    const l = await line('A->B');
    expectScope(l, 'A', 'variable.other.species.eqnb');
    expectScope(l, '->', 'keyword.operator.arrow.eqnb');
    const r = await line('acid<=>ester');
    expectScope(r, 'acid', 'variable.other.species.eqnb');
    expectScope(r, '<=>', 'keyword.operator.arrow.eqnb');
    expectScope(r, 'ester', 'variable.other.species.eqnb');
  });
});

describe('reaction properties', () => {
  it('K = value at temperature under a reaction', () => {
    const l = sampleLine('  K = 4.0 at 60 °C');
    expectScope(l, 'K', 'variable.other.property.eqnb');
    expectNoScope(l, 'K', 'support.type.element');
    expectScope(l, '=', 'keyword.operator.assignment.eqnb');
    expectScope(l, '4.0', 'constant.numeric.eqnb');
    expectScope(l, 'at', 'keyword.other.at.eqnb');
    expectScope(l, '60', 'constant.numeric.eqnb');
    expectScope(l, '°C', 'keyword.other.unit.eqnb');
  });

  it.each([
    ['log K', '  log K = -4.76 at 25 °C', '-4.76'],
    ['pK', '  pK = 4.76', '4.76'],
    ['Kp', '  Kp = 2.5e3 Pa', '2.5e3'],
    ['Kc', '  Kc = 1e-5', '1e-5'],
    ['ΔG°', '  ΔG° = -237.1 kJ/mol', '-237.1'],
    ['dG', '  dG = -237.1 kJ/mol', '-237.1'],
    ['ΔH°', '  ΔH° = -285.8 kJ/mol', '-285.8'],
    ['dH', '  dH = -285.8 kJ/mol', '-285.8'],
    ['ΔS°', '  ΔS° = -163.3 J/(mol K)', '-163.3'],
    ['dS', '  dS = -163.3 J/(mol K)', '-163.3'],
    ['ΔCp°', '  ΔCp° = 12 J/(mol K)', '12'],
    ['dCp', '  dCp = 12 J/(mol K)', '12'],
  ])('%s is a property keyword', async (keyword, text, number) => {
    const [, l] = await tokenize(`esterify: acid + EtOH <=> ester + H2O(l)\n${text}`);
    expectScope(l, keyword, 'variable.other.property.eqnb');
    expectScope(l, number, 'constant.numeric.eqnb');
    expectScope(l, '=', 'keyword.operator.assignment.eqnb');
    expectWithin(l, text.trim(), 'meta.property.eqnb');
    expectNoScope(l, text.trim(), 'meta.reaction');
  });
});

describe('batches', () => {
  it('header: keyword, name, at, temperature and pressure with units', () => {
    const l = sampleLine('batch trial-1 at 60 °C, 1 atm       # a mixture at conditions');
    expectScope(l, 'batch', 'keyword.other.batch.eqnb');
    expectScope(l, 'trial-1', 'entity.name.section.batch.eqnb');
    expectScope(l, 'at', 'keyword.other.at.eqnb', 2);
    expectScope(l, '60', 'constant.numeric.eqnb');
    expectScope(l, '°C', 'keyword.other.unit.eqnb');
    expectScope(l, ',', 'punctuation.separator.comma.eqnb');
    expectScope(l, '1', 'constant.numeric.eqnb', 2);
    expectNoScope(l, '1', 'entity.name', 2);
    expectScope(l, 'atm', 'keyword.other.unit.eqnb');
    expectWithin(l, 'batch trial-1', 'meta.batch.eqnb');
  });

  it('amount lines: species name, number, unit', () => {
    const acid = sampleLine('  acid 1.0 mol');
    expectScope(acid, 'acid', 'variable.other.species.eqnb');
    expectScope(acid, '1.0', 'constant.numeric.eqnb');
    expectScope(acid, 'mol', 'keyword.other.unit.eqnb');
    expectWithin(acid, 'acid 1.0 mol', 'meta.batch.eqnb');
    const etoh = sampleLine('  EtOH 3 equiv');
    expectScope(etoh, 'EtOH', 'variable.other.species.eqnb');
    expectScope(etoh, '3', 'constant.numeric.eqnb');
    expectScope(etoh, 'equiv', 'keyword.other.unit.eqnb');
  });

  it('vessel, volume, basis and uses lines', () => {
    const vessel = sampleLine('  vessel 2.5 L');
    expectScope(vessel, 'vessel', 'variable.other.property.eqnb');
    expectScope(vessel, '2.5', 'constant.numeric.eqnb');
    expectScope(vessel, 'L', 'keyword.other.unit.eqnb');
    const volume = sampleLine('  volume 500 mL');
    expectScope(volume, 'volume', 'variable.other.property.eqnb');
    expectScope(volume, '500', 'constant.numeric.eqnb');
    expectScope(volume, 'mL', 'keyword.other.unit.eqnb');
    const basis = sampleLine('  basis acid');
    expectScope(basis, 'basis', 'variable.other.property.eqnb');
    expectScope(basis, 'acid', 'variable.other.species.eqnb');
    const uses = sampleLine('  uses esterify, R2');
    expectScope(uses, 'uses', 'variable.other.property.eqnb');
    expectScope(uses, 'esterify', 'entity.name.function.label.eqnb');
    expectScope(uses, ',', 'punctuation.separator.comma.eqnb');
    expectScope(uses, 'R2', 'entity.name.function.label.eqnb');
    expectNoScope(uses, 'R2', 'meta.formula');
  });

  it('a follow-on batch: `from` and its source, then add, remove and vent lines', async () => {
    const lines = await tokenize(['batch dried from trial-1 at 70 °C', '  remove water 90 %', '  add EtOH 0.5 equiv', '  vent to 2 bar', '  vent'].join('\n'));
    const [header, remove, add, ventTo, vent] = lines;
    expectScope(header, 'batch', 'keyword.other.batch.eqnb');
    expectScope(header, 'dried', 'entity.name.section.batch.eqnb');
    expectScope(header, 'from', 'keyword.other.from.eqnb');
    expectScope(header, 'trial-1', 'entity.name.section.batch.eqnb');
    expectScope(header, '70', 'constant.numeric.eqnb');
    expectScope(remove, 'remove', 'keyword.control.operation.eqnb');
    expectScope(remove, '%', 'keyword.other.unit.eqnb');
    expectScope(add, 'add', 'keyword.control.operation.eqnb');
    expectScope(add, 'EtOH', 'variable.other.species.eqnb');
    expectScope(add, 'equiv', 'keyword.other.unit.eqnb');
    expectScope(ventTo, 'vent', 'keyword.control.operation.eqnb');
    expectScope(ventTo, 'to', 'keyword.other.to.eqnb');
    expectScope(ventTo, 'bar', 'keyword.other.unit.eqnb');
    expectScope(vent, 'vent', 'keyword.control.operation.eqnb');
  });

  it('inside a batch, K and formulas are amounts; a column-0 note does not end the batch', async () => {
    const lines = await tokenize(['batch b2 at 298.15 K, 2 bar', '  K 0.5 mol', '# a note', '  H2O 100 mL', '  NaCl 5 g'].join('\n'));
    const [header, k, note, water, salt] = lines;
    expectScope(header, 'K', 'keyword.other.unit.eqnb');
    expectScope(header, 'bar', 'keyword.other.unit.eqnb');
    expectScope(k, 'K', 'support.type.element.eqnb');
    expectNoScope(k, 'K', 'variable.other.property');
    expectScope(k, 'mol', 'keyword.other.unit.eqnb');
    expectNote(note, '#');
    expectWithin(water, 'H2O', 'meta.formula.eqnb');
    expectWithin(water, 'H2O', 'meta.batch.eqnb');
    expectScope(water, 'mL', 'keyword.other.unit.eqnb');
    expectScope(salt, 'Na', 'support.type.element.eqnb');
    expectScope(salt, 'g', 'keyword.other.unit.eqnb');
  });

  it('the batch ends at the next column-0 statement', async () => {
    const lines = await tokenize(['batch b1', '  acid 1 mol', 'R2: A -> B', '  K = 2.0'].join('\n'));
    const [, , reaction, property] = lines;
    expectNoScope(reaction, 'R2', 'meta.batch');
    expectScope(reaction, 'R2', 'entity.name.function.label.eqnb');
    expectScope(property, 'K', 'variable.other.property.eqnb');
    expectNoScope(property, 'K', 'meta.batch');
  });

  it('a batch without a name does not take `at` as its name', async () => {
    const l = await line('batch at 25 °C');
    expectScope(l, 'at', 'keyword.other.at.eqnb', 2);
    expectNoScope(l, 'at', 'entity.name', 2);
    expectScope(l, '25', 'constant.numeric.eqnb');
  });
});

describe('numbers with units', () => {
  it.each([
    ['0.87', 'g/mL'],
    ['60', '°C'],
    ['1', 'atm'],
    ['2.5', 'L'],
    ['500', 'mL'],
    ['1.0', 'mol'],
    ['3', 'equiv'],
    ['98', '%'],
    ['-285.8', 'kJ/mol'],
    ['70', 'J/(mol K)'],
    ['2.5e3', 'Pa'],
    ['298.15', 'K'],
    ['0.5', 'M'],
    ['1', 'bar'],
  ])('%s %s', async (number, unit) => {
    const l = await line(`  volume ${number} ${unit}`);
    expectScope(l, number, 'constant.numeric.eqnb');
    expectScope(l, unit, 'keyword.other.unit.eqnb');
    expectNoScope(l, number, 'keyword.other.unit');
  });

  it('a number without a unit, and a number directly followed by its unit', async () => {
    const bare = await line('  K = 1e-5');
    expectScope(bare, '1e-5', 'constant.numeric.eqnb');
    expectNoScope(bare, '1e-5', 'keyword.other.unit');
    const attached = await line('  volume 500mL');
    expectScope(attached, '500', 'constant.numeric.eqnb');
    expectScope(attached, 'mL', 'keyword.other.unit.eqnb');
  });

  it('a word after a number that is not a unit is not coloured as one', async () => {
    const l = await line('  K = 4.0 at 60 °C');
    expectNoScope(l, 'at', 'keyword.other.unit');
  });
});
