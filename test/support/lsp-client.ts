// A minimal LSP client for protocol-level tests: spawns the real bundled
// server (dist/server.js --stdio) and speaks JSON-RPC with Content-Length
// framing over its stdio. Collects notifications so tests can wait for them.
import { spawn, type ChildProcessWithoutNullStreams } from 'node:child_process';
import { resolve } from 'node:path';

export const SERVER_PATH = resolve(__dirname, '../../dist/server.js');

type Json = null | boolean | number | string | Json[] | { [key: string]: Json | undefined };

interface Message {
  jsonrpc: '2.0';
  id?: number | string;
  method?: string;
  params?: Json;
  result?: Json;
  error?: { code: number; message: string };
}

export class LspTestClient {
  private readonly proc: ChildProcessWithoutNullStreams;
  private buffer = Buffer.alloc(0);
  private nextId = 1;
  private readonly pending = new Map<number, { resolve: (m: Message) => void }>();
  readonly notifications: Message[] = [];
  /** Requests the server sent to this client (workspace/applyEdit, ...). */
  readonly serverRequests: Message[] = [];
  private readonly waiters: { method: string; test: (p: Json | undefined) => boolean; resolve: (p: Json | undefined) => void }[] = [];
  stderr = '';

  constructor(serverPath = SERVER_PATH) {
    this.proc = spawn(process.execPath, [serverPath, '--stdio'], { stdio: ['pipe', 'pipe', 'pipe'] });
    this.proc.stdout.on('data', (chunk: Buffer) => this.onData(chunk));
    this.proc.stderr.on('data', (chunk: Buffer) => {
      this.stderr += chunk.toString('utf8');
    });
  }

  private onData(chunk: Buffer): void {
    this.buffer = Buffer.concat([this.buffer, chunk]);
    for (;;) {
      const headerEnd = this.buffer.indexOf('\r\n\r\n');
      if (headerEnd < 0) return;
      const header = this.buffer.subarray(0, headerEnd).toString('ascii');
      const m = /Content-Length: (\d+)/i.exec(header);
      if (!m) throw new Error(`bad header from server: ${header}`);
      const length = Number(m[1]);
      if (this.buffer.length < headerEnd + 4 + length) return;
      const body = this.buffer.subarray(headerEnd + 4, headerEnd + 4 + length).toString('utf8');
      this.buffer = this.buffer.subarray(headerEnd + 4 + length);
      this.onMessage(JSON.parse(body) as Message);
    }
  }

  private onMessage(msg: Message): void {
    if (msg.id !== undefined && msg.method === undefined) {
      const p = this.pending.get(Number(msg.id));
      if (p) {
        this.pending.delete(Number(msg.id));
        p.resolve(msg);
      }
      return;
    }
    if (msg.id !== undefined && msg.method !== undefined) {
      // A request from the server. Edits are recorded and accepted, as an editor would apply them;
      // anything else (e.g. workspace/configuration) is answered with null.
      this.serverRequests.push(msg);
      this.send({ jsonrpc: '2.0', id: msg.id, result: msg.method === 'workspace/applyEdit' ? { applied: true } : null });
      return;
    }
    this.notifications.push(msg);
    for (let i = this.waiters.length - 1; i >= 0; i--) {
      const w = this.waiters[i];
      if (w.method === msg.method && w.test(msg.params)) {
        this.waiters.splice(i, 1);
        w.resolve(msg.params);
      }
    }
  }

  private send(msg: Message): void {
    const body = Buffer.from(JSON.stringify(msg), 'utf8');
    this.proc.stdin.write(`Content-Length: ${body.length}\r\n\r\n`);
    this.proc.stdin.write(body);
  }

  async request<T = Json>(method: string, params: Json): Promise<T> {
    const id = this.nextId++;
    const reply = await new Promise<Message>((resolve) => {
      this.pending.set(id, { resolve });
      this.send({ jsonrpc: '2.0', id, method, params });
    });
    if (reply.error) throw new Error(`${method} failed: ${reply.error.message}`);
    return reply.result as T;
  }

  notify(method: string, params: Json): void {
    this.send({ jsonrpc: '2.0', method, params });
  }

  /** Resolves with the params of the next (or an already received) notification that passes `test`. */
  waitFor<T = Json>(method: string, test: (params: T) => boolean = () => true, timeoutMs = 10000): Promise<T> {
    const seen = this.notifications.find((n) => n.method === method && test(n.params as T));
    if (seen) return Promise.resolve(seen.params as T);
    return new Promise<T>((resolve, reject) => {
      const timer = setTimeout(() => reject(new Error(`timed out waiting for ${method}; server stderr:\n${this.stderr}`)), timeoutMs);
      this.waiters.push({
        method,
        test: (p) => test(p as T),
        resolve: (p) => {
          clearTimeout(timer);
          resolve(p as T);
        },
      });
    });
  }

  /**
   * `pull: true` declares pull-diagnostics support (LSP 3.17) as VS Code does; `folders` are
   * workspace folder URIs for workspace symbols.
   */
  async initialize(
    initializationOptions: Json = { diagnosticsDelayMs: 0 },
    options: { pull?: boolean; folders?: string[] } = {},
  ): Promise<Json> {
    const result = await this.request('initialize', {
      processId: process.pid,
      rootUri: null,
      workspaceFolders: options.folders ? options.folders.map((uri, i) => ({ uri, name: `folder-${i}` })) : null,
      capabilities: {
        textDocument: {
          publishDiagnostics: {},
          hover: { contentFormat: ['markdown'] },
          codeAction: {},
          ...(options.pull ? { diagnostic: { dynamicRegistration: false } } : {}),
        },
      },
      initializationOptions,
    });
    this.notify('initialized', {});
    return result;
  }

  async shutdown(): Promise<number | null> {
    await this.request('shutdown', null);
    this.notify('exit', null);
    return new Promise((resolve) => {
      if (this.proc.exitCode !== null) resolve(this.proc.exitCode);
      else this.proc.on('exit', (code) => resolve(code));
    });
  }

  kill(): void {
    if (this.proc.exitCode === null) this.proc.kill();
  }
}
