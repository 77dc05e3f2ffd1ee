// `npm run bench`: parse, resolve and balance-check a generated 5,000-line
// notebook, and time hovers on it. Reports medians; the targets are in the
// README (under 100 ms per document, under 5 ms per hover on the CI machine).
import { performance } from 'node:perf_hooks';
import { createNotebookService } from '../notebook/ide/service';
import { generateNotebook } from './generate';

const LINES = 5000;
const DOCUMENT_RUNS = 25;
const HOVER_RUNS = 500;

function median(xs: number[]): number {
  const s = [...xs].sort((a, b) => a - b);
  const m = s.length >> 1;
  return s.length % 2 ? s[m] : (s[m - 1] + s[m]) / 2;
}

const service = createNotebookService();
const text = generateNotebook(LINES);
const lineCount = text.split('\n').length;
for (let i = 0; i < 3; i++) service.analyse(text); // warm-up

const docTimes: number[] = [];
let analysis = service.analyse(text);
for (let i = 0; i < DOCUMENT_RUNS; i++) {
  const t0 = performance.now();
  analysis = service.analyse(text);
  docTimes.push(performance.now() - t0);
}

// Hovers at reaction arrows, species declarations and batch names spread through the file.
const targets: number[] = [];
for (const s of analysis.syntax.tree.statements) targets.push(s.start + 1);
const hoverTimes: number[] = [];
let answered = 0;
for (let i = 0; i < HOVER_RUNS; i++) {
  const offset = targets[(i * 7919) % targets.length];
  const t0 = performance.now();
  if (service.hover(analysis, offset)) answered++;
  hoverTimes.push(performance.now() - t0);
}

const docMedian = median(docTimes);
const hoverMedian = median(hoverTimes);
console.log(`notebook: ${lineCount} lines, ${analysis.model.reactions.length} reactions, ${analysis.model.speciesList.length} species, ${analysis.model.batches.length} batches, ${analysis.diagnostics.length} diagnostics`);
console.log(`analyse (parse + resolve + balance check): median ${docMedian.toFixed(2)} ms over ${DOCUMENT_RUNS} runs (target < 100 ms: ${(docMedian / 100).toFixed(2)} of budget)`);
console.log(`hover: median ${(hoverMedian * 1000).toFixed(1)} µs over ${HOVER_RUNS} hovers, ${answered} answered (target < 5 ms: ${(hoverMedian / 5).toFixed(4)} of budget)`);
