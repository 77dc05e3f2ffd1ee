// Bundles the thin client, the language server, the CLI and the benchmark into dist/.
// One config for all entry points; type-checking is a separate step (`npm run typecheck`).
import * as esbuild from 'esbuild';

const watch = process.argv.includes('--watch');
const production = process.argv.includes('--production');

/** @type {import('esbuild').BuildOptions} */
const common = {
  bundle: true,
  platform: 'node',
  target: 'node20',
  format: 'cjs',
  sourcemap: !production,
  minify: production,
  logLevel: 'warning',
  legalComments: 'none',
};

const entries = [
  { in: 'client/src/extension.ts', out: 'client', external: ['vscode'] },
  { in: 'server/src/lsp/main.ts', out: 'server', external: [] },
  { in: 'server/src/cli/main.ts', out: 'cli', external: [], banner: '#!/usr/bin/env node' },
  { in: 'server/src/bench/main.ts', out: 'bench', external: [] },
];

const contexts = await Promise.all(
  entries.map((e) =>
    esbuild.context({
      ...common,
      entryPoints: { [e.out]: e.in },
      outdir: 'dist',
      external: e.external,
      banner: e.banner ? { js: e.banner } : undefined,
    }),
  ),
);

if (watch) {
  await Promise.all(contexts.map((c) => c.watch()));
} else {
  await Promise.all(contexts.map((c) => c.rebuild()));
  await Promise.all(contexts.map((c) => c.dispose()));
}
