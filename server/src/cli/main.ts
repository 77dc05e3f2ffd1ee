// Entry point of the bundled CLI (dist/cli.js, the `stillpoint` bin): runs one
// command with the process's arguments and streams, and sets the exit status.
import { runCli } from './commands';

process.exitCode = runCli(process.argv.slice(2), {
  out: (t) => process.stdout.write(`${t}\n`),
  err: (t) => process.stderr.write(`${t}\n`),
});
