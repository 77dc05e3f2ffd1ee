// Runs test/editors/nvim-smoke.lua in headless Neovim 0.7 against the bundled server (dist/server.js),
// on a copy of examples/with-mistakes/step4-draft.eqnb, with Neovim's state in a fresh temporary folder.
// Prints a JSON summary, keeps Neovim's LSP log and the server's stderr in artifacts/editors/, and exits
// non-zero (naming the failed steps) when any step fails, above all when the server does not start.
//   node test/editors/run-nvim.mjs
// Env: STILLPOINT_EXPECT_FORMATTING=0 (formatting is known to be missing), NVIM (default nvim),
// STILLPOINT_NVIM_SERVER (another server script, e.g. to see the start-up failure), STILLPOINT_TIMEOUT_MS.
import { spawn } from 'node:child_process';
import { copyFileSync, existsSync, mkdirSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { fileURLToPath } from 'node:url';

const here = path.dirname(fileURLToPath(import.meta.url));
const root = path.resolve(here, '../..');
const artifacts = path.join(root, 'artifacts/editors');
const server = path.resolve(process.env.STILLPOINT_NVIM_SERVER ?? path.join(root, 'dist/server.js'));
const notebook = path.join(root, 'examples/with-mistakes/step4-draft.eqnb');
/** The whole Neovim run may take at most this long (ms); it normally takes well under a second. */
const RUN_TIMEOUT_MS = 60_000;

function fail(message) {
  console.error(`\nrun-nvim: FAILED: ${message}\n`);
  process.exit(1);
}

if (!existsSync(server)) fail(`no server bundle at ${path.relative(root, server)}: run \`npm run package\` (or \`npm run build\`) first`);

mkdirSync(artifacts, { recursive: true });
const run = mkdtempSync(path.join(tmpdir(), 'stillpoint-nvim-'));
const workspace = path.join(run, 'workspace');
mkdirSync(workspace);
const file = path.join(workspace, 'step4-draft.eqnb');
copyFileSync(notebook, file);
const xdg = Object.fromEntries(['XDG_CONFIG_HOME', 'XDG_DATA_HOME', 'XDG_CACHE_HOME', 'XDG_STATE_HOME'].map((k) => [k, path.join(run, k)]));
Object.values(xdg).forEach((d) => mkdirSync(d));
const serverStderr = path.join(artifacts, 'nvim-server-stderr.log');

const started = Date.now();
const nvim = spawn(process.env.NVIM ?? 'nvim', ['--headless', '-u', 'NONE', '-i', 'NONE', '-n', '-c', `luafile ${path.join(here, 'nvim-smoke.lua')}`], {
  cwd: workspace,
  env: {
    ...process.env,
    ...xdg,
    STILLPOINT_NODE: process.execPath,
    STILLPOINT_SERVER: server,
    STILLPOINT_FILE: file,
    STILLPOINT_SERVER_STDERR: serverStderr,
  },
  stdio: ['ignore', 'pipe', 'pipe'],
});
let stdout = '';
let stderr = '';
nvim.stdout.on('data', (d) => (stdout += d));
nvim.stderr.on('data', (d) => (stderr += d));
const timer = setTimeout(() => nvim.kill('SIGKILL'), RUN_TIMEOUT_MS);
const [code, signal] = await new Promise((resolve) => {
  nvim.on('exit', (c, s) => resolve([c, s]));
  nvim.on('error', (e) => fail(`could not run Neovim: ${e.message} (run test/editors/setup.sh)`));
});
clearTimeout(timer);

// The smoke script prints exactly one JSON line; Neovim may print terminal noise around it.
const line = stdout.split('\n').find((l) => l.startsWith('{') && l.includes('"steps"'));
let summary;
try {
  summary = JSON.parse(line ?? '');
} catch {
  summary = { ok: false, steps: [], unparsed_stdout: stdout.slice(0, 4000) };
}
summary.nvim_exit = { code, signal, wall_ms: Date.now() - started };
if (stderr.trim()) summary.nvim_stderr = stderr.slice(0, 4000);

// Artifacts: Neovim's LSP log (debug level: every message both ways) and the server's stderr.
if (summary.lsp_log && existsSync(summary.lsp_log)) {
  copyFileSync(summary.lsp_log, path.join(artifacts, 'nvim-lsp.log'));
  summary.lsp_log = 'artifacts/editors/nvim-lsp.log';
}
summary.server_stderr = 'artifacts/editors/nvim-server-stderr.log';
writeFileSync(path.join(artifacts, 'nvim-summary.json'), JSON.stringify(summary, null, 2) + '\n');
rmSync(run, { recursive: true, force: true });

// stdout gets the summary without the long capability list and diagnostic texts (both are in the artifact)
const { server_capabilities: capabilities, diagnostics, ...brief } = summary;
brief.server_capabilities = capabilities ? Object.keys(capabilities) : null;
brief.diagnostic_codes = (diagnostics ?? []).map((d) => `${d.line}:${d.code}`);
console.log(JSON.stringify(brief, null, 2));
const failed = (summary.steps ?? []).filter((s) => !s.ok);
const passed = (summary.steps ?? []).filter((s) => s.ok);
for (const s of summary.steps ?? []) console.log(`${s.ok ? 'PASS' : 'FAIL'}  nvim: ${s.name}${s.ok ? '' : `: ${s.detail}`}`);
if (code !== 0 || !summary.ok || failed.length > 0 || passed.length === 0) {
  const startFailed = failed.find((s) => /server starts/.test(s.name));
  if (startFailed) {
    const stderrText = existsSync(serverStderr) ? readFileSync(serverStderr, 'utf8') : '';
    const firstError = stderrText.split('\n').find((l) => /^\w*Error\b/.test(l));
    fail(`the language server did not start in Neovim: ${startFailed.detail}${firstError ? `: ${firstError}` : ''} (server stderr: ${summary.server_stderr})`);
  }
  fail(
    failed.length
      ? `Neovim steps failed: ${failed.map((s) => `"${s.name}": ${s.detail}`).join('; ')}`
      : `Neovim exited with ${code ?? signal} and no step results (see nvim_stderr / unparsed_stdout above)`,
  );
}
console.log(`run-nvim: ${passed.length} passed, 0 failed`);
