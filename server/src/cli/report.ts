// `stillpoint report FILE [--format md|html] [--out FILE]`: the whole notebook
// as a readable document (reactions, batches, sweeps, targets, cautions), to
// standard output or to a file.
import { basename } from 'node:path';
import { createNotebookService } from '../notebook/ide/service';
import { reportHtml, reportMarkdown } from '../notebook/ide/report';
import type { CliIo } from './commands';
import { readNotebook, writeOrPrint } from './files';

export function report(file: string, format: 'md' | 'html', out: string | undefined, io: CliIo): number {
  const text = readNotebook(file, io);
  if (text === undefined) return 1;
  const analysis = createNotebookService().analyse(text);
  const title = `Equilibrium notebook: ${basename(file)}`;
  const doc = format === 'html' ? reportHtml(analysis, title) : reportMarkdown(analysis, title);
  if (!writeOrPrint(out, doc, io)) return 1;
  return analysis.diagnostics.some((d) => d.severity === 'error') ? 1 : 0;
}
