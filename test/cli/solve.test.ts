// `stillpoint solve`: runCli in-process with a capturing io (the exact JSON shape, values
// against closed forms, --batch, exit statuses 0/1/2, the human tables and cautions), and
// one spawn of the built dist/cli.js.
import { spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { runCli } from '../../server/src/cli/commands';
import { REPO_ROOT } from '../support/fixtures';

/** J/(mol K), exact in the 2019 SI (CODATA 2018). */
const R = 8.314462618;
const BAR = 1e5;
const T25 = 298.15;

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

interface JsonSpecies {
  name: string;
  formula: string;
  phase: string;
  initial_mol: number;
  equilibrium_mol: number;
}
interface JsonReaction {
  label: string;
  K: number;
  extent_mol: number;
}
interface JsonBatch {
  name: string;
  from: string | null;
  temperature_K: number | null;
  pressure_bar: number | null;
  vessel_L: number | null;
  converged: boolean;
  message?: string;
  species: JsonSpecies[];
  reactions: JsonReaction[];
}
interface JsonSolve {
  file: string;
  batches: JsonBatch[];
}

function parse(r: Run): JsonSolve {
  return JSON.parse(r.out) as JsonSolve;
}

function expectClose(actual: number | null, expected: number, relative: number, what = ''): void {
  expect(actual, what).not.toBeNull();
  expect(Math.abs((actual as number) - expected) / Math.abs(expected), `${what}: ${actual} vs ${expected}`).toBeLessThanOrEqual(relative);
}

// Invented scenario "Ebbsworth gas cell": A(g) ⇌ 2 B(g), written as N2O4 ⇌ 2 NO2 with an invented K.
const GAS = [
  'species A = N2O4 (g)',
  'species B = NO2 (g)',
  'split: A <=> 2 B',
  '  K = 0.15 at 25 °C',
  'batch open at 25 °C, 1 bar',
  '  A 1 mol',
  'batch shut at 25 °C',
  '  vessel 10 L',
  '  A 1 mol',
  'batch roomy at 25 °C',
  '  vessel 100 L',
  '  A 1 mol',
  'batch eased from shut',
  '  vent',
  '',
].join('\n');

// One batch solved, one with missing data, one whose reactions contradict each other.
const MIXED = [
  'species A = C4H8O2 (l)',
  'species B = C4H8O2 (l)',
  'ab: A <=> B',
  '  K = 2 at 25 °C',
  'ba: B <=> A',
  '  K = 2 at 25 °C', // ab says B/A = 2, ba says A/B = 2: inconsistent
  'batch good at 25 °C',
  '  uses ab',
  '  A 1 mol',
  'batch loop at 25 °C',
  '  A 1 mol',
  'batch lacking at 25 °C',
  '  uses ab',
  '  A 10 mL', // no density
  '',
].join('\n');

let dir: string;
const file = (name: string): string => join(dir, name);

beforeAll(() => {
  dir = mkdtempSync(join(tmpdir(), 'stillpoint-solve-'));
  writeFileSync(file('gas.eqnb'), GAS);
  writeFileSync(file('mixed.eqnb'), MIXED);
});

afterAll(() => {
  if (dir) rmSync(dir, { recursive: true, force: true });
});

describe('solve --json', () => {
  it('has exactly the documented shape, and exit 0 when every batch is solved (warnings allowed)', () => {
    const r = run('solve', file('gas.eqnb'), '--json');
    expect(r.code).toBe(0);
    expect(r.err).toBe('');
    const j = parse(r);
    expect(Object.keys(j).sort()).toEqual(['batches', 'file']);
    expect(j.file).toBe(file('gas.eqnb'));
    expect(j.batches.map((b) => b.name)).toEqual(['open', 'shut', 'roomy', 'eased']);
    expect(j.batches.map((b) => b.from)).toEqual([null, null, null, 'shut']);
    for (const b of j.batches) {
      // a converged batch has no `message` key at all
      expect(Object.keys(b).sort()).toEqual(['adiabatic_rise_K', 'converged', 'from', 'heat_kJ', 'name', 'pressure_bar', 'reactions', 'species', 'sweeps', 'targets', 'temperature_K', 'vessel_L']);
      expect(b.converged).toBe(true);
      for (const s of b.species) expect(Object.keys(s).sort()).toEqual(['equilibrium_mol', 'formula', 'initial_mol', 'name', 'phase']);
      for (const x of b.reactions) expect(Object.keys(x).sort()).toEqual(['K', 'extent_mol', 'label']);
    }
  });

  it('values: constant pressure, α = √(K/(K + 4P/P°)) (closed form)', () => {
    const open = parse(run('solve', file('gas.eqnb'), '--json')).batches[0];
    const alpha = Math.sqrt(0.15 / (0.15 + 4));
    expect(open.temperature_K).toBeCloseTo(T25, 10);
    expect(open.pressure_bar).toBeCloseTo(1, 12);
    expect(open.vessel_L).toBeNull();
    expect(open.species).toEqual([
      { name: 'A', formula: 'N2O4', phase: 'g', initial_mol: 1, equilibrium_mol: expect.any(Number) },
      { name: 'B', formula: 'NO2', phase: 'g', initial_mol: 0, equilibrium_mol: expect.any(Number) },
    ]);
    expectClose(open.species[0].equilibrium_mol, 1 - alpha, 1e-12, 'A');
    expectClose(open.species[1].equilibrium_mol, 2 * alpha, 1e-12, 'B');
    expect(open.reactions).toEqual([{ label: 'split', K: expect.any(Number), extent_mol: expect.any(Number) }]);
    expectClose(open.reactions[0].K, 0.15, 1e-12, 'K');
    expectClose(open.reactions[0].extent_mol, alpha, 1e-12, 'extent');
  });

  it('values: a closed vessel reports vessel_L and the computed pressure (Σn)RT/V (closed form)', () => {
    const shut = parse(run('solve', file('gas.eqnb'), '--json')).batches[1];
    expect(shut.vessel_L).toBeCloseTo(10, 12);
    const nGas = shut.species.reduce((sum, s) => sum + s.equilibrium_mol, 0);
    expectClose(shut.pressure_bar, (nGas * R * T25) / 0.01 / BAR, 1e-12, 'pressure');
    // closed form: K = (2ξ)²c/(1 − ξ), c = RT/(V P°)
    const c = (R * T25) / (0.01 * BAR);
    expectClose(shut.reactions[0].extent_mol, (-0.15 + Math.sqrt(0.15 ** 2 + 16 * c * 0.15)) / (8 * c), 1e-12, 'extent');
  });

  it('a follow-on batch: `from`, its source\'s temperature and vessel, initial_mol after the vent (ideal gas)', () => {
    const j = parse(run('solve', file('gas.eqnb'), '--json'));
    const [shut, eased] = [j.batches[1], j.batches[3]];
    expect(eased.from).toBe('shut');
    expect(eased.temperature_K).toBeCloseTo(T25, 10);
    expect(eased.vessel_L).toBeCloseTo(10, 12);
    // vent: every gas scaled by 1 atm / P, P = (Σn)RT/V before it (ideal gas; 1 atm = 101325 Pa by definition).
    const keep = 101325 / ((shut.pressure_bar as number) * BAR);
    shut.species.forEach((s, i) => expectClose(eased.species[i].initial_mol, s.equilibrium_mol * keep, 1e-12, `${s.name} after the vent`));
    // Lower pressure, more dissociation (Le Chatelier): the extent is forward.
    expect(eased.reactions[0].extent_mol).toBeGreaterThan(0);
  });

  it('--batch NAME selects one batch', () => {
    const r = run('solve', file('gas.eqnb'), '--batch', 'roomy', '--json');
    expect(r.code).toBe(0);
    expect(parse(r).batches.map((b) => b.name)).toEqual(['roomy']);
    // the option may come first too
    expect(parse(run('solve', '--batch', 'shut', file('gas.eqnb'), '--json')).batches.map((b) => b.name)).toEqual(['shut']);
  });

  it('unsolved batches: converged false, a `message`, null pressure; exit 1', () => {
    const r = run('solve', file('mixed.eqnb'), '--json');
    expect(r.code).toBe(1);
    const [good, loop, lacking] = parse(r).batches;
    expect(good.converged).toBe(true);
    expect('message' in good).toBe(false);
    expect(good.pressure_bar).toBeCloseTo(1.01325, 12); // the default 1 atm (definition)
    // ab: B/A = 2, so A = 1/3 (closed form)
    expectClose(good.species.find((s) => s.name === 'A')?.equilibrium_mol ?? null, 1 / 3, 1e-12, 'A');
    for (const b of [loop, lacking]) {
      expect(Object.keys(b).sort()).toEqual(['adiabatic_rise_K', 'converged', 'from', 'heat_kJ', 'message', 'name', 'pressure_bar', 'reactions', 'species', 'sweeps', 'targets', 'temperature_K', 'vessel_L']);
      expect(b.converged).toBe(false);
      expect(b.message).toMatch(/\S/);
      expect(b.pressure_bar).toBeNull();
    }
    expect(lacking.species).toEqual([]);
    expect(lacking.reactions).toEqual([]);
  });

  it('one unsolved batch selected with --batch: exit 1', () => {
    const r = run('solve', file('mixed.eqnb'), '--batch', 'loop', '--json');
    expect(r.code).toBe(1);
    expect(parse(r).batches.map((b) => [b.name, b.converged])).toEqual([['loop', false]]);
  });
});

describe('solve: usage and exit statuses', () => {
  it('an unknown batch name: exit 1, with a message naming it and the batches there are', () => {
    const r = run('solve', file('gas.eqnb'), '--batch', 'nowhere');
    expect(r.code).toBe(1);
    expect(r.out).toBe('');
    expect(r.err).toContain('nowhere');
    expect(r.err).toContain('open');
  });

  it('--batch without a value, or with another command: exit 2 (usage)', () => {
    expect(run('solve', file('gas.eqnb'), '--batch').code).toBe(2);
    expect(run('solve', file('gas.eqnb'), '--batch', '--json').code).toBe(2);
    expect(run('check', file('gas.eqnb'), '--batch', 'open').code).toBe(2);
    expect(run('balance', 'H2 + O2 -> H2O', '--batch', 'open').code).toBe(2);
  });

  it('solve with no file or two files: exit 2; a missing file: exit 1', () => {
    expect(run('solve').code).toBe(2);
    expect(run('solve', file('gas.eqnb'), file('mixed.eqnb')).code).toBe(2);
    const missing = run('solve', file('no-such.eqnb'));
    expect(missing.code).toBe(1);
    expect(missing.err).toContain('no-such.eqnb');
  });
});

describe('solve: human output', () => {
  it('prints the species table, and the caution for the vessel over 1.5 bar only', () => {
    const r = run('solve', file('gas.eqnb'));
    expect(r.code).toBe(0);
    expect(r.out).toContain('Equilibrium / mol');
    const sections = r.out.split(/^== /m).filter((s) => s.trim() !== '');
    expect(sections.map((s) => s.split('\n')[0])).toEqual(['batch open', 'batch shut', 'batch roomy', 'batch eased']);
    expect(sections[3]).toContain('Before change / mol');
    expect(sections[3]).toMatch(/CAUTION: Venting lets out/);
    // closed form: the 10 L vessel reaches (1 + ξ)RT/V = 2.766 bar; the 100 L one 0.33 bar
    expect(sections[1]).toMatch(/CAUTION: The closed vessel reaches 2\.766 bar/);
    expect(sections[2]).not.toContain('CAUTION: The closed vessel');
    expect(r.out).toContain('not a process-safety assessment');
  });

  it('an unsolved batch says why, and the file\'s errors are counted', () => {
    const r = run('solve', file('mixed.eqnb'));
    expect(r.code).toBe(1);
    expect(r.out).toMatch(/== batch lacking\n(.*\n)*\s+Not solved: .*density/);
    expect(r.out).toMatch(/\d+ errors? in /);
  });
});

describe('the built CLI (dist/cli.js)', () => {
  const cli = join(REPO_ROOT, 'dist', 'cli.js');

  it('solve --json through a real process: exit statuses and parseable JSON', () => {
    if (!existsSync(cli)) throw new Error(`${cli} is missing: run \`npm run build\` first`);
    const ok = spawnSync(process.execPath, [cli, 'solve', file('gas.eqnb'), '--json', '--batch', 'shut'], { encoding: 'utf8' });
    expect(ok.status, ok.stderr).toBe(0);
    const j = JSON.parse(ok.stdout) as JsonSolve;
    expect(j.batches.map((b) => [b.name, b.converged, b.vessel_L])).toEqual([['shut', true, 10]]);
    const bad = spawnSync(process.execPath, [cli, 'solve', file('mixed.eqnb')], { encoding: 'utf8' });
    expect(bad.status).toBe(1);
    const usage = spawnSync(process.execPath, [cli, 'solve', file('gas.eqnb'), '--batch'], { encoding: 'utf8' });
    expect(usage.status).toBe(2);
    expect(usage.stderr).not.toMatch(/^\s+at .+[(:]\d+/m); // no stack trace
  });
});
