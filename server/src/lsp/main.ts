// Entry point of the bundled language server (dist/server.js). Speaks LSP over
// stdio (`node dist/server.js --stdio`), or over Node IPC when started by the
// VS Code client that way.
import { createConnection, ProposedFeatures } from 'vscode-languageserver/node';
import { startServer } from './server';

const connection = createConnection(ProposedFeatures.all);
startServer(connection);
