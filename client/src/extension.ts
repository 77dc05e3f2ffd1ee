// The thin VS Code client: starts the bundled language server for `eqnb`
// documents and stops it on deactivation. Nothing else lives here.
import * as path from 'node:path';
import { workspace, type ExtensionContext } from 'vscode';
import { LanguageClient, TransportKind, type LanguageClientOptions, type ServerOptions } from 'vscode-languageclient/node';

let client: LanguageClient | undefined;

export async function activate(context: ExtensionContext): Promise<void> {
  const serverModule = context.asAbsolutePath(path.join('dist', 'server.js'));
  const serverOptions: ServerOptions = {
    run: { module: serverModule, transport: TransportKind.ipc },
    debug: { module: serverModule, transport: TransportKind.ipc, options: { execArgv: ['--nolazy', '--inspect=6009'] } },
  };
  const config = workspace.getConfiguration('stillpoint');
  const clientOptions: LanguageClientOptions = {
    documentSelector: [{ language: 'eqnb' }],
    initializationOptions: { diagnosticsDelayMs: config.get<number>('diagnostics.delayMs', 250) },
    middleware: {
      // The `stillpoint.inlayHints.enabled` setting is read on every request, so it applies at once.
      provideInlayHints: (document, range, token, next) =>
        workspace.getConfiguration('stillpoint').get<boolean>('inlayHints.enabled', true) ? next(document, range, token) : [],
    },
  };
  client = new LanguageClient('stillpoint', 'Stillpoint', serverOptions, clientOptions);
  context.subscriptions.push({ dispose: () => void client?.stop() });
  await client.start();
}

export async function deactivate(): Promise<void> {
  await client?.stop();
  client = undefined;
}
