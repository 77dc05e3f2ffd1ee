// Workspace symbols: every `.eqnb` file under the workspace folders, analysed
// once per modification time (open documents use their live text). File I/O
// lives here, in the protocol layer; the analysis API only sees text.
import { readdirSync, readFileSync, statSync } from 'node:fs';
import { join } from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';
import type { Analysis, NotebookService, NotebookSymbol } from '../notebook/ide/service';

/** Folders never searched for notebooks. */
const SKIPPED_FOLDERS: ReadonlySet<string> = new Set(['node_modules', 'dist', 'out']);
/** Most files indexed, so a huge folder cannot stall the server. */
const MAX_FILES = 5000;

export interface FileSymbols {
  readonly uri: string;
  readonly analysis: Analysis;
  readonly symbols: readonly NotebookSymbol[];
}

export class WorkspaceIndex {
  private roots: string[] = [];
  private readonly cache = new Map<string, { mtimeMs: number; entry: FileSymbols }>();

  constructor(
    private readonly service: NotebookService,
    /** The live analysis of an open document, when it is open. */
    private readonly openAnalysis: (uri: string) => Analysis | undefined,
  ) {}

  setRoots(uris: readonly string[]): void {
    this.roots = uris.filter((u) => u.startsWith('file:')).map((u) => fileURLToPath(u));
  }

  /** Symbols of every notebook in the workspace whose name contains the query's letters in order. */
  symbols(query: string): FileSymbols[] {
    const out: FileSymbols[] = [];
    for (const path of this.files()) {
      const uri = pathToFileURL(path).toString();
      const open = this.openAnalysis(uri);
      let entry: FileSymbols | undefined;
      if (open) {
        entry = { uri, analysis: open, symbols: this.service.documentSymbols(open) };
      } else {
        let mtimeMs: number;
        try {
          mtimeMs = statSync(path).mtimeMs;
        } catch {
          continue;
        }
        const hit = this.cache.get(path);
        if (hit && hit.mtimeMs === mtimeMs) entry = hit.entry;
        else {
          let text: string;
          try {
            text = readFileSync(path, 'utf8');
          } catch {
            continue;
          }
          const analysis = this.service.analyse(text);
          entry = { uri, analysis, symbols: this.service.documentSymbols(analysis) };
          this.cache.set(path, { mtimeMs, entry });
        }
      }
      const symbols = entry.symbols.filter((s) => matches(s.name, query));
      if (symbols.length > 0) out.push({ ...entry, symbols });
    }
    return out;
  }

  private files(): string[] {
    const out: string[] = [];
    const walk = (dir: string): void => {
      if (out.length >= MAX_FILES) return;
      let entries;
      try {
        entries = readdirSync(dir, { withFileTypes: true });
      } catch {
        return;
      }
      for (const e of entries) {
        if (e.name.startsWith('.') || SKIPPED_FOLDERS.has(e.name)) continue;
        const p = join(dir, e.name);
        if (e.isDirectory()) walk(p);
        else if (e.isFile() && e.name.endsWith('.eqnb')) out.push(p);
      }
    };
    for (const r of this.roots) walk(r);
    return out;
  }
}

/** Case-insensitive subsequence match, as editors do for symbol search. */
export function matches(name: string, query: string): boolean {
  const n = name.toLowerCase();
  let i = 0;
  for (const ch of query.toLowerCase()) {
    i = n.indexOf(ch, i);
    if (i < 0) return false;
    i++;
  }
  return true;
}
