// `npm run bench`: speed of the analysis and of the solver, as medians (never
// asserted in tests). Cases: the solver on one reaction, on steam reforming
// with the water-gas shift, and on a random 20-reaction network; a generated
// 5,000-line notebook with 200 batches, analysed cold, and re-analysed after a
// one-character edit with the caches warm; hovers on it; and, over the real
// protocol, server startup to first diagnostics and hovers while typing.
import { existsSync, readdirSync, statSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { performance } from 'node:perf_hooks';
import { createNotebookService } from '../notebook/ide/service';
import { generateNotebook } from './generate';
import { runSolverBenchmarks } from './solver';
import { runEditorBenchmarks } from './editor';

const LINES = 5000;
const EDIT_RUNS = 25;
const COLD_RUNS = 7;
const HOVER_RUNS = 500;
const DOCUMENT_TARGET_MS = 100;
const HOVER_TARGET_MS = 5;

function median(xs: number[]): number {
  const s = [...xs].sort((a, b) => a - b);
  const m = s.length >> 1;
  return s.length % 2 ? s[m] : (s[m - 1] + s[m]) / 2;
}

const report: string[] = [];
report.push(...runSolverBenchmarks());

// A 200-point temperature sweep of a 2-reaction gas system (steam reforming with the water-gas
// shift; illustrative data), analysed with cold caches so every point is a real solve.
const SWEEP_TARGET_MS = 20;
const SWEEP_NOTEBOOK = [
  'reform: CH4(g) + H2O(g) <=> CO(g) + 3 H2(g)',
  '  K = 1.0 at 900 K',
  '  ΔH° = 206 kJ/mol',
  'shift: CO(g) + H2O(g) <=> CO2(g) + H2(g)',
  '  K = 2.2 at 900 K',
  '  ΔH° = -41 kJ/mol',
  'batch sweep at 900 K, 10 bar',
  '  CH4(g) 1 mol',
  '  H2O(g) 3 mol',
  '  basis CH4',
  '  vary T from 700 to 1099 K step 2',
  '',
].join('\n');
const sweepTimes: number[] = [];
let sweepPoints = 0;
// Untimed runs first, so the timed ones measure the analysis rather than the JIT compiling it
// (an editor session analyses many times); each timed run still starts with empty caches.
const SWEEP_WARMUP_RUNS = 10;
const SWEEP_RUNS = 15;
for (let i = 0; i < SWEEP_WARMUP_RUNS; i++) createNotebookService().analyse(SWEEP_NOTEBOOK);
for (let i = 0; i < SWEEP_RUNS; i++) {
  const fresh = createNotebookService();
  const t0 = performance.now();
  const a = fresh.analyse(SWEEP_NOTEBOOK);
  sweepTimes.push(performance.now() - t0);
  sweepPoints = a.sweeps.get(a.model.batches[0])?.[0]?.points.length ?? 0;
}
const sweepMedian = median(sweepTimes);
report.push(
  `sweep: ${sweepPoints}-point temperature sweep of steam reforming + shift, analysed with empty caches: median ${sweepMedian.toFixed(1)} ms over ${SWEEP_RUNS} runs after ${SWEEP_WARMUP_RUNS} untimed ones (target < ${SWEEP_TARGET_MS} ms: ${(sweepMedian / SWEEP_TARGET_MS).toFixed(2)} of budget)`,
);

const text = generateNotebook(LINES);
const lineCount = text.split('\n').length - 1;

// Cold: a fresh service (empty caches) each run.
const coldTimes: number[] = [];
for (let i = 0; i < COLD_RUNS; i++) {
  const fresh = createNotebookService();
  const t0 = performance.now();
  fresh.analyse(text);
  coldTimes.push(performance.now() - t0);
}

// Warm: one service; each run changes one character in a different batch (1.0 mol -> 1.5 mol),
// as typing does, so exactly one batch needs a new solve.
const service = createNotebookService();
let analysis = service.analyse(text);
const batchCount = analysis.model.batches.length;
const editTimes: number[] = [];
for (let i = 0; i < EDIT_RUNS; i++) {
  const batch = analysis.model.batches[(i * 7) % batchCount];
  const amount = batch.amounts[0].node.value!.number;
  const at = amount.start + 2; // the `0` of `1.0`
  const edited = text.slice(0, at) + '5' + text.slice(at + 1);
  const t0 = performance.now();
  service.analyse(edited);
  editTimes.push(performance.now() - t0);
}
analysis = service.analyse(text);

const targets: number[] = analysis.syntax.tree.statements.map((s) => s.start + 1);
const hoverTimes: number[] = [];
let answered = 0;
for (let i = 0; i < HOVER_RUNS; i++) {
  const offset = targets[(i * 7919) % targets.length];
  const t0 = performance.now();
  if (service.hover(analysis, offset)) answered++;
  hoverTimes.push(performance.now() - t0);
}
const solved = [...analysis.results.values()].filter((r) => r.status === 'converged').length;

const cold = median(coldTimes);
const edit = median(editTimes);
const hover = median(hoverTimes);
report.push(
  `notebook: ${lineCount} lines, ${analysis.model.reactions.length} reactions, ${analysis.model.speciesList.length} species, ${batchCount} batches (${solved} solved), ${analysis.diagnostics.length} diagnostics`,
  `analyse, cold caches: median ${cold.toFixed(1)} ms over ${COLD_RUNS} runs`,
  `re-analyse after a one-character edit: median ${edit.toFixed(1)} ms over ${EDIT_RUNS} runs (target < ${DOCUMENT_TARGET_MS} ms: ${(edit / DOCUMENT_TARGET_MS).toFixed(2)} of budget)`,
  `hover: median ${(hover * 1000).toFixed(1)} µs over ${HOVER_RUNS} hovers, ${answered} answered (target < ${HOVER_TARGET_MS} ms: ${(hover / HOVER_TARGET_MS).toFixed(4)} of budget)`,
);
// The packaged extension's size, when `npm run package` has built one (the limit is 3 MB).
const VSIX_LIMIT_BYTES = 3 * 1024 * 1024;
const root = resolve(__dirname, '..');
const vsix = existsSync(root) ? readdirSync(root).filter((f) => /^stillpoint-.*\.vsix$/.test(f)) : [];
for (const f of vsix) {
  const size = statSync(join(root, f)).size;
  report.push(`package: ${f} is ${(size / 1024).toFixed(0)} KiB (limit 3 MB: ${(size / VSIX_LIMIT_BYTES).toFixed(3)} of budget)`);
}
if (vsix.length === 0) report.push('package: no .vsix built yet (run `npm run package` first to have its size here)');
for (const line of report) console.log(line);
void runEditorBenchmarks().then((lines) => {
  for (const line of lines) console.log(line);
});
