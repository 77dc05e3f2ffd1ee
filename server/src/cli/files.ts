// Reading a notebook and writing an output for the CLI commands: one place for the
// messages a missing or unwritable file gets.
import { readFileSync, writeFileSync } from 'node:fs';
import type { CliIo } from './commands';

const reason = (e: unknown): string => (e instanceof Error ? e.message : String(e));

/** The file's text, or undefined after saying on stderr why it cannot be read. */
export function readNotebook(file: string, io: CliIo): string | undefined {
  try {
    return readFileSync(file, 'utf8');
  } catch (e) {
    io.err(`stillpoint: ${file}: cannot read (${reason(e)})`);
    return undefined;
  }
}

/** Writes `text` to `out` (saying so), or prints it when there is no `out`; false when the file cannot be written. */
export function writeOrPrint(out: string | undefined, text: string, io: CliIo): boolean {
  if (!out) {
    io.out(text.trimEnd());
    return true;
  }
  try {
    writeFileSync(out, text);
  } catch (e) {
    io.err(`stillpoint: ${out}: cannot write (${reason(e)})`);
    return false;
  }
  io.out(`wrote ${out}`);
  return true;
}
