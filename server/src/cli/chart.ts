// `stillpoint chart FILE --batch NAME [--out FILE.svg]`: the SVG chart of the
// batch's first sweep (`vary` line), to standard output or a file.
import { createNotebookService } from '../notebook/ide/service';
import { batchChartSvg } from '../notebook/ide/chart';
import type { CliIo } from './commands';
import { readNotebook, writeOrPrint } from './files';

export function chart(file: string, batchName: string, out: string | undefined, io: CliIo): number {
  const text = readNotebook(file, io);
  if (text === undefined) return 1;
  const analysis = createNotebookService().analyse(text);
  const batch = analysis.model.batches.find((b) => b.name === batchName);
  if (!batch) {
    io.err(`stillpoint: ${file} has no batch named \`${batchName}\``);
    return 1;
  }
  const svg = batchChartSvg(analysis, batch);
  if (!svg) {
    io.err(`stillpoint: batch \`${batchName}\` has no solved sweep to chart; add a line such as \`vary T from 40 to 120 °C step 10\``);
    return 1;
  }
  return writeOrPrint(out, svg, io) ? 0 : 1;
}
