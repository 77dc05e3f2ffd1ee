// Protocol-level tests of the commands, code lenses, the status summary and
// the diagnostics settings, over the real bundled server.
import { afterEach, describe, expect, it } from 'vitest';
import { applyEdits, type LspTextEdit } from '../support/edits';
import { LspTestClient } from '../support/lsp-client';

let client: LspTestClient | undefined;
afterEach(() => {
  client?.kill();
  client = undefined;
});

const URI = 'file:///tmp/stillpoint-cmd/a.eqnb';
// Standard general-chemistry textbook examples: propane combustion (1, 5, 3, 4) and copper
// in nitric acid (3, 8, 3, 2, 4); the esterification with K = 4 from 1:1 converts 2/3 (closed form).
const TEXT = [
  'species acid = C6H12O2 (l)',
  'species EtOH = C2H5OH (l)',
  'esterify: acid + EtOH <=> C8H16O2(l) + H2O(l)',
  '  K = 4.0 at 60 °C',
  'combust: C3H8(g) + O2(g) -> CO2(g) + H2O(g)',
  'dissolve: Cu(s) + HNO3(aq) -> Cu(NO3)2(aq) + NO(g) + H2O(l)',
  'batch trial-1 at 60 °C',
  '  acid 1.0 mol',
  '  EtOH 1.0 mol',
  '  uses esterify',
  '',
].join('\n');

interface Published {
  uri: string;
  diagnostics: { code: string; severity: number }[];
}

async function open(init: Record<string, unknown> = { diagnosticsDelayMs: 0 }): Promise<LspTestClient> {
  const c = new LspTestClient();
  await c.initialize(init as never);
  c.notify('textDocument/didOpen', { textDocument: { uri: URI, languageId: 'eqnb', version: 1, text: TEXT } });
  await c.waitFor<Published>('textDocument/publishDiagnostics', (p) => p.uri === URI);
  return c;
}

describe('commands and code lenses', () => {
  it('puts the headline result and a copy command above each batch', async () => {
    client = await open();
    const lenses = await client.request<{ range: { start: { line: number } }; command: { title: string; command: string; arguments: unknown[] } }[]>(
      'textDocument/codeLens',
      { textDocument: { uri: URI } },
    );
    expect(lenses).toHaveLength(1);
    expect(lenses[0].range.start.line).toBe(6);
    expect(lenses[0].command.title).toBe('66.7 % conversion of acid · copy results');
    expect(lenses[0].command.command).toBe('stillpoint.copyBatchResults');
    expect(lenses[0].command.arguments).toEqual([URI, 'trial-1']);
  });

  it('gives a batch\'s results as a Markdown table', async () => {
    client = await open();
    const md = await client.request<string>('workspace/executeCommand', { command: 'stillpoint.server.batchMarkdown', arguments: [URI, 'trial-1'] });
    expect(md.startsWith('### batch trial-1')).toBe(true);
    expect(md).toContain('| Species | Phase | Initial / mol | Change / mol | Equilibrium / mol | At equilibrium |');
    expect(md).toContain('Conversion of acid: **66.7 %**');
    expect(await client.request('workspace/executeCommand', { command: 'stillpoint.server.batchNames', arguments: [URI] })).toEqual(['trial-1']);
  });

  it('balances every equation in the file with one edit the editor applies', async () => {
    client = await open();
    const count = await client.request<number>('workspace/executeCommand', { command: 'stillpoint.server.balanceAll', arguments: [URI] });
    expect(count).toBe(2);
    const request = client.serverRequests.find((r) => r.method === 'workspace/applyEdit');
    const params = request?.params as unknown as { edit: { documentChanges: { edits: LspTextEdit[] }[] } };
    const fixed = applyEdits(TEXT, params.edit.documentChanges[0].edits).split('\n');
    expect(fixed[4]).toBe('combust: C3H8(g) + 5 O2(g) -> 3 CO2(g) + 4 H2O(g)');
    expect(fixed[5]).toBe('dissolve: 3 Cu(s) + 8 HNO3(aq) -> 3 Cu(NO3)2(aq) + 2 NO(g) + 4 H2O(l)');
  });

  it('sends a summary for the status bar', async () => {
    client = await open();
    const s = await client.waitFor<{ uri: string; reactions: number; batches: number; errors: number; warnings: number }>('stillpoint/summary', (p) => p.uri === URI);
    expect(s).toEqual({ uri: URI, reactions: 3, batches: 1, errors: 2, warnings: 0 });
  });
});

describe('charts', () => {
  it('puts a chart lens on each solved vary line, and the server command returns the SVG', async () => {
    const text = TEXT.replace('  uses esterify\n', '  uses esterify\n  vary EtOH from 1 to 4 mol step 1\n');
    const c = new LspTestClient();
    client = c;
    await c.initialize();
    c.notify('textDocument/didOpen', { textDocument: { uri: URI, languageId: 'eqnb', version: 1, text } });
    await c.waitFor<Published>('textDocument/publishDiagnostics', (p) => p.uri === URI);
    const lenses = await c.request<{ range: { start: { line: number } }; command: { title: string; command: string; arguments: unknown[] } }[]>('textDocument/codeLens', { textDocument: { uri: URI } });
    const chart = lenses.find((l) => l.command.command === 'stillpoint.showChart');
    expect(chart?.range.start.line).toBe(10);
    expect(chart?.command.arguments).toEqual([URI, 'trial-1', 0]);
    const svg = await c.request<string>('workspace/executeCommand', { command: 'stillpoint.server.chart', arguments: [URI, 'trial-1', 0] });
    expect(svg.startsWith('<svg xmlns="http://www.w3.org/2000/svg"')).toBe(true);
  });
});

describe('diagnostics settings', () => {
  it('silences listed codes and overrides severities from the initialization options', async () => {
    client = await open({ diagnosticsDelayMs: 0, diagnostics: { silence: ['unbalanced-elements'], severity: {} } });
    const p = await client.waitFor<Published>('textDocument/publishDiagnostics', (x) => x.uri === URI);
    expect(p.diagnostics).toEqual([]);
  });

  it('applies a change of settings at once', async () => {
    client = await open();
    client.notify('workspace/didChangeConfiguration', { settings: { stillpoint: { diagnostics: { silence: [], severity: { 'unbalanced-elements': 'warning' } } } } });
    const p = await client.waitFor<Published>('textDocument/publishDiagnostics', (x) => x.uri === URI && x.diagnostics.length > 0 && x.diagnostics.every((d) => d.severity === 2));
    expect(p.diagnostics.map((d) => d.code)).toEqual(['unbalanced-elements', 'unbalanced-elements']);
  });
});
