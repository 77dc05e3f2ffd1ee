// `stillpoint report FILE [--format md|html] [--out FILE]`: the whole notebook
// as a readable document (reactions, batches, sweeps, targets, cautions), to
// standard output or to a file.
import { readFileSync, writeFileSync } from 'node:fs';
import { basename } from 'node:path';
import { createNotebookService } from '../notebook/ide/service';
import { reportHtml, reportMarkdown } from '../notebook/ide/report';
import type { CliIo } from './commands';

export function report(file: string, format: 'md' | 'html', out: string | undefined, io: CliIo): number {
  let text: string;
  try {
    text = readFileSync(file, 'utf8');
  } catch (e) {
    io.err(`stillpoint: ${file}: cannot read (${e instanceof Error ? e.message : String(e)})`);
    return 1;
  }
  const analysis = createNotebookService().analyse(text);
  const title = `Equilibrium notebook: ${basename(file)}`;
  const doc = format === 'html' ? reportHtml(analysis, title) : reportMarkdown(analysis, title);
  if (out) {
    try {
      writeFileSync(out, doc);
    } catch (e) {
      io.err(`stillpoint: ${out}: cannot write (${e instanceof Error ? e.message : String(e)})`);
      return 1;
    }
    io.out(`wrote ${out}`);
  } else {
    io.out(doc.trimEnd());
  }
  return analysis.diagnostics.some((d) => d.severity === 'error') ? 1 : 0;
}
