// Import-boundary rules that keep the layers apart: the chemistry core knows
// nothing above it; the notebook language knows nothing of the protocol or the
// terminal; only lsp/ imports the language-server library; the client imports
// no server code. Checked by reading every source file's import statements.
import { readdirSync, readFileSync } from 'node:fs';
import { join, relative, resolve } from 'node:path';
import { describe, expect, it } from 'vitest';

const ROOT = resolve(__dirname, '..');

function sourceFiles(dir: string): string[] {
  const out: string[] = [];
  for (const e of readdirSync(dir, { withFileTypes: true })) {
    const p = join(dir, e.name);
    if (e.isDirectory()) out.push(...sourceFiles(p));
    else if (e.name.endsWith('.ts')) out.push(p);
  }
  return out;
}

/** Every module specifier a file imports or re-exports, resolved to a repo-relative path for relative ones. */
function importsOf(file: string): string[] {
  const text = readFileSync(file, 'utf8');
  const specs: string[] = [];
  const re = /(?:^|\n)\s*(?:import|export)\s[^;]*?from\s+['"]([^'"]+)['"]|(?:^|\n)\s*import\s+['"]([^'"]+)['"]|\brequire\(\s*['"]([^'"]+)['"]\s*\)|\bimport\(\s*['"]([^'"]+)['"]\s*\)/g;
  for (let m = re.exec(text); m; m = re.exec(text)) {
    const spec = m[1] ?? m[2] ?? m[3] ?? m[4];
    specs.push(spec.startsWith('.') ? relative(ROOT, resolve(file, '..', spec)) : spec);
  }
  return specs;
}

interface Rule {
  readonly layer: string;
  readonly forbidden: readonly RegExp[];
}

const RULES: readonly Rule[] = [
  { layer: 'server/src/chem', forbidden: [/^server\/src\/(notebook|lsp|cli|bench)/, /^client\//, /^vscode/] },
  { layer: 'server/src/notebook', forbidden: [/^server\/src\/(lsp|cli|bench)/, /^client\//, /^vscode/, /^node:/] },
  { layer: 'server/src/cli', forbidden: [/^server\/src\/lsp/, /^client\//, /^vscode/] },
  { layer: 'server/src/bench', forbidden: [/^server\/src\/lsp/, /^client\//, /^vscode/] },
  { layer: 'client/src', forbidden: [/^server\//, /^vscode-languageserver/] },
];

describe('architecture: import boundaries', () => {
  for (const rule of RULES) {
    it(`${rule.layer} imports nothing above its layer`, () => {
      const files = sourceFiles(join(ROOT, rule.layer));
      expect(files.length).toBeGreaterThan(0);
      const violations: string[] = [];
      for (const f of files) {
        for (const spec of importsOf(f)) {
          if (rule.forbidden.some((r) => r.test(spec))) violations.push(`${relative(ROOT, f)} imports ${spec}`);
        }
      }
      expect(violations).toEqual([]);
    });
  }

  it('only server/src/lsp imports vscode-languageserver', () => {
    const offenders = sourceFiles(join(ROOT, 'server/src'))
      .filter((f) => !relative(ROOT, f).startsWith('server/src/lsp/'))
      .filter((f) => importsOf(f).some((s) => s.startsWith('vscode-languageserver')));
    expect(offenders.map((f) => relative(ROOT, f))).toEqual([]);
  });

  it('the import reader sees the imports of a known file (guards the rules above against a broken regex)', () => {
    const specs = importsOf(join(ROOT, 'server/src/lsp/server.ts'));
    expect(specs).toContain('vscode-languageserver/node');
    expect(specs).toContain('server/src/notebook/ide/service');
  });
});
