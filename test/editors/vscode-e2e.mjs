// End-to-end test of the packaged extension in real VS Code: installs stillpoint-<version>.vsix into a
// clean code-server profile (code-server from npm on Node 24, both under test/editors/.tools/), opens a
// copy of examples/with-mistakes/step4-draft.eqnb in headless Debian Chromium (driven by playwright-core)
// and checks, as a user would see it: the language mode, the Stillpoint status bar summary, the squiggle
// and the Problems entry, the balance quick fix, the batch hover with its equilibrium table, the inlay
// hint on a batch header, that a killed language server is restarted (with its message) and answers, and
// that the chart code lens of a second notebook opens its SVG chart in a webview with a strict CSP.
//   node test/editors/vscode-e2e.mjs          (after npm run package and test/editors/setup.sh)
// Screenshots, code-server's output and VS Code's logs (extension host included) go to artifacts/editors/.
// Exits non-zero, naming each failed step, when any step fails or the language server does not start.
// Env: STEP_TIMEOUT_MS (default 30000), KEEP_RUN=1 keeps the temporary profile, STILLPOINT_VSIX another
// .vsix of the same extension (e.g. one with a broken server, to see the start-up failure).
import { execFileSync, spawn } from 'node:child_process';
import { copyFileSync, cpSync, createWriteStream, existsSync, mkdirSync, mkdtempSync, readdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { chromium } from 'playwright-core';

const here = path.dirname(fileURLToPath(import.meta.url));
const root = path.resolve(here, '../..');
const pkg = JSON.parse(readFileSync(path.join(root, 'package.json'), 'utf8'));
const VSIX = path.resolve(process.env.STILLPOINT_VSIX ?? path.join(root, `${pkg.name}-${pkg.version}.vsix`));
const EXTENSION_ID = `${pkg.publisher}.${pkg.name}`;
const tools = path.join(here, '.tools');
const NODE24 = path.join(tools, 'bin/node');
const CS_ENTRY = path.join(tools, 'code-server/node_modules/code-server/out/node/entry.js');
const CHROMIUM = '/usr/bin/chromium';
const NOTEBOOK = path.join(root, 'examples/with-mistakes/step4-draft.eqnb');
const FILE_NAME = 'step4-draft.eqnb';
/** A second notebook, with a `vary` line, for the chart webview. */
const CHART_NOTEBOOK = path.join(root, 'examples/autoclave-synthesis.eqnb');
const CHART_FILE_NAME = 'autoclave-synthesis.eqnb';
const VARY_LINE = 'vary T from 350 to 500 °C step 25';
const ARTIFACTS = path.join(root, 'artifacts/editors');
const STEP_TIMEOUT = Number(process.env.STEP_TIMEOUT_MS ?? 30_000);
/** The whole run may take at most this long (ms); a normal run takes well under a minute. */
const RUN_TIMEOUT_MS = 5 * 60_000;
/** A started language server must still be the same process this long after it appeared (ms). */
const SERVER_ALIVE_MS = 1000;

const UNBALANCED = 'combust: C3H8(g) + O2(g) -> CO2(g) + H2O(g)';
const BALANCED = 'combust: C3H8(g) + 5 O2(g) -> 3 CO2(g) + 4 H2O(g)';
const BATCH_HEADER = 'batch scale-up at 25 °C, 1 atm';

const t0 = Date.now();
const summary = { ok: false, vsix: path.relative(root, VSIX), steps: [], timings_ms: {} };
const mark = (name) => (summary.timings_ms[name] = Date.now() - t0);

function die(message) {
  console.error(`\nvscode-e2e: FAILED: ${message}\n`);
  process.exit(1);
}
for (const [what, p, hint] of [
  ['the packaged extension', VSIX, 'run `npm run package`'],
  ['Node 24', NODE24, 'run test/editors/setup.sh'],
  ['code-server', CS_ENTRY, 'run test/editors/setup.sh'],
  ['Debian chromium', CHROMIUM, 'run test/editors/setup.sh'],
]) {
  if (!existsSync(p)) die(`${what} is missing (${p}): ${hint}`);
}

// ---- artifacts: start clean ----
mkdirSync(ARTIFACTS, { recursive: true });
for (const f of readdirSync(ARTIFACTS)) {
  if (f.startsWith('vscode-') || f.startsWith('code-server')) rmSync(path.join(ARTIFACTS, f), { recursive: true, force: true });
}
const artifact = (name) => path.join(ARTIFACTS, name);

// ---- a fresh, isolated profile: user data, extensions, XDG folders, config file, workspace copy ----
const run = mkdtempSync(path.join(tmpdir(), 'stillpoint-vscode-'));
const dirs = Object.fromEntries(
  ['user-data', 'extensions', 'workspace', 'xdg-config', 'xdg-data', 'xdg-cache', 'xdg-state'].map((d) => [d, path.join(run, d)]),
);
Object.values(dirs).forEach((d) => mkdirSync(d, { recursive: true }));
copyFileSync(NOTEBOOK, path.join(dirs.workspace, FILE_NAME));
copyFileSync(CHART_NOTEBOOK, path.join(dirs.workspace, CHART_FILE_NAME));
const configFile = path.join(run, 'config.yaml');
writeFileSync(configFile, 'bind-addr: 127.0.0.1:0\nauth: none\ncert: false\n');
mkdirSync(path.join(dirs['user-data'], 'User'), { recursive: true });
writeFileSync(
  path.join(dirs['user-data'], 'User', 'settings.json'),
  JSON.stringify(
    {
      'workbench.startupEditor': 'none', // no Welcome tab
      'workbench.welcomePage.walkthroughs.openOnInstall': false,
      'workbench.tips.enabled': false,
      'security.workspace.trust.enabled': false, // with --disable-workspace-trust: no Restricted Mode
      'telemetry.telemetryLevel': 'off',
      'update.mode': 'none',
      'extensions.autoCheckUpdates': false,
      'extensions.autoUpdate': false,
      'extensions.ignoreRecommendations': true,
      'chat.disableAIFeatures': true, // VS Code 1.139 opens a chat side bar otherwise
      'workbench.secondarySideBar.defaultVisibility': 'hidden',
      'editor.hover.delay': 150,
      'editor.hover.above': false, // the batch hover opens below its line and covers none of the notebook above
      'editor.minimap.enabled': false,
      'editor.inlayHints.enabled': 'on',
      'window.commandCenter': false,
    },
    null,
    2,
  ),
);
const env = {
  ...process.env,
  XDG_CONFIG_HOME: dirs['xdg-config'],
  XDG_DATA_HOME: dirs['xdg-data'],
  XDG_CACHE_HOME: dirs['xdg-cache'],
  XDG_STATE_HOME: dirs['xdg-state'],
  PATH: `${path.dirname(NODE24)}:${process.env.PATH}`,
};
const csArgs = ['--config', configFile, '--user-data-dir', dirs['user-data'], '--extensions-dir', dirs.extensions];

let cs;
/** The extension's folder in the profile's extensions folder, as the install created it. */
let installedFolder;
let browser;
let page;
const csLog = createWriteStream(artifact('code-server.log'));

/** Ends code-server and all it started (extension host, language server) through its process group. */
async function cleanup() {
  if (cs && cs.exitCode === null && cs.signalCode === null) {
    const exited = new Promise((r) => cs.once('exit', r));
    try {
      process.kill(-cs.pid, 'SIGTERM');
    } catch {
      /* already gone */
    }
    const how = await Promise.race([exited.then(() => 'exited'), new Promise((r) => setTimeout(() => r('timeout'), 5000))]);
    if (how === 'timeout') {
      try {
        process.kill(-cs.pid, 'SIGKILL');
      } catch {
        /* gone */
      }
    }
  }
  // VS Code's own logs (extension host, the Stillpoint output channel) are artifacts.
  try {
    cpSync(path.join(dirs['user-data'], 'logs'), artifact('code-server-logs'), { recursive: true });
    // the extension host's log (code-server names it remoteexthost.log)
    const exthost = findFiles(artifact('code-server-logs'), (f) => /exthost\.log$/i.test(f));
    exthost.forEach((f, i) => copyFileSync(f, artifact(i === 0 ? 'code-server-exthost.log' : `code-server-exthost-${i + 1}.log`)));
    summary.exthost_logs = exthost.length;
    // the extension's output channel ("Stillpoint"): the language client's messages, server crashes included
    const output = findFiles(artifact('code-server-logs'), (f) => /-Stillpoint\.log$/.test(f));
    output.forEach((f, i) => copyFileSync(f, artifact(i === 0 ? 'code-server-stillpoint-output.log' : `code-server-stillpoint-output-${i + 1}.log`)));
  } catch {
    /* no logs */
  }
  if (!process.env.KEEP_RUN) rmSync(run, { recursive: true, force: true });
  else summary.run_dir = run;
}

function findFiles(dir, test) {
  const out = [];
  for (const e of readdirSync(dir, { withFileTypes: true })) {
    const p = path.join(dir, e.name);
    if (e.isDirectory()) out.push(...findFiles(p, test));
    else if (test(e.name)) out.push(p);
  }
  return out;
}

async function abort(reason) {
  summary.errors = [...(summary.errors ?? []), reason];
  try {
    if (browser) await browser.close();
  } catch {
    /* ignore */
  }
  await cleanup();
  console.log(JSON.stringify(summary, null, 2));
  die(reason);
}
for (const sig of ['SIGTERM', 'SIGINT']) process.once(sig, () => void abort(`interrupted by ${sig}`));
const watchdog = setTimeout(() => void abort(`the whole run took longer than ${RUN_TIMEOUT_MS / 1000} s`), RUN_TIMEOUT_MS);

/**
 * Runs one named step. A failing step gets a screenshot and its message; a fatal one ends the run
 * (nothing after it can work), the others let the later steps still run.
 */
async function step(name, fatal, fn) {
  const started = Date.now();
  try {
    const detail = await fn();
    summary.steps.push({ name, ok: true, detail, ms: Date.now() - started });
    console.error(`PASS  vscode: ${name}`);
    return true;
  } catch (e) {
    const detail = String((e && e.message) || e).split('\n').slice(0, 12).join('\n');
    const shot = artifact(`vscode-failure-${summary.steps.length + 1}.png`);
    try {
      if (page) await page.screenshot({ path: shot });
    } catch {
      /* no page */
    }
    summary.steps.push({ name, ok: false, detail, screenshot: path.relative(root, shot), ms: Date.now() - started });
    console.error(`FAIL  vscode: ${name}: ${detail}`);
    if (fatal) throw new Error(`fatal step failed: ${name}`);
    return false;
  }
}

const screenshot = async (name) => {
  await page.screenshot({ path: artifact(name) });
  return `artifacts/editors/${name}`;
};
const plain = (s) => s.replace(/\u00a0/g, ' ');
const viewLine = (text) => page.locator('.monaco-editor .view-line', { hasText: text }).first();
const problemsRows = () => page.locator('.markers-panel .monaco-list-row');

/**
 * The screen rectangle of `needle` inside the editor line that contains `lineText`: a DOM Range over
 * the line's text nodes (the grammar splits a line into many token spans, e.g. C3H8 into C, 3, H, 8).
 */
async function textRect(lineText, needle) {
  return page.evaluate(
    ([lineText, needle]) => {
      const norm = (s) => s.replace(/\u00a0/g, ' ');
      for (const line of document.querySelectorAll('.monaco-editor .view-line')) {
        const text = norm(line.textContent);
        if (!text.includes(lineText)) continue;
        const from = text.indexOf(needle);
        if (from < 0) return null;
        const to = from + needle.length;
        const range = document.createRange();
        const walker = document.createTreeWalker(line, NodeFilter.SHOW_TEXT);
        let offset = 0;
        for (let n = walker.nextNode(); n; n = walker.nextNode()) {
          const len = n.textContent.length;
          if (from >= offset && from < offset + len) range.setStart(n, from - offset);
          if (to > offset && to <= offset + len) range.setEnd(n, to - offset);
          offset += len;
        }
        const r = range.getBoundingClientRect();
        return { x: r.x, y: r.y, width: r.width, height: r.height };
      }
      return null;
    },
    [lineText, needle],
  );
}

/** The extension's output channel so far (where the language client reports a server that exited). */
function stillpointOutput() {
  try {
    return findFiles(path.join(dirs['user-data'], 'logs'), (f) => /-Stillpoint\.log$/.test(f)).map((f) => readFileSync(f, 'utf8')).join('\n');
  } catch {
    return '';
  }
}
/** Its error lines: the server's uncaught error, then the client's last "[Error …]" lines (or its last lines). */
function stillpointOutputErrors() {
  const lines = [...new Set(stillpointOutput().split('\n').filter((l) => l.trim()))];
  const uncaught = lines.filter((l) => /^\w*Error\b/.test(l)).slice(0, 2);
  const client = lines.filter((l) => /^\[Error/.test(l)).slice(-3);
  const picked = uncaught.length + client.length ? [...uncaught, ...client] : lines.slice(-4);
  return picked.map((l) => `    ${l}`).join('\n') || '    (empty)';
}

/** Whether any language-server process of the installed extension is running. */
function serverProcesses() {
  const ps = execFileSync('ps', ['-eo', 'pid,args'], { encoding: 'utf8' });
  return ps.split('\n').filter((l) => l.includes(dirs.extensions) && l.includes('dist/server.js'));
}

/**
 * This run's language-server processes, each with its parent: node running dist/server.js from the
 * extension folder of this run's clean profile, in code-server's process group (code-server was started
 * detached, so the group id is its pid). Nothing else on the machine can match all three.
 */
function serverTree() {
  const rows = execFileSync('ps', ['-eo', 'pid=,ppid=,pgid=,args='], { encoding: 'utf8' })
    .split('\n')
    .map((l) => l.trim().match(/^(\d+)\s+(\d+)\s+(\d+)\s+(.*)$/))
    .filter(Boolean)
    .map(([, pid, ppid, pgid, args]) => ({ pid: Number(pid), ppid: Number(ppid), pgid: Number(pgid), args }));
  const serverJs = path.join(dirs.extensions, installedFolder ?? `${EXTENSION_ID}-${pkg.version}`, 'dist', 'server.js');
  return rows
    .filter((r) => cs && r.pgid === cs.pid && r.args.includes(serverJs))
    .map((r) => ({ ...r, parentArgs: rows.find((p) => p.pid === r.ppid)?.args ?? '' }));
}

/** The numbers in the problems item of VS Code's own status bar (all markers of the workspace). */
async function workbenchProblemCounts() {
  const label = (await page.locator('[id="status.problems"]').getAttribute('aria-label').catch(() => null)) ?? '';
  const n = (word) => Number(label.match(new RegExp(`${word}: (\\d+)`))?.[1] ?? 0);
  return { errors: n('Errors'), warnings: n('Warnings'), label };
}

/**
 * How many reactions and batches the notebook has, read from its text by the format's plain rules (a
 * statement starts in column 0; a reaction has an arrow, a batch starts with "batch"), comments removed.
 */
function notebookCounts(file) {
  const statements = readFileSync(file, 'utf8')
    .split('\n')
    .map((l) => l.replace(/#.*$/, '').trimEnd())
    .filter((l) => /^\S/.test(l));
  return {
    reactions: statements.filter((l) => !/^(species|batch)\s/.test(l) && /<=>|⇌|->|→/.test(l)).length,
    batches: statements.filter((l) => /^batch\s/.test(l)).length,
  };
}

/** The open hover that shows a batch's equilibrium table. */
const batchHover = () => page.locator('.monaco-hover:not(.hidden)', { hasText: 'Equilibrium / mol' }).first();
const shownHovers = async () => (await page.locator('.monaco-hover:not(.hidden)').allInnerTexts().catch(() => [])).map((t) => plain(t).slice(0, 200));

/** Moves the mouse onto the batch name (from above it, so entering the word triggers the hover). */
async function pointAtBatchName() {
  const at = await textRect(BATCH_HEADER, 'scale-up');
  if (!at) throw new Error(`the line "${BATCH_HEADER}" is not on screen`);
  await page.mouse.move(at.x + at.width / 2, at.y - 60);
  await page.mouse.move(at.x + at.width / 2, at.y + at.height / 2, { steps: 5 });
}

/** Hovers the batch name and waits (up to `timeout` ms) for the hover with its equilibrium table. */
async function hoverBatch(timeout = STEP_TIMEOUT) {
  await pointAtBatchName();
  const hover = batchHover();
  await hover.waitFor({ timeout }).catch(async () => {
    throw new Error(`no hover with "Equilibrium / mol" within ${timeout} ms (hovers shown: ${JSON.stringify(await shownHovers())})`);
  });
  return hover;
}

try {
  await step('install the .vsix into a clean profile', true, async () => {
    const out = execFileSync(NODE24, [CS_ENTRY, ...csArgs, '--install-extension', VSIX], { env, encoding: 'utf8', stdio: ['ignore', 'pipe', 'pipe'] });
    csLog.write(`--- --install-extension\n${out}\n`);
    const installed = readdirSync(dirs.extensions).filter((d) => d.startsWith(`${EXTENSION_ID}-`));
    if (installed.length !== 1) throw new Error(`expected one ${EXTENSION_ID}-* folder in the extensions folder, found: ${installed.join(', ') || 'none'}`);
    installedFolder = installed[0];
    mark('vsix_installed');
    return `${installed[0]} (${out.trim().split('\n').pop()})`;
  });

  await step('code-server starts', true, async () => {
    cs = spawn(
      NODE24,
      [CS_ENTRY, ...csArgs, '--auth', 'none', '--bind-addr', '127.0.0.1:0', '--disable-telemetry', '--disable-update-check',
        '--disable-workspace-trust', '--disable-getting-started-override', '--ignore-last-opened', dirs.workspace],
      { env, detached: true, stdio: ['ignore', 'pipe', 'pipe'] }, // own process group: ended by its id
    );
    summary.url = await new Promise((resolve, reject) => {
      const timer = setTimeout(() => reject(new Error('code-server printed no "HTTP server listening on" line')), STEP_TIMEOUT);
      let buf = '';
      const onData = (d) => {
        csLog.write(d);
        buf += d;
        const m = buf.match(/HTTP server listening on (http:\/\/127\.0\.0\.1:\d+\/)/);
        if (m) {
          clearTimeout(timer);
          resolve(m[1]);
        }
      };
      cs.stdout.on('data', onData);
      cs.stderr.on('data', onData);
      cs.on('exit', (c, s) => reject(new Error(`code-server exited early (${c ?? s}); see artifacts/editors/code-server.log`)));
    });
    mark('code_server_listening');
    return summary.url;
  });

  await step('open the notebook in the browser', true, async () => {
    browser = await chromium.launch({
      executablePath: CHROMIUM,
      headless: true,
      args: ['--no-sandbox', '--disable-gpu', '--disable-quic', '--no-first-run', '--disable-background-networking', '--disable-component-update', '--disable-sync'],
    });
    const ctx = await browser.newContext({ viewport: { width: 1400, height: 1000 } });
    page = await ctx.newPage();
    const consoleErrors = [];
    page.on('console', (m) => m.type() === 'error' && consoleErrors.push(m.text().slice(0, 300)));
    page.on('pageerror', (e) => consoleErrors.push(String(e).slice(0, 300)));
    summary.console_errors = consoleErrors;
    await page.goto(`${summary.url}?folder=${encodeURIComponent(dirs.workspace)}`, { waitUntil: 'domcontentloaded', timeout: STEP_TIMEOUT });
    await page.locator('.monaco-workbench').waitFor({ timeout: STEP_TIMEOUT });
    const entry = page.locator('.explorer-folders-view .monaco-list-row', { hasText: FILE_NAME });
    await entry.waitFor({ timeout: STEP_TIMEOUT });
    await entry.click();
    await viewLine(UNBALANCED).waitFor({ timeout: STEP_TIMEOUT });
    mark('file_opened');
    return FILE_NAME;
  });

  await step('language server process starts', true, async () => {
    const deadline = Date.now() + STEP_TIMEOUT;
    const pids = () => serverProcesses().map((l) => l.trim().split(/\s+/)[0]);
    const exited = () => /Server process exited|couldn't create connection to server/.test(stillpointOutput());
    const ended = (why) => new Error(`${why}; the Stillpoint output channel (artifacts/editors/code-server-stillpoint-output.log) says:\n${stillpointOutputErrors()}`);
    while (pids().length === 0) {
      if (exited()) throw ended('the language server exited at start-up');
      if (Date.now() > deadline) throw ended(`no process running the extension's dist/server.js after ${STEP_TIMEOUT} ms: the language server did not start`);
      await new Promise((r) => setTimeout(r, 100));
    }
    const first = pids()[0];
    // a server that crashes at start-up is restarted by the client under a new pid: it must stay up
    await new Promise((r) => setTimeout(r, SERVER_ALIVE_MS));
    if (!pids().includes(first) || exited()) throw ended(`the language server (pid ${first}) exited within ${SERVER_ALIVE_MS} ms of starting`);
    mark('server_running');
    return serverProcesses()[0].trim().slice(0, 200);
  });

  await step('1. language mode shows "Equilibrium notebook"', false, async () => {
    const status = page.locator('#status\\.editor\\.mode');
    await status.filter({ hasText: 'Equilibrium notebook' }).waitFor({ timeout: STEP_TIMEOUT }).catch(async () => {
      throw new Error(`the language status reads "${(await status.innerText().catch(() => '(none)')).trim()}"`);
    });
    summary.language_status = (await status.innerText()).trim();
    return await screenshot('vscode-1-language-mode.png');
  });

  await step('1b. the Stillpoint status bar item summarises the notebook', false, async () => {
    // The item's DOM id is the extension's id (a status bar item created without an id of its own).
    const item = page.locator(`.part.statusbar [id="${EXTENSION_ID}"]`);
    await item.filter({ hasText: /reactions?,.*batch/ }).waitFor({ state: 'visible', timeout: STEP_TIMEOUT }).catch(async () => {
      const items = await page.locator('.part.statusbar .statusbar-item').evaluateAll((els) => els.map((e) => `${e.id}: ${e.innerText.trim()}`));
      throw new Error(`no visible status bar item ${EXTENSION_ID} reading "N reactions, M batches"; the status bar items: ${JSON.stringify(items)}`);
    });
    const want = notebookCounts(path.join(dirs.workspace, FILE_NAME));
    // The summary and the diagnostics are separate messages from the server: wait until the item and
    // VS Code's own problem counter agree, then compare (a mismatch that lasts fails the step).
    let seen;
    const deadline = Date.now() + STEP_TIMEOUT;
    for (;;) {
      const text = plain(await item.innerText()).replace(/\s+/g, ' ').trim();
      const label = plain((await item.getAttribute('aria-label')) ?? '');
      const m = text.match(/(\d+) reactions?, (\d+) batch(?:es)?, (\d+)$/);
      const tip = label.match(/Stillpoint: (\d+) errors?, (\d+) warnings?/);
      const bench = await workbenchProblemCounts();
      seen = {
        text, label, workbench: bench.label, workbenchErrors: bench.errors, workbenchWarnings: bench.warnings, warningIcon: await item.locator('.codicon-warning').count(),
        reactions: m && Number(m[1]), batches: m && Number(m[2]), problems: m && Number(m[3]),
        errors: tip && Number(tip[1]), warnings: tip && Number(tip[2]),
      };
      const agree = m && tip && seen.problems === seen.errors + seen.warnings && seen.errors === bench.errors && seen.warnings === bench.warnings;
      if (agree || Date.now() > deadline) break;
      await page.waitForTimeout(200);
    }
    summary.status_bar = seen;
    await screenshot('vscode-1b-status-bar.png');
    if (seen.reactions === null) throw new Error(`the item reads "${seen.text}", not "N reactions, M batches, <warning> P" (a notebook with problems)`);
    if (seen.reactions !== want.reactions || seen.batches !== want.batches)
      throw new Error(`the item reads "${seen.text}", but ${FILE_NAME} has ${want.reactions} reactions and ${want.batches} batch(es)`);
    if (seen.warningIcon !== 1) throw new Error(`the item "${seen.text}" shows no warning icon before its problem count`);
    if (seen.errors === null) throw new Error(`the item's tooltip/aria-label "${seen.label}" gives no "Stillpoint: E errors, W warnings"`);
    if (seen.problems !== seen.errors + seen.warnings)
      throw new Error(`the item counts ${seen.problems} problems, but its tooltip says ${seen.errors} errors + ${seen.warnings} warnings`);
    if (seen.errors !== seen.workbenchErrors || seen.warnings !== seen.workbenchWarnings)
      throw new Error(`the item says ${seen.errors} errors, ${seen.warnings} warnings; VS Code's problem counter says "${seen.workbench}"`);
    if (seen.problems === 0) throw new Error(`the item counts no problems, but ${FILE_NAME} has deliberate mistakes`);
    return `"${seen.text}" (${seen.errors} errors, ${seen.warnings} warnings), artifacts/editors/vscode-1b-status-bar.png`;
  });

  await step('2. squiggle on the unbalanced equation, unbalanced-elements in Problems', false, async () => {
    const line = await viewLine(UNBALANCED).boundingBox();
    const squiggles = page.locator('.monaco-editor .squiggly-error');
    await squiggles.first().waitFor({ state: 'attached', timeout: STEP_TIMEOUT });
    mark('first_squiggle');
    const boxes = (await Promise.all((await squiggles.all()).map((s) => s.boundingBox()))).filter(Boolean);
    const onLine = boxes.filter((b) => b.y + b.height / 2 >= line.y && b.y + b.height / 2 <= line.y + line.height);
    if (onLine.length === 0) throw new Error(`${boxes.length} error squiggles, none on the line "${UNBALANCED}"`);
    await page.keyboard.press('Control+Shift+M'); // View: Problems
    const row = problemsRows().filter({ hasText: 'unbalanced-elements' }).first();
    await row.waitFor({ timeout: STEP_TIMEOUT });
    summary.problem = plain((await row.innerText()).replace(/\s+/g, ' ').trim());
    if (!/Ln 13\b/.test(summary.problem)) throw new Error(`the Problems entry is not on line 13: ${summary.problem}`);
    return await screenshot('vscode-2-squiggle-and-problems.png');
  });

  await step('3. the balance quick fix rewrites the line and clears the problem', false, async () => {
    const at = await textRect(UNBALANCED, 'C3H8');
    if (!at) throw new Error('the unbalanced line is not on screen');
    await page.mouse.click(at.x + at.width / 2, at.y + at.height / 2); // cursor onto the equation
    await page.keyboard.press('Escape'); // close a hover the click may have opened
    await page.keyboard.press('Control+.'); // Quick Fix… (what the light bulb opens)
    const item = page.locator('.action-widget .monaco-list-row', { hasText: 'Balance:' }).first();
    await item.waitFor({ timeout: STEP_TIMEOUT }).catch(async () => {
      const rows = await page.locator('.action-widget .monaco-list-row').allInnerTexts().catch(() => []);
      throw new Error(`no "Balance: …" item in the quick-fix menu (items: ${JSON.stringify(rows)})`);
    });
    summary.quick_fixes = (await page.locator('.action-widget .monaco-list-row').allInnerTexts()).map((t) => plain(t).trim());
    await screenshot('vscode-3a-quick-fix-menu.png');
    await item.click();
    await viewLine(BALANCED).waitFor({ timeout: STEP_TIMEOUT }).catch(async () => {
      throw new Error(`line 13 was not rewritten; it reads "${plain(await viewLine('combust:').innerText())}"`);
    });
    const fixedLine = plain(await viewLine(BALANCED).innerText());
    summary.fixed_line = fixedLine;
    if (!fixedLine.startsWith(BALANCED)) throw new Error(`line 13 reads "${fixedLine}"`);
    await problemsRows().filter({ hasText: 'unbalanced-elements' }).first().waitFor({ state: 'detached', timeout: STEP_TIMEOUT })
      .catch(() => {
        throw new Error('the unbalanced-elements entry stayed in the Problems panel after the fix');
      });
    summary.problems_after_fix = (await problemsRows().allInnerTexts()).map((t) => plain(t).replace(/\s+/g, ' ').trim());
    return await screenshot('vscode-3b-after-quick-fix.png');
  });

  await step('4. hovering the batch name shows the equilibrium table', false, async () => {
    await page.keyboard.press('Control+J'); // hide the panel: the batch lines get the room
    const hover = await hoverBatch();
    mark('batch_hover');
    summary.hover_text = plain(await hover.innerText()).slice(0, 2000);
    summary.hover_table_headers = (await hover.locator('table th').allInnerTexts()).map((t) => plain(t).trim());
    if (!summary.hover_text.includes('batch scale-up')) throw new Error('the hover does not name the batch scale-up');
    if (!summary.hover_table_headers.includes('Equilibrium / mol')) throw new Error(`no table column "Equilibrium / mol" (headers: ${summary.hover_table_headers.join(', ')})`);
    // For the screenshot only: VS Code's hover is resizable at its bottom edge; drag it down so the whole
    // table shows. Best effort: the checks above do not depend on it, and the hover must still be open.
    const south = await page.locator('.monaco-resizable-hover .monaco-sash.horizontal:not(.disabled)').first().boundingBox().catch(() => null);
    if (south) {
      await page.mouse.move(south.x + south.width / 2, south.y + south.height / 2, { steps: 3 });
      await page.mouse.down();
      await page.mouse.move(south.x + south.width / 2, south.y + 320, { steps: 10 });
      await page.mouse.up();
    }
    await hover.waitFor({ timeout: 2000 });
    await page.waitForTimeout(300);
    // the editor area alone, for the README
    const editorArea = await page.locator('.part.editor').boundingBox();
    if (editorArea) await page.screenshot({ path: artifact('vscode-4-batch-hover-editor.png'), clip: editorArea });
    return await screenshot('vscode-4-batch-hover.png');
  });

  await step('5. an inlay hint "⇒ …" ends a batch header line', false, async () => {
    await page.keyboard.press('Escape');
    await page.mouse.move(5, 500);
    const header = viewLine(BATCH_HEADER);
    await header.filter({ hasText: '⇒' }).waitFor({ timeout: STEP_TIMEOUT }).catch(async () => {
      throw new Error(`the batch header line has no "⇒" hint: "${plain(await header.innerText())}"`);
    });
    const text = plain(await header.innerText());
    summary.batch_header_line = text;
    const hint = text.slice(text.indexOf(BATCH_HEADER) + BATCH_HEADER.length).trim();
    if (!hint.startsWith('⇒')) throw new Error(`the text after the header is "${hint}", not a hint beginning "⇒"`);
    summary.inlay_hint = hint;
    return await screenshot('vscode-5-inlay-hint.png');
  });

  await step('6. a killed language server is restarted, with a message, and answers the next request', false, async () => {
    const RESTARTED = 'The Stillpoint server stopped unexpectedly and has been restarted.';
    await page.keyboard.press('Escape');
    await page.mouse.move(5, 500);
    // The hover works now (a control, so that a missing hover later is the restart's doing). A click in
    // the text first: after step 4 dragged the hover's resize sash, VS Code shows no mouse hover in this
    // editor until the next mouse-down in it (seen in code-server 4.139.1).
    const spot = await textRect('amine 2.0 mol', 'mol');
    if (!spot) throw new Error('the line "amine 2.0 mol" is not on screen');
    await page.mouse.click(spot.x + spot.width / 2, spot.y + spot.height / 2);
    await hoverBatch().catch((e) => {
      throw new Error(`before the kill: ${e.message}`);
    });
    await page.keyboard.press('Escape');
    await page.mouse.move(5, 500);
    await batchHover().waitFor({ state: 'hidden', timeout: 5000 });

    const before = serverTree();
    if (before.length !== 1) throw new Error(`expected one language-server process of this run, found ${before.length}: ${JSON.stringify(before)}`);
    const [old] = before;
    if (!/--type=extensionHost/.test(old.parentArgs)) throw new Error(`the server (pid ${old.pid}) is not a child of the extension host: its parent is "${old.parentArgs.slice(0, 200)}"`);
    if (await page.locator('.notification-toast', { hasText: RESTARTED }).count()) throw new Error('the restart message is on screen before the server was killed');
    process.kill(old.pid, 'SIGKILL');
    const killedAt = Date.now();
    summary.server_killed = { pid: old.pid, parent: old.ppid, args: old.args.slice(0, 200) };

    // (a) the client's message, as a toast (or, once the toast has gone, in the notifications center)
    const toast = page.locator('.notification-toast', { hasText: RESTARTED }).first();
    const seenToast = await toast.waitFor({ timeout: STEP_TIMEOUT }).then(() => true, () => false);
    if (seenToast) {
      summary.restart_message = { where: 'toast', text: plain(await toast.innerText()).trim(), ms_after_kill: Date.now() - killedAt };
    } else {
      await page.locator('[id="status.notifications"]').click(); // the bell: opens the notifications center
      const inCenter = page.locator('.notifications-center .monaco-list-row', { hasText: RESTARTED }).first();
      const found = await inCenter.waitFor({ timeout: 3000 }).then(() => true, () => false);
      const all = await page.locator('.notifications-center .monaco-list-row, .notification-toast').allInnerTexts().catch(() => []);
      if (!found) throw new Error(`no notification "${RESTARTED}" within ${STEP_TIMEOUT} ms of the kill (notifications: ${JSON.stringify(all.map((t) => plain(t).slice(0, 200)))}); the output channel says:\n${stillpointOutputErrors()}`);
      summary.restart_message = { where: 'notifications center', text: plain(await inCenter.innerText()).trim() };
    }

    // (b) a new server process, under the same extension host, that stays up
    const deadline = Date.now() + STEP_TIMEOUT;
    let now = serverTree();
    while (now.some((p) => p.pid === old.pid) || now.length === 0) {
      if (Date.now() > deadline) {
        throw new Error(now.some((p) => p.pid === old.pid)
          ? `the killed server (pid ${old.pid}) is still running`
          : `no new language-server process within ${STEP_TIMEOUT} ms of the kill; the output channel says:\n${stillpointOutputErrors()}`);
      }
      await new Promise((r) => setTimeout(r, 100));
      now = serverTree();
    }
    if (now.length !== 1) throw new Error(`expected one new language-server process, found ${now.length}: ${JSON.stringify(now)}`);
    const [fresh] = now;
    summary.server_restarted = { pid: fresh.pid, parent: fresh.ppid, ms_after_kill: Date.now() - killedAt };
    if (fresh.ppid !== old.ppid) throw new Error(`the new server (pid ${fresh.pid}) has parent ${fresh.ppid}, not the extension host ${old.ppid}`);
    await new Promise((r) => setTimeout(r, SERVER_ALIVE_MS));
    if (!serverTree().some((p) => p.pid === fresh.pid)) throw new Error(`the restarted server (pid ${fresh.pid}) exited within ${SERVER_ALIVE_MS} ms; the output channel says:\n${stillpointOutputErrors()}`);
    mark('server_restarted');

    // (c) the next request is answered by the new server: the batch hover with its equilibrium table.
    // The restarted client registers its hover provider only once the new server has initialised; a
    // mouse that arrives before that gets no hover at all (no request is sent). So while no hover opens,
    // the mouse leaves and comes back (until the step's time is up); once one opens, it must come to
    // show the table.
    const hoverDeadline = Date.now() + STEP_TIMEOUT;
    const attempts = [];
    for (;;) {
      attempts.push(Date.now() - killedAt);
      await pointAtBatchName();
      const opened = await page.locator('.monaco-hover:not(.hidden)').first().waitFor({ timeout: 3000 }).then(() => true, () => false);
      if (opened) break;
      if (Date.now() > hoverDeadline) throw new Error(`no hover opened on the batch name within ${STEP_TIMEOUT} ms of the new server starting (${attempts.length} attempts); the output channel says:\n${stillpointOutputErrors()}`);
      await page.mouse.move(5, 500);
    }
    summary.hover_after_restart_attempts_ms_after_kill = attempts;
    const hover = batchHover();
    await hover.waitFor({ timeout: Math.max(hoverDeadline - Date.now(), 5000) }).catch(async () => {
      throw new Error(`after the restart the batch name's hover shows no "Equilibrium / mol" table: ${JSON.stringify(await shownHovers())}`);
    });
    const text = plain(await hover.innerText());
    if (!text.includes('batch scale-up')) throw new Error('the hover after the restart does not name the batch scale-up');
    summary.hover_after_restart = text.slice(0, 300);
    mark('hover_after_restart');
    return `server pid ${old.pid} killed, pid ${fresh.pid} started ${summary.server_restarted.ms_after_kill} ms later; ${await screenshot('vscode-6-server-restarted.png')}`;
  });

  await step('7. the chart code lens above a `vary` line opens the SVG chart in a webview with a strict CSP', false, async () => {
    await page.keyboard.press('Escape');
    const entry = page.locator('.explorer-folders-view .monaco-list-row', { hasText: CHART_FILE_NAME });
    await entry.click();
    await viewLine(VARY_LINE).waitFor({ timeout: STEP_TIMEOUT });
    const lens = page.locator('.monaco-editor .codelens-decoration a', { hasText: 'show equilibrium chart' }).first();
    await lens.waitFor({ timeout: STEP_TIMEOUT }).catch(() => {
      throw new Error('no "show equilibrium chart" code lens above the vary line');
    });
    await lens.click();
    // The webview's document is a frame inside VS Code's webview host frame: find the one with our SVG.
    const deadline = Date.now() + STEP_TIMEOUT;
    let found;
    while (!found) {
      for (const frame of page.frames()) {
        const seen = await frame
          .evaluate(() => {
            const svg = document.querySelector('svg');
            if (!svg) return undefined;
            return {
              title: svg.querySelector('text')?.textContent ?? '',
              points: svg.querySelectorAll('circle').length,
              csp: document.querySelector('meta[http-equiv="Content-Security-Policy"]')?.getAttribute('content') ?? '',
              scripts: document.querySelectorAll('script').length,
              note: document.body.innerText.includes('not a process-safety assessment'),
            };
          })
          .catch(() => undefined);
        if (seen) found = seen;
      }
      if (found) break;
      if (Date.now() > deadline) throw new Error(`no webview frame with an SVG within ${STEP_TIMEOUT} ms (${page.frames().length} frames)`);
      await new Promise((r) => setTimeout(r, 200));
    }
    summary.chart = found;
    if (!found.title.includes('flow-c')) throw new Error(`the chart's title is "${found.title}", not the batch flow-c`);
    // 7 temperatures (350 to 500 °C step 25), one point per plotted quantity at each.
    if (found.points < 7) throw new Error(`the chart has ${found.points} points, fewer than the 7 temperatures of the sweep`);
    if (!found.csp.includes("default-src 'none'")) throw new Error(`the webview's CSP is "${found.csp}", without default-src 'none'`);
    if (found.scripts !== 0) throw new Error(`the chart webview has ${found.scripts} script elements`);
    if (!found.note) throw new Error('the chart webview lacks the "not a process-safety assessment" note');
    return await screenshot('vscode-7-chart-webview.png');
  });
} catch (e) {
  summary.errors = [String((e && e.message) || e)];
} finally {
  mark('total');
  clearTimeout(watchdog);
  try {
    if (browser) await browser.close();
  } catch {
    /* ignore */
  }
  await cleanup();
  csLog.end();
}

const failed = summary.steps.filter((s) => !s.ok);
const passed = summary.steps.filter((s) => s.ok);
summary.ok = failed.length === 0 && passed.length > 0;
writeFileSync(artifact('vscode-summary.json'), JSON.stringify(summary, null, 2) + '\n');
console.log(JSON.stringify(summary, null, 2));
if (!summary.ok) die(failed.map((s) => `step "${s.name}": ${s.detail}`).join('\n  ') || 'no step ran');
console.log(`vscode-e2e: ${passed.length} passed, 0 failed`);
