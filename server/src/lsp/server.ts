// Wires the analysis API to a protocol connection: document sync, debounced
// diagnostics, hover, quick fixes and the outline. Every handler goes through
// runSafe and the per-version analysis cache.
import {
  CodeActionKind,
  DocumentDiagnosticReportKind,
  DocumentHighlightKind,
  ResponseError,
  ErrorCodes,
  TextDocumentSyncKind,
  type Connection,
  type InitializeParams,
  type InitializeResult,
  type SymbolInformation,
  type WorkspaceEdit,
} from 'vscode-languageserver/node';
import { SEMANTIC_TOKEN_MODIFIERS, SEMANTIC_TOKEN_TYPES } from '../notebook/ide/semantic-tokens';
import { WorkspaceIndex } from './workspace';
import { createNotebookService, type Analysis, type Diagnostic, type Severity } from '../notebook/ide/service';
import { toCodeAction, toCompletionList, toDiagnostic, toDocumentSymbol, toHover, toInlayHint, toRange, toSemanticTokens, toSymbolInformation } from './convert';
import { DocumentStore } from './documents';
import { runSafe } from './safe';

/** Default wait after the last keystroke before diagnostics are recomputed (ms). */
export const DEFAULT_DIAGNOSTICS_DELAY_MS = 250;

/** Commands the server runs for the client (the client's own commands call these). */
export const SERVER_COMMANDS = {
  balanceAll: 'stillpoint.server.balanceAll',
  batchMarkdown: 'stillpoint.server.batchMarkdown',
  batchNames: 'stillpoint.server.batchNames',
  report: 'stillpoint.server.report',
  chart: 'stillpoint.server.chart',
} as const;

/** The notification that carries a notebook's summary to the client's status bar. */
export const SUMMARY_NOTIFICATION = 'stillpoint/summary';

/** Diagnostics settings (`stillpoint.diagnostics.*`): codes to silence, and severity overrides. */
export interface DiagnosticsSettings {
  readonly silence: readonly string[];
  readonly severity: Readonly<Record<string, Severity>>;
}

const SEVERITIES: readonly Severity[] = ['error', 'warning', 'information', 'hint'];

/** Reads the settings leniently: anything malformed is ignored, never fatal. */
export function readDiagnosticsSettings(raw: unknown): DiagnosticsSettings {
  const o = (raw ?? {}) as { silence?: unknown; severity?: unknown };
  const silence = Array.isArray(o.silence) ? o.silence.filter((x): x is string => typeof x === 'string') : [];
  const severity: Record<string, Severity> = {};
  if (o.severity && typeof o.severity === 'object') {
    for (const [code, value] of Object.entries(o.severity as Record<string, unknown>)) {
      if (typeof value === 'string' && (SEVERITIES as readonly string[]).includes(value)) severity[code] = value as Severity;
    }
  }
  return { silence, severity };
}

export function applyDiagnosticsSettings(diagnostics: readonly Diagnostic[], settings: DiagnosticsSettings): Diagnostic[] {
  return diagnostics
    .filter((d) => !settings.silence.includes(d.code))
    .map((d) => (settings.severity[d.code] ? { ...d, severity: settings.severity[d.code] } : d));
}

export function startServer(connection: Connection): void {
  const service = createNotebookService();
  const store = new DocumentStore(service);
  const timers = new Map<string, ReturnType<typeof setTimeout>>();
  let delayMs = DEFAULT_DIAGNOSTICS_DELAY_MS;
  /** Clients that pull diagnostics (LSP 3.17) get them on request; the others get them published. */
  let pullDiagnostics = false;
  let settings: DiagnosticsSettings = { silence: [], severity: {} };
  const shownDiagnostics = (analysis: Analysis) => applyDiagnosticsSettings(analysis.diagnostics, settings).map((d) => toDiagnostic(analysis, d));
  const sendSummary = (uri: string, analysis: Analysis): void => {
    const diagnostics = applyDiagnosticsSettings(analysis.diagnostics, settings);
    void connection.sendNotification(SUMMARY_NOTIFICATION, {
      uri,
      ...service.summary(analysis),
      errors: diagnostics.filter((d) => d.severity === 'error').length,
      warnings: diagnostics.filter((d) => d.severity === 'warning').length,
    });
  };
  const workspace = new WorkspaceIndex(service, (uri) => (store.documents.get(uri) ? store.current(uri) : undefined));

  connection.onInitialize((params: InitializeParams): InitializeResult => {
    const options = params.initializationOptions as { diagnosticsDelayMs?: unknown; diagnostics?: unknown } | undefined;
    settings = readDiagnosticsSettings(options?.diagnostics);
    if (typeof options?.diagnosticsDelayMs === 'number' && options.diagnosticsDelayMs >= 0) delayMs = options.diagnosticsDelayMs;
    store.delayMs = delayMs;
    pullDiagnostics = params.capabilities.textDocument?.diagnostic !== undefined;
    workspace.setRoots([...(params.workspaceFolders ?? []).map((f) => f.uri), ...(params.workspaceFolders ? [] : params.rootUri ? [params.rootUri] : [])]);
    return {
      capabilities: {
        textDocumentSync: { openClose: true, change: TextDocumentSyncKind.Incremental, save: { includeText: false } },
        hoverProvider: true,
        codeActionProvider: { codeActionKinds: [CodeActionKind.QuickFix] },
        documentSymbolProvider: true,
        inlayHintProvider: true,
        completionProvider: { triggerCharacters: [' '] },
        documentFormattingProvider: true,
        codeLensProvider: { resolveProvider: false },
        executeCommandProvider: { commands: Object.values(SERVER_COMMANDS) },
        documentRangeFormattingProvider: true,
        definitionProvider: true,
        referencesProvider: true,
        documentHighlightProvider: true,
        renameProvider: { prepareProvider: true },
        foldingRangeProvider: true,
        workspaceSymbolProvider: true,
        semanticTokensProvider: {
          legend: { tokenTypes: [...SEMANTIC_TOKEN_TYPES], tokenModifiers: [...SEMANTIC_TOKEN_MODIFIERS] },
          full: true,
        },
        ...(pullDiagnostics ? { diagnosticProvider: { interFileDependencies: false, workspaceDiagnostics: false } } : {}),
      },
      serverInfo: { name: 'stillpoint', version: '0.1.0' },
    };
  });

  const publish = (uri: string): void => {
    timers.delete(uri);
    if (pullDiagnostics) {
      const analysis = store.current(uri);
      if (analysis) sendSummary(uri, analysis);
      return;
    }
    runSafe(connection, 'diagnostics', undefined, () => {
      const analysis = store.current(uri);
      if (!analysis) return;
      void connection.sendDiagnostics({ uri, diagnostics: shownDiagnostics(analysis) });
      sendSummary(uri, analysis);
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
      const analysis = store.latest(params.textDocument.uri);
      if (!analysis) return null;
      const h = service.hover(analysis, analysis.lines.offset(params.position));
      return h ? toHover(analysis, h) : null;
    }),
  );

  connection.onCodeAction((params) =>
    runSafe(connection, 'code actions', [], () => {
      const analysis = store.current(params.textDocument.uri);
      if (!analysis) return [];
      const start = analysis.lines.offset(params.range.start);
      const end = analysis.lines.offset(params.range.end);
      return service.codeActions(analysis, start, end).map((a) => toCodeAction(analysis, params.textDocument.uri, a));
    }),
  );

  connection.onDocumentSymbol((params) =>
    runSafe(connection, 'document symbols', [], () => {
      const analysis = store.latest(params.textDocument.uri);
      if (!analysis) return [];
      return service.documentSymbols(analysis).map((s) => toDocumentSymbol(analysis, s));
    }),
  );

  connection.languages.inlayHint.on((params) =>
    runSafe(connection, 'inlay hints', [], () => {
      const analysis = store.latest(params.textDocument.uri);
      if (!analysis) return [];
      const start = analysis.lines.offset(params.range.start);
      const end = analysis.lines.offset(params.range.end);
      return service.inlayHints(analysis, start, end).map((h) => toInlayHint(analysis, h));
    }),
  );

  connection.languages.diagnostics.on((params) =>
    runSafe(connection, 'diagnostics', { kind: DocumentDiagnosticReportKind.Full, items: [] }, () => {
      const analysis = store.current(params.textDocument.uri);
      return {
        kind: DocumentDiagnosticReportKind.Full,
        items: analysis ? shownDiagnostics(analysis) : [],
      };
    }),
  );

  connection.onCompletion((params) =>
    runSafe(connection, 'completion', null, () => {
      const analysis = store.current(params.textDocument.uri);
      if (!analysis) return null;
      return toCompletionList(analysis, service.completions(analysis, analysis.lines.offset(params.position)));
    }),
  );

  const formatEdits = (uri: string, range?: { start: { line: number; character: number }; end: { line: number; character: number } }) =>
    runSafe(connection, 'formatting', [], () => {
      const analysis = store.current(uri);
      if (!analysis) return [];
      const start = range ? analysis.lines.offset(range.start) : 0;
      const end = range ? analysis.lines.offset(range.end) : analysis.text.length;
      return service.formatting(analysis, start, end).map((e) => ({ range: toRange(analysis, e.start, e.end), newText: e.newText }));
    });
  connection.onDocumentFormatting((params) => formatEdits(params.textDocument.uri));
  connection.onDocumentRangeFormatting((params) => formatEdits(params.textDocument.uri, params.range));

  connection.onDidChangeConfiguration((change) => {
    const section = (change.settings as { stillpoint?: { diagnostics?: unknown } } | undefined)?.stillpoint;
    if (!section) return;
    settings = readDiagnosticsSettings(section.diagnostics);
    if (pullDiagnostics) connection.languages.diagnostics.refresh();
    else for (const doc of store.documents.all()) schedule(doc.uri, 0);
  });

  connection.onCodeLens((params) =>
    runSafe(connection, 'code lens', [], () => {
      const analysis = store.latest(params.textDocument.uri);
      if (!analysis) return [];
      return service.codeLenses(analysis).map((l) => ({
        range: toRange(analysis, l.start, l.end),
        command:
          l.action === 'chart'
            ? { title: l.title, command: 'stillpoint.showChart', arguments: [params.textDocument.uri, l.batch, l.sweep ?? 0] }
            : { title: l.title, command: 'stillpoint.copyBatchResults', arguments: [params.textDocument.uri, l.batch] },
      }));
    }),
  );

  connection.onExecuteCommand(async (params) => {
    const [uri, name] = (params.arguments ?? []) as [unknown, unknown];
    if (typeof uri !== 'string') return null;
    const analysis = runSafe(connection, 'command', undefined, () => store.current(uri));
    if (!analysis) return null;
    switch (params.command) {
      case SERVER_COMMANDS.batchMarkdown:
        return typeof name === 'string' ? (runSafe(connection, 'batch table', undefined, () => service.batchMarkdown(analysis, name)) ?? null) : null;
      case SERVER_COMMANDS.batchNames:
        return analysis.model.batches.map((b) => b.name);
      case SERVER_COMMANDS.chart: {
        const index = typeof (params.arguments ?? [])[2] === 'number' ? ((params.arguments ?? [])[2] as number) : 0;
        const batch = analysis.model.batches.find((b) => b.name === name);
        return batch ? (runSafe(connection, 'chart', undefined, () => service.batchChartSvg(analysis, batch, index)) ?? null) : null;
      }
      case SERVER_COMMANDS.report:
        return runSafe(connection, 'report', null, () => service.reportMarkdown(analysis, `Equilibrium notebook: ${decodeURIComponent(uri.split('/').pop() ?? uri)}`));
      case SERVER_COMMANDS.balanceAll: {
        const edits = runSafe(connection, 'balance all', [], () => service.balanceAllEdits(analysis));
        if (edits.length === 0) return 0;
        const doc = store.documents.get(uri);
        const applied = await connection.workspace.applyEdit({
          label: 'Balance every equation',
          edit: { documentChanges: [{ textDocument: { uri, version: doc?.version ?? null }, edits: edits.map((e) => ({ range: toRange(analysis, e.start, e.end), newText: e.newText })) }] },
        });
        return applied?.applied ? edits.length : 0;
      }
      default:
        return null;
    }
  });

  connection.onDefinition((params) =>
    runSafe(connection, 'definition', null, () => {
      const analysis = store.current(params.textDocument.uri);
      if (!analysis) return null;
      const d = service.definition(analysis, analysis.lines.offset(params.position));
      return d ? { uri: params.textDocument.uri, range: toRange(analysis, d.start, d.end) } : null;
    }),
  );

  connection.onReferences((params) =>
    runSafe(connection, 'references', [], () => {
      const analysis = store.current(params.textDocument.uri);
      if (!analysis) return [];
      return service
        .references(analysis, analysis.lines.offset(params.position), params.context.includeDeclaration)
        .map((r) => ({ uri: params.textDocument.uri, range: toRange(analysis, r.start, r.end) }));
    }),
  );

  connection.onDocumentHighlight((params) =>
    runSafe(connection, 'highlights', [], () => {
      const analysis = store.current(params.textDocument.uri);
      if (!analysis) return [];
      return service.documentHighlights(analysis, analysis.lines.offset(params.position)).map((h) => ({
        range: toRange(analysis, h.start, h.end),
        kind: h.write ? DocumentHighlightKind.Write : DocumentHighlightKind.Read,
      }));
    }),
  );

  connection.onPrepareRename((params) =>
    runSafe(connection, 'prepare rename', null, () => {
      const analysis = store.current(params.textDocument.uri);
      if (!analysis) return null;
      const r = service.prepareRename(analysis, analysis.lines.offset(params.position));
      return r ? { range: toRange(analysis, r.start, r.end), placeholder: r.placeholder } : null;
    }),
  );

  connection.onRenameRequest((params) => {
    const result = runSafe(connection, 'rename', undefined as WorkspaceEdit | ResponseError<void> | undefined, () => {
      const analysis = store.current(params.textDocument.uri);
      if (!analysis) return undefined;
      const r = service.rename(analysis, analysis.lines.offset(params.position), params.newName);
      if (!r.ok) return new ResponseError<void>(ErrorCodes.InvalidRequest, r.message);
      return { changes: { [params.textDocument.uri]: r.edits.map((e) => ({ range: toRange(analysis, e.start, e.end), newText: e.newText })) } };
    });
    return result ?? null;
  });

  connection.onFoldingRanges((params) =>
    runSafe(connection, 'folding', [], () => {
      const analysis = store.latest(params.textDocument.uri);
      return analysis ? service.foldingRanges(analysis) : [];
    }),
  );

  connection.languages.semanticTokens.on((params) =>
    runSafe(connection, 'semantic tokens', { data: [] }, () => {
      const analysis = store.latest(params.textDocument.uri);
      return analysis ? toSemanticTokens(analysis, service.semanticTokens(analysis)) : { data: [] };
    }),
  );

  connection.onWorkspaceSymbol((params) =>
    runSafe(connection, 'workspace symbols', [] as SymbolInformation[], () =>
      workspace.symbols(params.query).flatMap((f) => f.symbols.map((s) => toSymbolInformation(f.analysis, f.uri, s))),
    ),
  );

  store.documents.listen(connection);
  connection.listen();
}
