// Editor-side speed, measured over the real protocol: the bundled server is
// spawned and spoken to over stdio, as an editor would. Startup: from launch to
// the first diagnostics on a 1,000-line notebook. Responsiveness: hovers sent
// right after each edit of a 5,000-line notebook, answered from the latest
// finished analysis rather than waiting for a new one.
import { spawn } from 'node:child_process';
import { performance } from 'node:perf_hooks';
import { resolve } from 'node:path';
import { generateNotebook } from './generate';

const STARTUP_TARGET_MS = 500;
const STARTUP_RUNS = 5;
const EDITS = 20;

interface Wire {
  request(method: string, params: unknown): Promise<unknown>;
  notify(method: string, params: unknown): void;
  next(method: string): Promise<unknown>;
  close(): void;
}

/** Content-Length framed JSON-RPC over the child's stdio, just enough for the benchmark. */
function connect(serverPath: string): Wire {
  const proc = spawn(process.execPath, [serverPath, '--stdio'], { stdio: ['pipe', 'pipe', 'ignore'] });
  let buffer = Buffer.alloc(0);
  let id = 0;
  const replies = new Map<number, (v: unknown) => void>();
  const waiting = new Map<string, ((v: unknown) => void)[]>();
  proc.stdout.on('data', (chunk: Buffer) => {
    buffer = Buffer.concat([buffer, chunk]);
    for (;;) {
      const end = buffer.indexOf('\r\n\r\n');
      if (end < 0) return;
      const length = Number(/Content-Length: (\d+)/i.exec(buffer.subarray(0, end).toString())?.[1] ?? 0);
      if (buffer.length < end + 4 + length) return;
      const msg = JSON.parse(buffer.subarray(end + 4, end + 4 + length).toString()) as { id?: number; method?: string; params?: unknown; result?: unknown };
      buffer = buffer.subarray(end + 4 + length);
      if (msg.id !== undefined && msg.method === undefined) replies.get(msg.id)?.(msg.result);
      else if (msg.method && msg.id === undefined) waiting.get(msg.method)?.shift()?.(msg.params);
      else if (msg.id !== undefined) send({ jsonrpc: '2.0', id: msg.id, result: null });
    }
  });
  const send = (m: unknown): void => {
    const body = Buffer.from(JSON.stringify(m));
    proc.stdin.write(`Content-Length: ${body.length}\r\n\r\n`);
    proc.stdin.write(body);
  };
  return {
    request: (method, params) =>
      new Promise((res) => {
        const n = ++id;
        replies.set(n, res);
        send({ jsonrpc: '2.0', id: n, method, params });
      }),
    notify: (method, params) => send({ jsonrpc: '2.0', method, params }),
    next: (method) =>
      new Promise((res) => {
        const list = waiting.get(method) ?? [];
        list.push(res);
        waiting.set(method, list);
      }),
    close: () => proc.kill(),
  };
}

function median(xs: number[]): number {
  const s = [...xs].sort((a, b) => a - b);
  return s[s.length >> 1];
}

export async function runEditorBenchmarks(serverPath = resolve(__dirname, 'server.js')): Promise<string[]> {
  const small = generateNotebook(1000);
  const startup: number[] = [];
  for (let i = 0; i < STARTUP_RUNS; i++) {
    const t0 = performance.now();
    const w = connect(serverPath);
    await w.request('initialize', { processId: null, rootUri: null, capabilities: {}, initializationOptions: { diagnosticsDelayMs: 0 } });
    w.notify('initialized', {});
    const diagnostics = w.next('textDocument/publishDiagnostics');
    w.notify('textDocument/didOpen', { textDocument: { uri: 'file:///bench/small.eqnb', languageId: 'eqnb', version: 1, text: small } });
    await diagnostics;
    startup.push(performance.now() - t0);
    w.close();
  }

  const big = generateNotebook(5000);
  const w = connect(serverPath);
  await w.request('initialize', { processId: null, rootUri: null, capabilities: {}, initializationOptions: { diagnosticsDelayMs: 250 } });
  w.notify('initialized', {});
  const uri = 'file:///bench/big.eqnb';
  const first = w.next('textDocument/publishDiagnostics');
  w.notify('textDocument/didOpen', { textDocument: { uri, languageId: 'eqnb', version: 1, text: big } });
  await first;
  const lines = big.split('\n');
  const batchLine = lines.findIndex((l) => l.startsWith('batch '));
  const hovers: number[] = [];
  let text = big;
  for (let v = 2; v < EDITS + 2; v++) {
    // Type one character at the end of a note near the top, then hover a batch at once.
    text = text.replace('campaign', v % 2 ? 'campaigns' : 'campaign');
    w.notify('textDocument/didChange', { textDocument: { uri, version: v }, contentChanges: [{ text }] });
    const t0 = performance.now();
    await w.request('textDocument/hover', { textDocument: { uri }, position: { line: batchLine, character: 7 } });
    hovers.push(performance.now() - t0);
  }
  w.close();
  const s = median(startup);
  const h = median(hovers);
  return [
    `editor: server launch to first diagnostics on a 1,000-line notebook: median ${s.toFixed(0)} ms over ${STARTUP_RUNS} launches (target < ${STARTUP_TARGET_MS} ms: ${(s / STARTUP_TARGET_MS).toFixed(2)} of budget)`,
    `editor: hover sent right after an edit of the 5,000-line notebook: median ${h.toFixed(1)} ms over ${EDITS} edits (answered from the latest finished analysis)`,
  ];
}
