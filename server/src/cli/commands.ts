// The `stillpoint` commands (check, balance, formula): the same analysis API as the language server,
// printed as text or JSON for CI. Exit status: 0 success, 1 any error
// diagnostic or failure, 2 bad usage. Never prints a stack trace.
import { readdirSync, statSync } from 'node:fs';
import { join, relative } from 'node:path';
import { parseFormula } from '../chem/formula';
import { trim } from '../chem/units';
import { rewriteEquation } from '../notebook/semantic/balance-check';
import { createNotebookService, type Analysis, type Diagnostic } from '../notebook/ide/service';
import { solve } from './solve';
import { report } from './report';
import { chart } from './chart';
import { readNotebook } from './files';

const USAGE = `usage: stillpoint COMMAND [ARGS] [--json]

commands:
  check PATH... [--json]        check notebooks (a folder means every .eqnb file under it)
  balance "EQUATION" [--json]   balance an equation with the smallest whole-number coefficients
  formula "FORMULA" [--json]    composition, charge and molar mass of a formula
  solve FILE [--batch NAME] [--json]
                                equilibrium composition of each batch (or one)
  report FILE [--format md|html] [--out FILE]
                                the whole notebook as a document for a lab record
  chart FILE --batch NAME [--out FILE.svg]
                                an SVG chart of the batch's sweep (its first vary line)
  help                          show this text

exit status: 0 success, 1 an error diagnostic or failure, 2 bad usage`;

export interface CliIo {
  out(text: string): void;
  err(text: string): void;
}

export class UsageError extends Error {}

interface Options {
  args: string[];
  json: boolean;
  batch?: string;
  format?: string;
  out?: string;
}

function parseOptions(argv: readonly string[]): Options {
  const o: Options = { args: [], json: false };
  const value = (i: number, name: string): string => {
    if (i + 1 >= argv.length || argv[i + 1].startsWith('--')) throw new UsageError(`${name} needs a value`);
    return argv[i + 1];
  };
  for (let i = 0; i < argv.length; i++) {
    const a = argv[i];
    if (a === '--json') o.json = true;
    else if (a === '--batch') o.batch = value(i++, '--batch');
    else if (a === '--format') o.format = value(i++, '--format');
    else if (a === '--out') o.out = value(i++, '--out');
    else if (a.startsWith('--')) throw new UsageError(`unknown option ${a}`);
    else o.args.push(a);
  }
  return o;
}

export function runCli(argv: readonly string[], io: CliIo): number {
  try {
    const { args, json, batch, format, out } = parseOptions(argv);
    const [command, ...rest] = args;
    if (batch !== undefined && command !== 'solve' && command !== 'chart') throw new UsageError('--batch belongs to `solve` and `chart`');
    if (format !== undefined && command !== 'report') throw new UsageError('--format belongs to `report`');
    if (out !== undefined && command !== 'report' && command !== 'chart') throw new UsageError('--out belongs to `report` and `chart`');
    switch (command) {
      case 'check':
        if (rest.length === 0) throw new UsageError('check needs at least one file or folder');
        return check(rest, json, io);
      case 'balance':
        if (rest.length !== 1) throw new UsageError('balance takes one equation, in quotes');
        return balance(rest[0], json, io);
      case 'formula':
        if (rest.length !== 1) throw new UsageError('formula takes one formula, in quotes');
        return formula(rest[0], json, io);
      case 'solve':
        if (rest.length !== 1) throw new UsageError('solve takes one notebook file');
        return solve(rest[0], batch, json, io);
      case 'report':
        if (rest.length !== 1) throw new UsageError('report takes one notebook file');
        if (format !== undefined && format !== 'md' && format !== 'html') throw new UsageError('--format is md or html');
        return report(rest[0], format === 'html' ? 'html' : 'md', out, io);
      case 'chart':
        if (rest.length !== 1 || batch === undefined) throw new UsageError('chart takes one notebook file and --batch NAME');
        return chart(rest[0], batch, out, io);
      case 'help':
      case '-h':
        io.out(USAGE);
        return 0;
      case undefined:
        throw new UsageError('no command given');
      default:
        throw new UsageError(`unknown command \`${command}\``);
    }
  } catch (e) {
    if (e instanceof UsageError) {
      io.err(`stillpoint: ${e.message}\n\n${USAGE}`);
      return 2;
    }
    io.err(`stillpoint: internal error: ${e instanceof Error ? e.message : String(e)} (please report this with the input that caused it)`);
    return 1;
  }
}

// ---- check ---------------------------------------------------------------------------------

interface JsonDiagnostic {
  line: number;
  column: number;
  endLine: number;
  endColumn: number;
  severity: Diagnostic['severity'];
  code: string;
  message: string;
}

function check(paths: readonly string[], json: boolean, io: CliIo): number {
  const service = createNotebookService();
  const files: string[] = [];
  let failed = false;
  for (const p of paths) {
    let isDir: boolean;
    try {
      isDir = statSync(p).isDirectory();
    } catch {
      io.err(`stillpoint: ${p}: no such file or folder`);
      failed = true;
      continue;
    }
    if (isDir) files.push(...findNotebooks(p));
    else files.push(p);
  }
  const results: { file: string; diagnostics: JsonDiagnostic[] }[] = [];
  let errors = 0;
  let warnings = 0;
  for (const file of files) {
    const text = readNotebook(file, io);
    if (text === undefined) {
      failed = true;
      continue;
    }
    const analysis = service.analyse(text);
    const diagnostics = analysis.diagnostics.map((d) => toJson(analysis, d));
    for (const d of diagnostics) {
      if (d.severity === 'error') errors++;
      if (d.severity === 'warning') warnings++;
    }
    results.push({ file: displayPath(file), diagnostics });
  }
  if (json) {
    io.out(JSON.stringify({ files: results }, null, 2));
  } else {
    for (const r of results) {
      for (const d of r.diagnostics) io.out(`${r.file}:${d.line}:${d.column}: ${d.severity} ${d.code}: ${d.message}`);
    }
    const clean = results.filter((r) => r.diagnostics.length === 0).length;
    io.out(
      `checked ${results.length} notebook${results.length === 1 ? '' : 's'}: ${errors} error${errors === 1 ? '' : 's'}, ${warnings} warning${warnings === 1 ? '' : 's'}${results.length > 0 ? `, ${clean} clean` : ''}`,
    );
  }
  return failed || errors > 0 ? 1 : 0;
}

function findNotebooks(dir: string): string[] {
  const out: string[] = [];
  const walk = (d: string): void => {
    const entries = readdirSync(d, { withFileTypes: true }).sort((a, b) => a.name.localeCompare(b.name));
    for (const e of entries) {
      if (e.name === 'node_modules' || e.name.startsWith('.')) continue;
      const p = join(d, e.name);
      if (e.isDirectory()) walk(p);
      else if (e.isFile() && e.name.endsWith('.eqnb')) out.push(p);
    }
  };
  walk(dir);
  return out;
}

function displayPath(file: string): string {
  const r = relative(process.cwd(), file);
  return r.startsWith('..') ? file : r;
}

function toJson(analysis: Analysis, d: Diagnostic): JsonDiagnostic {
  const s = analysis.lines.humanPosition(d.start);
  const e = analysis.lines.humanPosition(d.end);
  return { line: s.line, column: s.column, endLine: e.line, endColumn: e.column, severity: d.severity, code: d.code, message: d.message };
}

// ---- balance -------------------------------------------------------------------------------

function balance(equation: string, json: boolean, io: CliIo): number {
  if (/[\r\n]/.test(equation)) {
    io.err('stillpoint: balance takes one equation on one line');
    return 1;
  }
  const analysis = createNotebookService().analyse(equation);
  const reaction = analysis.model.reactions[0];
  const blocking = analysis.diagnostics.filter(
    (d) => d.severity === 'error' && !['unbalanced-elements', 'unbalanced-charge', 'no-balance', 'several-balances'].includes(d.code),
  );
  const ambiguous = analysis.diagnostics.filter((d) => d.code === 'ambiguous-charge');
  if (!reaction || blocking.length > 0 || ambiguous.length > 0 || !reaction.balance) {
    const problems = [...blocking, ...ambiguous];
    if (problems.length === 0) io.err('stillpoint: expected an equation with an arrow, such as "H2 + O2 -> H2O"');
    for (const d of problems) io.err(describeInline(equation, d));
    return 1;
  }
  const solution = reaction.balance.solution;
  if (solution.kind === 'none') {
    io.err(`stillpoint: no positive coefficients balance this equation: ${solution.reason}`);
    return 1;
  }
  if (solution.kind === 'several') {
    io.err(`stillpoint: several independent balances exist (${solution.dimension}): element and charge balance do not fix the coefficients, so none is chosen; write the coefficients you mean`);
    return 1;
  }
  const text = rewriteEquation(reaction, solution.coefficients);
  const labelPrefix = reaction.node.label ? `${reaction.node.label.text}: ` : '';
  if (json) {
    io.out(JSON.stringify({ equation: labelPrefix + text, coefficients: solution.coefficients.map((c) => Number(c)) }));
  } else {
    io.out(labelPrefix + text);
  }
  return 0;
}

/** A problem shown under the text it is about, with a caret line. */
function describeInline(text: string, d: Diagnostic): string {
  const before = Array.from(text.slice(0, d.start)).length;
  const width = Math.max(1, Array.from(text.slice(d.start, d.end)).length);
  return `${d.severity} ${d.code}: ${d.message}\n  ${text}\n  ${' '.repeat(before)}${'^'.repeat(width)}`;
}

// ---- formula -------------------------------------------------------------------------------

/** Significant digits of a molar mass in JSON: beyond the atomic weights' precision, without float noise. */
const MOLAR_MASS_DIGITS = 12;

const PHASE_SUFFIX = /\s*\((g|l|s|aq)\)$/;

function formula(input: string, json: boolean, io: CliIo): number {
  const text = input.trim();
  const phase = PHASE_SUFFIX.exec(text);
  const body = phase ? text.slice(0, phase.index) : text;
  const r = parseFormula(body);
  if (!r.ok) {
    const offset = input.indexOf(body);
    for (const p of r.problems) {
      io.err(
        describeInline(input, {
          code: p.code === 'syntax' ? 'bad-formula' : p.code,
          severity: p.severity,
          message: p.message,
          start: offset + p.start,
          end: offset + p.end,
          fixes: [],
        }),
      );
    }
    return 1;
  }
  const f = r.formula;
  const elements: Record<string, number> = {};
  for (const [symbol, count] of f.composition) elements[symbol] = count.toNumber();
  if (json) {
    io.out(
      JSON.stringify({
        formula: f.text,
        ...(phase ? { phase: phase[1] } : {}),
        charge: f.charge,
        elements,
        molar_mass: Number(f.molarMass.toPrecision(MOLAR_MASS_DIGITS)),
      }),
    );
  } else {
    io.out(`${f.text}${phase ? ` (${phase[1]})` : ''}`);
    for (const [symbol, count] of f.composition) io.out(`  ${symbol.padEnd(3)} ${count.toString()}`);
    io.out(`  charge      ${f.charge}`);
    io.out(`  molar mass  ${trim(f.molarMass)} g/mol`);
  }
  return 0;
}
