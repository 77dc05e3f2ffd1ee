// The thin VS Code client: starts the bundled language server for `eqnb`
// documents, registers the Stillpoint commands (which call the server), and
// shows the server's notebook summary in the status bar. No analysis here.
import * as path from 'node:path';
import {
  commands,
  env,
  StatusBarAlignment,
  Uri,
  ViewColumn,
  window,
  workspace,
  type ExtensionContext,
  type StatusBarItem,
} from 'vscode';
import {
  CloseAction,
  ErrorAction,
  LanguageClient,
  TransportKind,
  type LanguageClientOptions,
  type ServerOptions,
} from 'vscode-languageclient/node';

let client: LanguageClient | undefined;

/** Restarts allowed within RESTART_WINDOW_MS before the client gives up and says so. */
const MAX_RESTARTS = 4;
const RESTART_WINDOW_MS = 3 * 60 * 1000;

interface Summary {
  uri: string;
  reactions: number;
  batches: number;
  errors: number;
  warnings: number;
}

function diagnosticsOptions(): unknown {
  const config = workspace.getConfiguration('stillpoint');
  return { silence: config.get<string[]>('diagnostics.silence', []), severity: config.get<Record<string, string>>('diagnostics.severity', {}) };
}

export async function activate(context: ExtensionContext): Promise<void> {
  const serverModule = context.asAbsolutePath(path.join('dist', 'server.js'));
  const serverOptions: ServerOptions = {
    run: { module: serverModule, transport: TransportKind.ipc },
    debug: { module: serverModule, transport: TransportKind.ipc, options: { execArgv: ['--nolazy', '--inspect=6009'] } },
  };
  const config = workspace.getConfiguration('stillpoint');
  const restarts: number[] = [];
  const clientOptions: LanguageClientOptions = {
    documentSelector: [{ language: 'eqnb' }],
    synchronize: { configurationSection: 'stillpoint' },
    initializationOptions: { diagnosticsDelayMs: config.get<number>('diagnostics.delayMs', 250), diagnostics: diagnosticsOptions() },
    middleware: {
      // The `stillpoint.inlayHints.enabled` setting is read on every request, so it applies at once.
      provideInlayHints: (document, range, token, next) =>
        workspace.getConfiguration('stillpoint').get<boolean>('inlayHints.enabled', true) ? next(document, range, token) : [],
    },
    errorHandler: {
      error: () => ({ action: ErrorAction.Continue }),
      closed: () => {
        const now = Date.now();
        restarts.push(now);
        while (restarts.length > 0 && now - restarts[0] > RESTART_WINDOW_MS) restarts.shift();
        if (restarts.length > MAX_RESTARTS) {
          void window.showErrorMessage('The Stillpoint server stopped repeatedly and will not be restarted. Run "Stillpoint: Show Server Output" for details, then "Stillpoint: Restart Server".');
          return { action: CloseAction.DoNotRestart, handled: true };
        }
        void window.showWarningMessage('The Stillpoint server stopped unexpectedly and has been restarted.');
        return { action: CloseAction.Restart, handled: true };
      },
    },
  };
  client = new LanguageClient('stillpoint', 'Stillpoint', serverOptions, clientOptions);

  const status: StatusBarItem = window.createStatusBarItem(StatusBarAlignment.Left, 10);
  status.command = 'workbench.actions.view.problems';
  const summaries = new Map<string, Summary>();
  const showStatus = (): void => {
    const doc = window.activeTextEditor?.document;
    const s = doc && doc.languageId === 'eqnb' ? summaries.get(doc.uri.toString()) : undefined;
    if (!s) {
      status.hide();
      return;
    }
    const problems = s.errors + s.warnings;
    status.text = `$(beaker) ${s.reactions} reaction${s.reactions === 1 ? '' : 's'}, ${s.batches} batch${s.batches === 1 ? '' : 'es'}${problems > 0 ? `, $(warning) ${problems}` : ', $(check)'}`;
    status.tooltip = `Stillpoint: ${s.errors} error${s.errors === 1 ? '' : 's'}, ${s.warnings} warning${s.warnings === 1 ? '' : 's'} in this notebook`;
    status.show();
  };

  const activeUri = (): string | undefined => {
    const doc = window.activeTextEditor?.document;
    return doc && doc.languageId === 'eqnb' ? doc.uri.toString() : undefined;
  };

  context.subscriptions.push(
    status,
    window.onDidChangeActiveTextEditor(showStatus),
    commands.registerCommand('stillpoint.balanceAll', async () => {
      const uri = activeUri();
      if (!uri || !client) return;
      const count = await client.sendRequest<number>('workspace/executeCommand', { command: 'stillpoint.server.balanceAll', arguments: [uri] });
      void window.showInformationMessage(count > 0 ? `Balanced ${count} equation${count === 1 ? '' : 's'}.` : 'No equation needs balancing (or none has a unique balance).');
    }),
    commands.registerCommand('stillpoint.copyBatchResults', async (uriArg?: string, nameArg?: string) => {
      const uri = uriArg ?? activeUri();
      if (!uri || !client) return;
      let name = nameArg;
      if (!name) {
        const names = await client.sendRequest<string[]>('workspace/executeCommand', { command: 'stillpoint.server.batchNames', arguments: [uri] });
        name = names.length === 1 ? names[0] : await window.showQuickPick(names, { placeHolder: 'Copy the results of which batch?' });
      }
      if (!name) return;
      const md = await client.sendRequest<string | null>('workspace/executeCommand', { command: 'stillpoint.server.batchMarkdown', arguments: [uri, name] });
      if (!md) return;
      await env.clipboard.writeText(md);
      void window.showInformationMessage(`Copied the results of batch ${name} as a Markdown table.`);
    }),
    commands.registerCommand('stillpoint.showReport', async () => {
      const uri = activeUri();
      if (!uri || !client) return;
      const md = await client.sendRequest<string | null>('workspace/executeCommand', { command: 'stillpoint.server.report', arguments: [uri] });
      if (!md) return;
      await window.showTextDocument(await workspace.openTextDocument({ language: 'markdown', content: md }));
    }),
    commands.registerCommand('stillpoint.showChart', async (uriArg?: string, nameArg?: string, indexArg?: number) => {
      const uri = uriArg ?? activeUri();
      if (!uri || !client) return;
      let name = nameArg;
      if (!name) {
        const names = await client.sendRequest<string[]>('workspace/executeCommand', { command: 'stillpoint.server.batchNames', arguments: [uri] });
        name = names.length === 1 ? names[0] : await window.showQuickPick(names, { placeHolder: 'Chart the sweep of which batch?' });
      }
      if (!name) return;
      const svg = await client.sendRequest<string | null>('workspace/executeCommand', { command: 'stillpoint.server.chart', arguments: [uri, name, indexArg ?? 0] });
      if (!svg) {
        void window.showInformationMessage(`Batch ${name} has no solved sweep: add a line such as "vary T from 40 to 120 °C step 10".`);
        return;
      }
      const panel = window.createWebviewPanel('stillpoint.chart', `Equilibrium chart: ${name}`, ViewColumn.Beside, {
        enableScripts: false,
        localResourceRoots: [Uri.file(context.asAbsolutePath('media'))],
      });
      const nonce = Array.from({ length: 32 }, () => Math.floor(Math.random() * 16).toString(16)).join('');
      panel.webview.html = [
        '<!DOCTYPE html><html><head><meta charset="utf-8">',
        `<meta http-equiv="Content-Security-Policy" content="default-src 'none'; style-src 'nonce-${nonce}'; img-src ${panel.webview.cspSource};">`,
        `<style nonce="${nonce}">body{color:var(--vscode-editor-foreground);background:var(--vscode-editor-background);font-family:var(--vscode-font-family)}svg{max-width:100%;height:auto}</style>`,
        '</head><body>',
        svg,
        '<p>Ideal equilibrium estimates, not a process-safety assessment. Hover a point for its value.</p>',
        '</body></html>',
      ].join('\n');
    }),
    commands.registerCommand('stillpoint.restartServer', async () => {
      await client?.restart();
    }),
    commands.registerCommand('stillpoint.showOutput', () => client?.outputChannel.show()),
    commands.registerCommand('stillpoint.openExample', async () => {
      const file = context.asAbsolutePath(path.join('media', 'example.eqnb'));
      await window.showTextDocument(await workspace.openTextDocument(file));
    }),
    { dispose: () => void client?.stop() },
  );

  await client.start();
  client.onNotification('stillpoint/summary', (s: Summary) => {
    summaries.set(s.uri, s);
    showStatus();
  });
  showStatus();
}

export async function deactivate(): Promise<void> {
  await client?.stop();
  client = undefined;
}
