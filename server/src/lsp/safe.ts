// Request handlers run through runSafe: an exception inside the analysis is
// logged to the server's output and the client gets an empty answer, never a
// crashed server.
import type { Connection } from 'vscode-languageserver/node';

export function runSafe<T>(connection: Connection, what: string, fallback: T, fn: () => T): T {
  try {
    return fn();
  } catch (e) {
    connection.console.error(`stillpoint: ${what} failed: ${e instanceof Error ? (e.stack ?? e.message) : String(e)}`);
    return fallback;
  }
}
