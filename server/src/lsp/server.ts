// Wires the analysis API to a protocol connection: document sync, debounced
// diagnostics, hover, quick fixes and the outline. Every handler goes through
// runSafe and the per-version analysis cache.
import {
  CodeActionKind,
  TextDocumentSyncKind,
  type Connection,
  type InitializeParams,
  type InitializeResult,
} from 'vscode-languageserver/node';
import { createNotebookService } from '../notebook/ide/service';
import { toCodeAction, toDiagnostic, toDocumentSymbol, toHover, toInlayHint } from './convert';
import { DocumentStore } from './documents';
import { runSafe } from './safe';

/** Default wait after the last keystroke before diagnostics are recomputed (ms). */
export const DEFAULT_DIAGNOSTICS_DELAY_MS = 250;

export function startServer(connection: Connection): void {
  const service = createNotebookService();
  const store = new DocumentStore(service);
  const timers = new Map<string, ReturnType<typeof setTimeout>>();
  let delayMs = DEFAULT_DIAGNOSTICS_DELAY_MS;

  connection.onInitialize((params: InitializeParams): InitializeResult => {
    const options = params.initializationOptions as { diagnosticsDelayMs?: unknown } | undefined;
    if (typeof options?.diagnosticsDelayMs === 'number' && options.diagnosticsDelayMs >= 0) delayMs = options.diagnosticsDelayMs;
    return {
      capabilities: {
        textDocumentSync: { openClose: true, change: TextDocumentSyncKind.Incremental, save: { includeText: false } },
        hoverProvider: true,
        codeActionProvider: { codeActionKinds: [CodeActionKind.QuickFix] },
        documentSymbolProvider: true,
        inlayHintProvider: true,
      },
      serverInfo: { name: 'stillpoint', version: '0.1.0' },
    };
  });

  const publish = (uri: string): void => {
    timers.delete(uri);
    runSafe(connection, 'diagnostics', undefined, () => {
      const analysis = store.analysis(uri);
      if (!analysis) return;
      void connection.sendDiagnostics({ uri, diagnostics: analysis.diagnostics.map((d) => toDiagnostic(analysis, d)) });
    });
  };
  const schedule = (uri: string, delay: number): void => {
    const t = timers.get(uri);
    if (t) clearTimeout(t);
    if (delay <= 0) publish(uri);
    else timers.set(uri, setTimeout(() => publish(uri), delay));
  };

  store.documents.onDidOpen((e) => schedule(e.document.uri, 0));
  store.documents.onDidChangeContent((e) => schedule(e.document.uri, delayMs));
  store.documents.onDidSave((e) => schedule(e.document.uri, 0));
  store.documents.onDidClose((e) => {
    const t = timers.get(e.document.uri);
    if (t) clearTimeout(t);
    timers.delete(e.document.uri);
    void connection.sendDiagnostics({ uri: e.document.uri, diagnostics: [] });
  });

  connection.onHover((params) =>
    runSafe(connection, 'hover', null, () => {
      const analysis = store.analysis(params.textDocument.uri);
      if (!analysis) return null;
      const h = service.hover(analysis, analysis.lines.offset(params.position));
      return h ? toHover(analysis, h) : null;
    }),
  );

  connection.onCodeAction((params) =>
    runSafe(connection, 'code actions', [], () => {
      const analysis = store.analysis(params.textDocument.uri);
      if (!analysis) return [];
      const start = analysis.lines.offset(params.range.start);
      const end = analysis.lines.offset(params.range.end);
      return service.codeActions(analysis, start, end).map((a) => toCodeAction(analysis, params.textDocument.uri, a));
    }),
  );

  connection.onDocumentSymbol((params) =>
    runSafe(connection, 'document symbols', [], () => {
      const analysis = store.analysis(params.textDocument.uri);
      if (!analysis) return [];
      return service.documentSymbols(analysis).map((s) => toDocumentSymbol(analysis, s));
    }),
  );

  connection.languages.inlayHint.on((params) =>
    runSafe(connection, 'inlay hints', [], () => {
      const analysis = store.analysis(params.textDocument.uri);
      if (!analysis) return [];
      const start = analysis.lines.offset(params.range.start);
      const end = analysis.lines.offset(params.range.end);
      return service.inlayHints(analysis, start, end).map((h) => toInlayHint(analysis, h));
    }),
  );

  store.documents.listen(connection);
  connection.listen();
}
