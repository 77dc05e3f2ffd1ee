// CLI tests: `runCli(argv, io)` in-process with a capturing io (JSON shapes of
// check/balance/formula, exit codes 0/1/2, folders), and one test that spawns the
// built dist/cli.js to check real exit codes and that stderr never shows a stack trace.
import { spawnSync } from 'node:child_process';
import { existsSync, mkdirSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { runCli } from '../../server/src/cli/commands';
import { REPO_ROOT } from '../support/fixtures';

interface Run {
  readonly code: number;
  readonly out: string;
  readonly err: string;
}

function run(...argv: string[]): Run {
  const out: string[] = [];
  const err: string[] = [];
  const code = runCli(argv, { out: (t) => out.push(t), err: (t) => err.push(t) });
  return { code, out: out.join('\n'), err: err.join('\n') };
}

function json(r: Run): unknown {
  return JSON.parse(r.out);
}

/** A Node stack trace line, or an uncaught error header. */
const STACK_TRACE = /^\s+at .+[(:]\d+|^\w*Error: |node:internal/m;

let dir: string;
const file = (...parts: string[]): string => join(dir, ...parts);

// An invented scenario, "Fieldgate bench notes"; the equations are sourced where they are written.
const CLEAN = [
  'species water = H2O (l)',
  '# synthesis of water, standard general-chemistry textbook example',
  '2 H2(g) + O2(g) -> 2 water',
  '',
].join('\n');
const WITH_ERROR = [
  '# combustion of propane, standard general-chemistry textbook example, written unbalanced',
  'combust: C3H8(g) + O2(g) -> CO2(g) + H2O(g)',
  'batch 😀 at 25 fish',
  '',
].join('\n');
const WARNING_ONLY = ['species w = H2O (l)', 'species w = H2O (g)', ''].join('\n');

beforeAll(() => {
  dir = mkdtempSync(join(tmpdir(), 'stillpoint-cli-'));
  writeFileSync(file('clean.eqnb'), CLEAN);
  writeFileSync(file('with-error.eqnb'), WITH_ERROR);
  writeFileSync(file('warning-only.eqnb'), WARNING_ONLY);
  mkdirSync(file('folder', 'nested', 'deeper'), { recursive: true });
  writeFileSync(file('folder', 'a.eqnb'), CLEAN);
  writeFileSync(file('folder', 'nested', 'b.eqnb'), CLEAN);
  writeFileSync(file('folder', 'nested', 'deeper', 'c.eqnb'), WITH_ERROR);
  writeFileSync(file('folder', 'nested', 'readme.txt'), 'this is not a notebook -> and would not parse as one\n');
  writeFileSync(file('folder', 'nested', 'd.eqnb.bak'), WITH_ERROR);
  mkdirSync(file('clean-folder', 'sub'), { recursive: true });
  writeFileSync(file('clean-folder', 'sub', 'e.eqnb'), CLEAN);
  writeFileSync(file('bom.eqnb'), `\ufeff${CLEAN}`);
  writeFileSync(file('binary.eqnb'), Buffer.from([0xff, 0xfe, 0x00, 0x01, 0x80, 0x0a, 0xc3, 0x28]));
});

afterAll(() => {
  if (dir) rmSync(dir, { recursive: true, force: true });
});

// ---- check -----------------------------------------------------------------------------------

describe('check', () => {
  it('--json on a clean file: exit 0 and exactly {"files":[{"file","diagnostics":[]}]}', () => {
    const r = run('check', file('clean.eqnb'), '--json');
    expect(r.code).toBe(0);
    expect(r.err).toBe('');
    expect(json(r)).toEqual({ files: [{ file: file('clean.eqnb'), diagnostics: [] }] });
  });

  it('--json with errors: exit 1; each diagnostic is exactly {line, column, endLine, endColumn, severity, code, message}, 1-based', () => {
    const r = run('check', '--json', file('with-error.eqnb'));
    expect(r.code).toBe(1);
    const message = expect.any(String);
    expect(json(r)).toEqual({
      files: [
        {
          file: file('with-error.eqnb'),
          diagnostics: [
            // `C3H8(g) + O2(g) -> CO2(g) + H2O(g)` is columns 10 to 43 of line 2
            { line: 2, column: 10, endLine: 2, endColumn: 44, severity: 'error', code: 'unbalanced-elements', message },
            // columns count Unicode characters: the emoji is one column, though two UTF-16 units
            { line: 3, column: 7, endLine: 3, endColumn: 8, severity: 'error', code: 'syntax', message },
            { line: 3, column: 15, endLine: 3, endColumn: 19, severity: 'error', code: 'bad-quantity', message },
          ],
        },
      ],
    });
    const d = (json(r) as { files: { diagnostics: { message: string }[] }[] }).files[0].diagnostics;
    for (const x of d) expect(x.message.length).toBeGreaterThan(0);
  });

  it('text output: FILE:LINE:COLUMN: SEVERITY CODE: MESSAGE per diagnostic, then a summary', () => {
    const r = run('check', file('with-error.eqnb'), file('clean.eqnb'));
    expect(r.code).toBe(1);
    const lines = r.out.split('\n');
    expect(lines).toHaveLength(4);
    expect(lines[0].startsWith(`${file('with-error.eqnb')}:2:10: error unbalanced-elements: `)).toBe(true);
    expect(lines[1].startsWith(`${file('with-error.eqnb')}:3:7: error syntax: `)).toBe(true);
    expect(lines[2].startsWith(`${file('with-error.eqnb')}:3:15: error bad-quantity: `)).toBe(true);
    expect(lines[3]).toBe('checked 2 notebooks: 3 errors, 0 warnings, 1 clean');
  });

  it('warnings alone do not fail the check (exit 0)', () => {
    const r = run('check', file('warning-only.eqnb'), '--json');
    expect(r.code).toBe(0);
    expect(json(r)).toEqual({
      files: [
        {
          file: file('warning-only.eqnb'),
          diagnostics: [{ line: 2, column: 9, endLine: 2, endColumn: 10, severity: 'warning', code: 'duplicate-name', message: expect.any(String) }],
        },
      ],
    });
  });

  it('a folder means every .eqnb file under it, at any depth, and nothing else', () => {
    const r = run('check', file('folder'), '--json');
    expect(r.code).toBe(1); // c.eqnb has errors
    const files = (json(r) as { files: { file: string; diagnostics: unknown[] }[] }).files;
    expect(files.map((f) => f.file).sort()).toEqual(
      [file('folder', 'a.eqnb'), file('folder', 'nested', 'b.eqnb'), file('folder', 'nested', 'deeper', 'c.eqnb')].sort(),
    );
    expect(files.find((f) => f.file.endsWith('c.eqnb'))?.diagnostics).toHaveLength(3);
    expect(run('check', file('clean-folder')).code).toBe(0);
  });

  it('files and folders may be mixed; paths inside the working directory are shown relative to it', () => {
    const r = run('check', 'examples/pilot-esterification.eqnb', file('clean-folder'), '--json');
    expect(process.cwd()).toBe(REPO_ROOT);
    expect(r.code).toBe(0);
    expect((json(r) as { files: { file: string }[] }).files.map((f) => f.file)).toEqual(['examples/pilot-esterification.eqnb', file('clean-folder', 'sub', 'e.eqnb')]);
  });

  it('a missing path is a failure (exit 1) named on stderr, and the other paths are still checked', () => {
    const r = run('check', file('nope.eqnb'), file('clean.eqnb'), '--json');
    expect(r.code).toBe(1);
    expect(r.err).toContain(file('nope.eqnb'));
    expect(r.err).not.toMatch(STACK_TRACE);
    expect((json(r) as { files: unknown[] }).files).toHaveLength(1);
  });

  it('a UTF-8 byte order mark at the start of a file is not part of the notebook (editors on Windows write one)', () => {
    const r = run('check', file('bom.eqnb'), '--json');
    expect(json(r)).toEqual({ files: [{ file: file('bom.eqnb'), diagnostics: [] }] });
    expect(r.code).toBe(0);
  });

  it('a file that is not text is checked like any other, without crashing', () => {
    const r = run('check', file('binary.eqnb'), '--json');
    expect([0, 1]).toContain(r.code);
    expect(r.err).not.toMatch(/internal error/);
    expect((json(r) as { files: unknown[] }).files).toHaveLength(1);
  });
});

// ---- balance ---------------------------------------------------------------------------------

describe('balance', () => {
  it.each([
    // combustion of propane, standard general-chemistry textbook example
    ['C3H8 + O2 -> CO2 + H2O', 'C3H8 + 5 O2 -> 3 CO2 + 4 H2O', [1, 5, 3, 4]],
    // copper in dilute nitric acid, standard general-chemistry textbook redox example; phases kept
    ['Cu(s) + HNO3(aq) -> Cu(NO3)2(aq) + NO(g) + H2O(l)', '3 Cu(s) + 8 HNO3(aq) -> 3 Cu(NO3)2(aq) + 2 NO(g) + 4 H2O(l)', [3, 8, 3, 2, 4]],
    // permanganate-iron(II) titration, standard general-chemistry textbook redox example; Unicode arrow kept
    ['MnO4^- + Fe^2+ + H^+ → Mn^2+ + Fe^3+ + H2O', 'MnO4^- + 5 Fe^2+ + 8 H^+ → Mn^2+ + 5 Fe^3+ + 4 H2O', [1, 5, 8, 1, 5, 4]],
    // synthesis of water, standard general-chemistry textbook example; written coefficients are replaced
    ['4 H2 + 2 O2 -> 4 H2O', '2 H2 + O2 -> 2 H2O', [2, 1, 2]],
    // ammonia synthesis (Haber process), standard general-chemistry textbook example; label kept
    ['haber: N2 + H2 <=> NH3', 'haber: N2 + 3 H2 <=> 2 NH3', [1, 3, 2]],
  ])('--json %s -> exactly {"equation","coefficients"}', (input, equation, coefficients) => {
    const r = run('balance', input, '--json');
    expect(r.code).toBe(0);
    expect(r.err).toBe('');
    expect(json(r)).toEqual({ equation, coefficients });
  });

  it('prints the balanced equation as text without --json', () => {
    // thermite reaction, standard general-chemistry textbook example: 2 Al + Fe2O3 -> Al2O3 + 2 Fe
    const r = run('balance', 'Al + Fe2O3 -> Al2O3 + Fe');
    expect(r.code).toBe(0);
    expect(r.out).toBe('2 Al + Fe2O3 -> Al2O3 + 2 Fe');
  });

  it.each([
    ['no positive balance (carbon only on the right)', 'H2 + O2 -> H2O + CO2'],
    ['several balances (water and hydrogen peroxide)', 'H2 + O2 -> H2O + H2O2'],
    ['charge cannot balance', 'Fe^2+ -> Fe^3+'],
    ['unknown element', 'Xx + O2 -> XxO2'],
    ['bad formula', 'H2((O -> H2O'],
    ['ambiguous charge', 'Fe3+ + e- -> Fe^2+'],
    ['no arrow', 'H2 + O2'],
    ['two lines', 'H2 + O2 -> H2O\nH2 -> H2'],
    ['empty', ''],
    ['bad coefficient', '0 H2 + O2 -> H2O'],
  ])('%s: exit 1, a message on stderr, nothing on stdout', (_what, input) => {
    for (const flags of [[], ['--json']]) {
      const r = run('balance', input, ...flags);
      expect(r.code, input).toBe(1);
      expect(r.out, input).toBe('');
      expect(r.err.length, input).toBeGreaterThan(0);
      expect(r.err, input).not.toMatch(STACK_TRACE);
      expect(r.err, input).not.toMatch(/internal error/);
    }
  });
});

// ---- formula ---------------------------------------------------------------------------------

describe('formula', () => {
  it.each([
    // computed from IUPAC 2021 atomic weights: 2 × 1.008 + 15.999 = 18.015
    ['H2O', { formula: 'H2O', charge: 0, elements: { H: 2, O: 1 }, molar_mass: 18.015 }],
    // computed from IUPAC 2021 atomic weights: 32.06 + 4 × 15.999 = 96.056 (the charge does not change it, common practice)
    ['SO4^2-', { formula: 'SO4^2-', charge: -2, elements: { S: 1, O: 4 }, molar_mass: 96.056 }],
    // computed from IUPAC 2021 atomic weights: 63.546 + 32.06 + 9 × 15.999 + 10 × 1.008 = 249.677
    ['CuSO4·5H2O', { formula: 'CuSO4·5H2O', charge: 0, elements: { Cu: 1, S: 1, O: 9, H: 10 }, molar_mass: 249.677 }],
    // computed from IUPAC 2021 atomic weights: 40.078 + 32.06 + 4.5 × 15.999 + 1.008 = 145.1415
    ['CaSO4·1/2H2O', { formula: 'CaSO4·1/2H2O', charge: 0, elements: { Ca: 1, S: 1, O: 4.5, H: 1 }, molar_mass: 145.1415 }],
    // computed from IUPAC 2021 atomic weights: 4 × 39.0983 + 55.845 + 6 × 12.011 + 6 × 14.007 = 368.3462
    ['K4[Fe(CN)6]', { formula: 'K4[Fe(CN)6]', charge: 0, elements: { K: 4, Fe: 1, C: 6, N: 6 }, molar_mass: 368.3462 }],
    // CODATA 2018 electron molar mass, 5.48579909065e-4 g/mol (from memory)
    ['e-', { formula: 'e-', charge: -1, elements: {}, molar_mass: 5.48579909065e-4 }],
    // computed from IUPAC 2021 atomic weights: 55.845 (Fe³⁺ written with Unicode superscripts)
    ['Fe³⁺', { formula: 'Fe³⁺', charge: 3, elements: { Fe: 1 }, molar_mass: 55.845 }],
  ])('--json %s -> exactly {"formula","charge","elements","molar_mass"} (g/mol)', (input, expected) => {
    const r = run('formula', input, '--json');
    expect(r.code).toBe(0);
    expect(r.err).toBe('');
    const got = json(r) as typeof expected;
    expect(Object.keys(got).sort()).toEqual(['charge', 'elements', 'formula', 'molar_mass']);
    expect({ ...got, molar_mass: 0 }).toEqual({ ...expected, molar_mass: 0 });
    expect(got.molar_mass).toBeCloseTo(expected.molar_mass, 9);
  });

  it('reads a phase after the formula', () => {
    const r = run('formula', 'H2O (l)', '--json');
    expect(r.code).toBe(0);
    expect(json(r)).toMatchObject({ formula: 'H2O', charge: 0, elements: { H: 2, O: 1 } });
  });

  it('prints composition, charge and molar mass as text without --json', () => {
    const r = run('formula', 'H2O');
    expect(r.code).toBe(0);
    // computed from IUPAC 2021 atomic weights: 18.015 g/mol
    expect(r.out).toContain('18.015 g/mol');
  });

  it.each([
    ['unknown element', 'Xx2O'],
    ['unclosed bracket', 'Ca(OH2'],
    ['lowercase start', 'h2o'],
    ['ambiguous charge', 'Fe3+'],
    ['empty', ''],
    ['a coefficient in front', '2H2O'],
  ])('%s: exit 1, the problem on stderr with a caret, nothing on stdout', (_what, input) => {
    for (const flags of [[], ['--json']]) {
      const r = run('formula', input, ...flags);
      expect(r.code, input).toBe(1);
      expect(r.out, input).toBe('');
      expect(r.err.length, input).toBeGreaterThan(0);
      expect(r.err, input).not.toMatch(STACK_TRACE);
      expect(r.err, input).not.toMatch(/internal error/);
    }
    expect(run('formula', input).err).toContain('^');
  });
});

// ---- usage -----------------------------------------------------------------------------------

describe('usage errors exit 2 and print the usage on stderr', () => {
  it.each([
    ['no command', []],
    ['unknown command', ['frobnicate']],
    ['unknown flag', ['check', 'examples', '--verbose']],
    ['unknown flag before the command', ['--fast', 'formula', 'H2O']],
    ['a flag with a value', ['formula', 'H2O', '--json=true']],
    ['check without paths', ['check']],
    ['check with only --json', ['check', '--json']],
    ['balance without an equation', ['balance']],
    ['balance with two equations', ['balance', 'H2 + O2 -> H2O', 'N2 + H2 -> NH3']],
    ['formula without a formula', ['formula']],
    ['formula with two formulas', ['formula', 'H2O', 'CO2']],
  ])('%s', (_what, argv) => {
    const r = run(...argv);
    expect(r.code).toBe(2);
    expect(r.out).toBe('');
    expect(r.err).toContain('usage: stillpoint');
    expect(r.err).not.toMatch(STACK_TRACE);
  });

  it('help prints the usage on stdout and exits 0', () => {
    const r = run('help');
    expect(r.code).toBe(0);
    expect(r.out).toContain('usage: stillpoint');
    expect(r.err).toBe('');
  });
});

// ---- the built CLI -----------------------------------------------------------------------------

describe('dist/cli.js (spawned)', () => {
  it('gives the documented exit codes and never a stack trace on bad input', () => {
    const cli = join(REPO_ROOT, 'dist', 'cli.js');
    if (!existsSync(cli)) throw new Error(`${cli} is missing: run \`npm run build\` before the tests`);
    const spawn = (...args: string[]): { status: number | null; stdout: string; stderr: string } => {
      const r = spawnSync(process.execPath, [cli, ...args], { cwd: REPO_ROOT, encoding: 'utf8', timeout: 15000 });
      return { status: r.status, stdout: r.stdout, stderr: r.stderr };
    };
    const cases: { args: string[]; status: number }[] = [
      { args: ['check', file('clean.eqnb')], status: 0 },
      { args: ['check', file('with-error.eqnb'), file('binary.eqnb'), file('does-not-exist.eqnb'), '--json'], status: 1 },
      { args: ['balance', 'H2 + O2 -> H2O + H2O2'], status: 1 },
      { args: ['formula', '((\ud800'], status: 1 },
      { args: [], status: 2 },
      { args: ['check', '--verbose', file('clean.eqnb')], status: 2 },
    ];
    for (const c of cases) {
      const r = spawn(...c.args);
      expect(r.status, `stillpoint ${c.args.join(' ')}\n${r.stderr}`).toBe(c.status);
      expect(r.stderr, `stillpoint ${c.args.join(' ')}`).not.toMatch(STACK_TRACE);
    }
    // The JSON on stdout of the real binary parses and has the documented shape.
    const balanced = JSON.parse(spawn('balance', 'C3H8 + O2 -> CO2 + H2O', '--json').stdout) as unknown;
    // combustion of propane, standard general-chemistry textbook example
    expect(balanced).toEqual({ equation: 'C3H8 + 5 O2 -> 3 CO2 + 4 H2O', coefficients: [1, 5, 3, 4] });
  });
});
