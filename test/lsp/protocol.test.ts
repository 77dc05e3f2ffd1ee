// Protocol-level test: spawns the real bundled server (dist/server.js, built by
// `npm run build` before the tests) and speaks LSP over stdio: initialize,
// open a notebook, receive diagnostics, hover, request the balance fix, apply
// its edit, and see the diagnostic disappear.
import { existsSync } from 'node:fs';
import { afterEach, beforeAll, describe, expect, it } from 'vitest';
import { applyEdits, type LspTextEdit } from '../support/edits';
import { LspTestClient, SERVER_PATH } from '../support/lsp-client';

interface PublishedDiagnostics {
  uri: string;
  version?: number;
  diagnostics: { code: string; message: string; severity: number; range: { start: { line: number; character: number } } }[];
}

const URI = 'file:///tmp/stillpoint-test/pilot.eqnb';

// The copper-nitric acid equation is a standard general-chemistry textbook example
// of balancing a redox equation: 3 Cu + 8 HNO3 -> 3 Cu(NO3)2 + 2 NO + 4 H2O.
const NOTEBOOK = [
  'species water = H2O (l)',
  'dissolve: Cu(s) + HNO3(aq) -> Cu(NO3)2(aq) + NO(g) + water',
  'batch b1 at 25 °C',
  '  Cu(s) 1 mol',
  '',
].join('\n');

let client: LspTestClient | undefined;

beforeAll(() => {
  if (!existsSync(SERVER_PATH)) throw new Error(`${SERVER_PATH} is missing: run \`npm run build\` first`);
});

afterEach(() => {
  client?.kill();
  client = undefined;
});

describe('language server over stdio', () => {
  it('publishes diagnostics, hovers, offers the balance fix, and clears the diagnostic after the fix', async () => {
    client = new LspTestClient();
    const init = (await client.initialize()) as { capabilities: Record<string, unknown> };
    expect(init.capabilities.hoverProvider).toBe(true);
    expect(init.capabilities.codeActionProvider).toBeTruthy();

    client.notify('textDocument/didOpen', { textDocument: { uri: URI, languageId: 'eqnb', version: 1, text: NOTEBOOK } });
    const first = await client.waitFor<PublishedDiagnostics>('textDocument/publishDiagnostics', (p) => p.uri === URI);
    const codes = first.diagnostics.map((d) => d.code);
    expect(codes).toEqual(['unbalanced-elements']);
    const unbalanced = first.diagnostics[0];
    expect(unbalanced.range.start).toEqual({ line: 1, character: 10 });
    // Per-element message: left has 1 N and 3 O; right has 3 N (2 nitrate + NO) and 8 O (6 + 1 + 1).
    expect(unbalanced.message).toContain('N: 1 left, 3 right');
    expect(unbalanced.message).toContain('O: 3 left, 8 right');

    // Hover on the species name `water` in its declaration: composition and molar mass.
    const hover = await client.request<{ contents: { kind: string; value: string } }>('textDocument/hover', {
      textDocument: { uri: URI },
      position: { line: 0, character: 10 },
    });
    expect(hover.contents.kind).toBe('markdown');
    // Molar mass of H2O from IUPAC 2021 conventional weights: 2 x 1.008 + 15.999 = 18.015 g/mol.
    expect(hover.contents.value).toContain('18.015 g/mol');

    // Hover on the arrow: the per-element balance table.
    const reactionHover = await client.request<{ contents: { value: string } }>('textDocument/hover', {
      textDocument: { uri: URI },
      position: { line: 1, character: 28 },
    });
    expect(reactionHover.contents.value).toContain('| N | 1 | 3 | ✗ |');

    const actions = await client.request<{ title: string; isPreferred?: boolean; edit: { changes: Record<string, LspTextEdit[]> } }[]>(
      'textDocument/codeAction',
      {
        textDocument: { uri: URI },
        range: { start: { line: 1, character: 12 }, end: { line: 1, character: 12 } },
        context: { diagnostics: [unbalanced] },
      },
    );
    const fix = actions.find((a) => a.isPreferred);
    expect(fix?.title).toContain('Balance');
    const fixed = applyEdits(NOTEBOOK, fix!.edit.changes[URI]);
    expect(fixed.split('\n')[1]).toBe('dissolve: 3 Cu(s) + 8 HNO3(aq) -> 3 Cu(NO3)2(aq) + 2 NO(g) + 4 water');

    client.notify('textDocument/didChange', {
      textDocument: { uri: URI, version: 2 },
      contentChanges: [{ text: fixed }],
    });
    const second = await client.waitFor<PublishedDiagnostics>(
      'textDocument/publishDiagnostics',
      (p) => p.uri === URI && p !== first && p.diagnostics.length === 0,
    );
    expect(second.diagnostics).toEqual([]);

    const symbols = await client.request<{ name: string }[]>('textDocument/documentSymbol', { textDocument: { uri: URI } });
    expect(symbols.map((s) => s.name)).toEqual(['water', 'dissolve', 'b1']);

    expect(await client.shutdown()).toBe(0);
  });

  it('shows a batch\'s equilibrium table on hover and its headline result as an inlay hint', async () => {
    client = new LspTestClient();
    const init = (await client.initialize()) as { capabilities: Record<string, unknown> };
    expect(init.capabilities.inlayHintProvider).toBeTruthy();
    // Esterification with K = 4 from a 1:1 start converts 2/3 of the acid: x²/(1 − x)² = 4
    // gives x = 2/3 (closed form; the classic textbook esterification example).
    const text = [
      'species acid = C6H12O2 (l)',
      'species EtOH = C2H5OH (l)',
      'species ester = C8H16O2 (l)',
      'esterify: acid + EtOH <=> ester + H2O(l)',
      '  K = 4.0 at 60 °C',
      'batch trial-1 at 60 °C',
      '  acid 1.0 mol',
      '  EtOH 1.0 mol',
      'batch dried from trial-1',
      '  remove H2O 90 %',
      '',
    ].join('\n');
    const uri = 'file:///tmp/stillpoint-test/esterify.eqnb';
    client.notify('textDocument/didOpen', { textDocument: { uri, languageId: 'eqnb', version: 1, text } });
    const published = await client.waitFor<PublishedDiagnostics>('textDocument/publishDiagnostics', (p) => p.uri === uri);
    expect(published.diagnostics).toEqual([]);
    const hover = await client.request<{ contents: { value: string } }>('textDocument/hover', {
      textDocument: { uri },
      position: { line: 5, character: 8 },
    });
    expect(hover.contents.value).toContain('Equilibrium / mol');
    expect(hover.contents.value).toMatch(/\| ester \| l \| 0 \| \+0\.6667 \| 0\.6667 \|/);
    expect(hover.contents.value).toContain('Conversion of acid: **66.7 %**');
    expect(hover.contents.value).toContain('not a process-safety assessment');
    // The follow-on: 90 % of the water off, then (2/3 + y)(1/15 + y) = 4(1/3 − y)² gives y = 2/15
    // and 80 % conversion over the chain (worked by hand in test/notebook/follow-on.test.ts).
    const followOn = await client.request<{ contents: { value: string } }>('textDocument/hover', {
      textDocument: { uri },
      position: { line: 8, character: 8 },
    });
    expect(followOn.contents.value).toContain('Before change / mol');
    expect(followOn.contents.value).toContain('Conversion of acid: **80.0 %**');
    const hints = await client.request<{ position: { line: number; character: number }; label: string }[]>('textDocument/inlayHint', {
      textDocument: { uri },
      range: { start: { line: 0, character: 0 }, end: { line: 10, character: 0 } },
    });
    expect(hints).toHaveLength(2);
    expect(hints[0].position).toEqual({ line: 5, character: 22 });
    expect(hints[0].label).toBe('⇒ 66.7 % conversion of acid');
    expect(hints[1].label).toBe('⇒ 80.0 % conversion of acid');
    expect(await client.shutdown()).toBe(0);
  });

  it('answers requests on malformed input without crashing', async () => {
    client = new LspTestClient();
    await client.initialize();
    const junk = ['species = (((', '  K = NaN at hot', '-> ->', 'batch at', '\u0000\u0001 ] ^^^ ⇌ ⇌', 'x'.repeat(20000), ''].join('\n');
    client.notify('textDocument/didOpen', { textDocument: { uri: URI, languageId: 'eqnb', version: 1, text: junk } });
    const published = await client.waitFor<PublishedDiagnostics>('textDocument/publishDiagnostics', (p) => p.uri === URI);
    expect(published.diagnostics.length).toBeGreaterThan(3);
    for (let line = 0; line < 6; line++) {
      for (const character of [0, 1, 3, 7, 12]) {
        await client.request('textDocument/hover', { textDocument: { uri: URI }, position: { line, character } });
      }
    }
    const symbols = await client.request<unknown[]>('textDocument/documentSymbol', { textDocument: { uri: URI } });
    expect(Array.isArray(symbols)).toBe(true);
    expect(client.stderr).not.toMatch(/failed/);
    expect(await client.shutdown()).toBe(0);
  });
});
