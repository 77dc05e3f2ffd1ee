// Protocol-level tests of navigation and presentation over the real bundled
// server: definition, references, highlights, rename with conflict checks,
// folding, semantic tokens, workspace symbols, and pull diagnostics.
import { mkdtempSync, writeFileSync, mkdirSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';
import { afterEach, describe, expect, it } from 'vitest';
import { applyEdits, type LspTextEdit } from '../support/edits';
import { LspTestClient } from '../support/lsp-client';

let client: LspTestClient | undefined;
afterEach(() => {
  client?.kill();
  client = undefined;
});

// An invented scenario; the esterification is the standard textbook example.
const TEXT = [
  'species acid = C6H12O2 (l)', // 0
  'species EtOH = C2H5OH (l)', // 1
  'species ester = C8H16O2 (l)', // 2
  'esterify: acid + EtOH <=> ester + H2O(l)', // 3
  '  K = 4.0 at 60 °C', // 4
  'batch trial-1 at 60 °C', // 5
  '  acid 1.0 mol', // 6
  '  EtOH 3 equiv', // 7
  '  basis acid', // 8
  '  uses esterify', // 9
  '',
].join('\n');
const URI = 'file:///tmp/stillpoint-nav/a.eqnb';

type Loc = { uri: string; range: { start: { line: number; character: number }; end: { line: number; character: number } } };

async function open(): Promise<LspTestClient> {
  const c = new LspTestClient();
  await c.initialize();
  c.notify('textDocument/didOpen', { textDocument: { uri: URI, languageId: 'eqnb', version: 1, text: TEXT } });
  await c.waitFor('textDocument/publishDiagnostics', (p: { uri: string }) => p.uri === URI);
  return c;
}

describe('navigation', () => {
  it('goes to the declaration of a species from a term and from an amount line', async () => {
    client = await open();
    const fromTerm = await client.request<Loc>('textDocument/definition', { textDocument: { uri: URI }, position: { line: 3, character: 11 } });
    expect(fromTerm.range.start).toEqual({ line: 0, character: 8 });
    const fromAmount = await client.request<Loc>('textDocument/definition', { textDocument: { uri: URI }, position: { line: 6, character: 3 } });
    expect(fromAmount.range).toEqual({ start: { line: 0, character: 8 }, end: { line: 0, character: 12 } });
    const fromUses = await client.request<Loc>('textDocument/definition', { textDocument: { uri: URI }, position: { line: 9, character: 9 } });
    expect(fromUses.range.start).toEqual({ line: 3, character: 0 });
  });

  it('finds references and highlights them (declaration as a write)', async () => {
    client = await open();
    const refs = await client.request<Loc[]>('textDocument/references', {
      textDocument: { uri: URI },
      position: { line: 0, character: 9 },
      context: { includeDeclaration: true },
    });
    expect(refs.map((r) => r.range.start.line)).toEqual([0, 3, 6, 8]);
    const noDecl = await client.request<Loc[]>('textDocument/references', {
      textDocument: { uri: URI },
      position: { line: 0, character: 9 },
      context: { includeDeclaration: false },
    });
    expect(noDecl).toHaveLength(3);
    const highlights = await client.request<{ kind: number }[]>('textDocument/documentHighlight', { textDocument: { uri: URI }, position: { line: 6, character: 3 } });
    expect(highlights.map((h) => h.kind)).toEqual([3, 2, 2, 2]); // Write for the declaration, Read for the rest (LSP DocumentHighlightKind)
  });

  it('renames a species everywhere, and refuses a rename that would clash', async () => {
    client = await open();
    const prepared = await client.request<{ placeholder: string }>('textDocument/prepareRename', { textDocument: { uri: URI }, position: { line: 3, character: 11 } });
    expect(prepared.placeholder).toBe('acid');
    const edit = await client.request<{ changes: Record<string, LspTextEdit[]> }>('textDocument/rename', {
      textDocument: { uri: URI },
      position: { line: 3, character: 11 },
      newName: 'hexanoic',
    });
    const renamed = applyEdits(TEXT, edit.changes[URI]).split('\n');
    expect(renamed[0]).toBe('species hexanoic = C6H12O2 (l)');
    expect(renamed[3]).toBe('esterify: hexanoic + EtOH <=> ester + H2O(l)');
    expect(renamed[6]).toBe('  hexanoic 1.0 mol');
    expect(renamed[8]).toBe('  basis hexanoic');
    await expect(
      client.request('textDocument/rename', { textDocument: { uri: URI }, position: { line: 0, character: 9 }, newName: 'EtOH' }),
    ).rejects.toThrow(/already exists/);
    await expect(
      client.request('textDocument/rename', { textDocument: { uri: URI }, position: { line: 0, character: 9 }, newName: '2acid' }),
    ).rejects.toThrow(/not a valid species name/);
    await expect(
      client.request('textDocument/rename', { textDocument: { uri: URI }, position: { line: 0, character: 9 }, newName: 'batch' }),
    ).rejects.toThrow(/keyword/);
  });

  it('renames a reaction label in its `uses` lines too', async () => {
    client = await open();
    const edit = await client.request<{ changes: Record<string, LspTextEdit[]> }>('textDocument/rename', {
      textDocument: { uri: URI },
      position: { line: 9, character: 10 },
      newName: 'ester-step',
    });
    const renamed = applyEdits(TEXT, edit.changes[URI]).split('\n');
    expect(renamed[3].startsWith('ester-step: ')).toBe(true);
    expect(renamed[9]).toBe('  uses ester-step');
  });
});

describe('completion over the protocol', () => {
  it('a follow-on batch: definition from `from`, references, and rename of the source batch', async () => {
    const text = [...TEXT.split('\n').slice(0, 10), 'batch dried from trial-1', '  remove H2O 90 %', ''].join('\n');
    const uri = 'file:///tmp/stillpoint-nav/follow-on.eqnb';
    client = new LspTestClient();
    await client.initialize();
    client.notify('textDocument/didOpen', { textDocument: { uri, languageId: 'eqnb', version: 1, text } });
    await client.waitFor('textDocument/publishDiagnostics', (p: { uri: string }) => p.uri === uri);
    const def = await client.request<Loc[] | Loc>('textDocument/definition', { textDocument: { uri }, position: { line: 10, character: 19 } });
    const target = Array.isArray(def) ? def[0] : def;
    expect(target.range.start).toEqual({ line: 5, character: 6 });
    const refs = await client.request<Loc[]>('textDocument/references', { textDocument: { uri }, position: { line: 5, character: 7 }, context: { includeDeclaration: true } });
    expect(refs.map((r) => r.range.start.line).sort((a, b) => a - b)).toEqual([5, 10]);
    const edit = await client.request<{ changes: Record<string, LspTextEdit[]> }>('textDocument/rename', {
      textDocument: { uri },
      position: { line: 5, character: 7 },
      newName: 'pass-1',
    });
    const renamed = applyEdits(text, edit.changes[uri]).split('\n');
    expect(renamed[5]).toBe('batch pass-1 at 60 °C');
    expect(renamed[10]).toBe('batch dried from pass-1');
  });

  it('offers reaction labels after `uses`, each with a detail and a text edit over the partial word', async () => {
    client = await open();
    const list = await client.request<{ items: { label: string; detail: string; kind: number; textEdit: LspTextEdit }[] }>('textDocument/completion', {
      textDocument: { uri: URI },
      position: { line: 9, character: 9 },
    });
    const item = list.items.find((i) => i.label === 'esterify');
    expect(item?.detail).toContain('reversible');
    expect(item?.textEdit.range).toEqual({ start: { line: 9, character: 7 }, end: { line: 9, character: 9 } });
  });
});

describe('formatting over the protocol', () => {
  const MESSY = 'species  acid=C6H12O2(l)\nesterify:acid + EtOH<=>C8H16O2(l) +  H2O(l)\n  K=4.0 at 60 °C\n';
  const uri = 'file:///tmp/stillpoint-nav/messy.eqnb';

  it('formats the document', async () => {
    client = new LspTestClient();
    await client.initialize();
    client.notify('textDocument/didOpen', { textDocument: { uri, languageId: 'eqnb', version: 1, text: MESSY } });
    const edits = await client.request<LspTextEdit[]>('textDocument/formatting', { textDocument: { uri }, options: { tabSize: 2, insertSpaces: true } });
    expect(applyEdits(MESSY, edits)).toBe('species acid = C6H12O2(l)\nesterify: acid + EtOH <=> C8H16O2(l) + H2O(l)\n  K = 4.0 at 60 °C\n');
  });

  it('formats only the lines of a range', async () => {
    client = new LspTestClient();
    await client.initialize();
    client.notify('textDocument/didOpen', { textDocument: { uri, languageId: 'eqnb', version: 1, text: MESSY } });
    const edits = await client.request<LspTextEdit[]>('textDocument/rangeFormatting', {
      textDocument: { uri },
      range: { start: { line: 1, character: 0 }, end: { line: 1, character: 5 } },
      options: { tabSize: 2, insertSpaces: true },
    });
    expect(applyEdits(MESSY, edits).split('\n')).toEqual(['species  acid=C6H12O2(l)', 'esterify: acid + EtOH <=> C8H16O2(l) + H2O(l)', '  K=4.0 at 60 °C', '']);
  });
});

describe('presentation', () => {
  it('folds statements with property lines', async () => {
    client = await open();
    const folds = await client.request<{ startLine: number; endLine: number }[]>('textDocument/foldingRange', { textDocument: { uri: URI } });
    expect(folds).toEqual([
      { startLine: 3, endLine: 4 },
      { startLine: 5, endLine: 9 },
    ]);
  });

  it('gives semantic tokens for names, element symbols, numbers and units', async () => {
    client = new LspTestClient();
    const init = (await client.initialize()) as { capabilities: { semanticTokensProvider: { legend: { tokenTypes: string[] } } } };
    const types = init.capabilities.semanticTokensProvider.legend.tokenTypes;
    client.notify('textDocument/didOpen', { textDocument: { uri: URI, languageId: 'eqnb', version: 1, text: 'species acid = C6H12O2 (l)\n' } });
    const tokens = await client.request<{ data: number[] }>('textDocument/semanticTokens/full', { textDocument: { uri: URI } });
    const decoded: string[] = [];
    let line = 0;
    let ch = 0;
    for (let i = 0; i < tokens.data.length; i += 5) {
      const [dl, dc, len, type] = tokens.data.slice(i, i + 4);
      line += dl;
      ch = dl === 0 ? ch + dc : dc;
      decoded.push(`${line}:${ch}:${len}:${types[type]}`);
    }
    // species(keyword) acid(variable) =(operator) C 6 H 12 O 2 (element/number pairs) (l)(modifier)
    expect(decoded).toEqual([
      '0:0:7:keyword',
      '0:8:4:variable',
      '0:13:1:operator',
      '0:15:1:type',
      '0:16:1:number',
      '0:17:1:type',
      '0:18:2:number',
      '0:20:1:type',
      '0:21:1:number',
      '0:23:3:modifier',
    ]);
  });

  it('pulls diagnostics from clients that support it, and does not also publish them', async () => {
    client = new LspTestClient();
    const init = (await client.initialize({ diagnosticsDelayMs: 0 }, { pull: true })) as { capabilities: { diagnosticProvider?: unknown } };
    expect(init.capabilities.diagnosticProvider).toBeTruthy();
    client.notify('textDocument/didOpen', { textDocument: { uri: URI, languageId: 'eqnb', version: 1, text: 'H2 + O2 -> H2O\n' } });
    const report = await client.request<{ kind: string; items: { code: string }[] }>('textDocument/diagnostic', { textDocument: { uri: URI } });
    expect(report.kind).toBe('full');
    expect(report.items.map((d) => d.code)).toEqual(['unbalanced-elements']);
    expect(client.notifications.filter((n) => n.method === 'textDocument/publishDiagnostics')).toEqual([]);
  });

  it('finds symbols across every notebook in the workspace folders', async () => {
    const root = mkdtempSync(join(tmpdir(), 'stillpoint-ws-'));
    mkdirSync(join(root, 'sub'));
    writeFileSync(join(root, 'one.eqnb'), 'species quinone = C6H4O2 (s)\n');
    writeFileSync(join(root, 'sub', 'two.eqnb'), 'hydrogenate: C6H4O2(s) + H2(g) -> C6H6O2(s)\nbatch quick-run at 25 °C\n');
    writeFileSync(join(root, 'notes.txt'), 'species ignored = H2\n');
    client = new LspTestClient();
    await client.initialize({ diagnosticsDelayMs: 0 }, { folders: [pathToFileURL(root).toString()] });
    const all = await client.request<{ name: string; location: { uri: string } }[]>('workspace/symbol', { query: '' });
    expect(all.map((s) => s.name).sort()).toEqual(['hydrogenate', 'quick-run', 'quinone']);
    const q = await client.request<{ name: string }[]>('workspace/symbol', { query: 'qun' });
    expect(q.map((s) => s.name).sort()).toEqual(['quick-run', 'quinone']);
  });
});
