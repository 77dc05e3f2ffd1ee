// Test helper: loads syntaxes/eqnb.tmLanguage.json with vscode-textmate and the
// oniguruma WebAssembly build, and tokenizes notebook text into scoped tokens.
import { readFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import { dirname, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import type { IGrammar, IOnigLib, StateStack } from 'vscode-textmate';

type TextMateModule = typeof import('vscode-textmate');
type OnigurumaModule = typeof import('vscode-oniguruma');

const require = createRequire(import.meta.url);
const textmate = require('vscode-textmate') as TextMateModule;
const oniguruma = require('vscode-oniguruma') as OnigurumaModule;

const repoRoot = resolve(dirname(fileURLToPath(import.meta.url)), '..', '..');

export const GRAMMAR_PATH = resolve(repoRoot, 'syntaxes', 'eqnb.tmLanguage.json');
export const LANGUAGE_CONFIGURATION_PATH = resolve(repoRoot, 'syntaxes', 'language-configuration.json');
export const SCOPE_NAME = 'source.eqnb';

/** One token of a line: its text, its columns (UTF-16, end exclusive) and its scope stack, outermost first. */
export interface ScopedToken {
  readonly text: string;
  readonly start: number;
  readonly end: number;
  readonly scopes: readonly string[];
}

let onigLibPromise: Promise<IOnigLib> | undefined;
let grammarPromise: Promise<IGrammar> | undefined;

/** The oniguruma library for vscode-textmate; the WebAssembly module is loaded once per process. */
export function loadOnigLib(): Promise<IOnigLib> {
  onigLibPromise ??= (async () => {
    const wasmPath = resolve(dirname(require.resolve('vscode-oniguruma')), 'onig.wasm');
    const wasm = readFileSync(wasmPath);
    await oniguruma.loadWASM({ data: wasm.buffer.slice(wasm.byteOffset, wasm.byteOffset + wasm.byteLength) });
    return {
      createOnigScanner: (patterns: string[]) => new oniguruma.OnigScanner(patterns),
      createOnigString: (text: string) => new oniguruma.OnigString(text),
    };
  })();
  return onigLibPromise;
}

/** The notebook grammar, read from disk and compiled once per process. */
export function loadGrammar(): Promise<IGrammar> {
  grammarPromise ??= (async () => {
    const registry = new textmate.Registry({
      onigLib: loadOnigLib(),
      loadGrammar: async (scopeName: string) =>
        scopeName === SCOPE_NAME ? textmate.parseRawGrammar(readFileSync(GRAMMAR_PATH, 'utf8'), GRAMMAR_PATH) : null,
    });
    const grammar = await registry.loadGrammar(SCOPE_NAME);
    if (!grammar) throw new Error(`grammar ${SCOPE_NAME} could not be loaded from ${GRAMMAR_PATH}`);
    return grammar;
  })();
  return grammarPromise;
}

/**
 * Tokenizes consecutive lines, carrying the grammar's state from one line to the next
 * (so an indented line sees the batch or statement above it). Returns one token list per line.
 */
export async function tokenizeLines(lines: readonly string[]): Promise<ScopedToken[][]> {
  const grammar = await loadGrammar();
  let state: StateStack = textmate.INITIAL;
  const result: ScopedToken[][] = [];
  for (const line of lines) {
    const tokenized = grammar.tokenizeLine(line, state);
    if (tokenized.stoppedEarly) throw new Error(`tokenizing stopped early on line: ${line}`);
    result.push(
      tokenized.tokens.map((t) => ({
        text: line.slice(t.startIndex, Math.min(t.endIndex, line.length)),
        start: t.startIndex,
        end: Math.min(t.endIndex, line.length),
        scopes: t.scopes,
      })),
    );
    state = tokenized.ruleStack;
  }
  return result;
}

/** Tokenizes a single line from the initial state (a column-0 statement or a lone property line). */
export async function tokenizeLine(line: string): Promise<ScopedToken[]> {
  const [tokens] = await tokenizeLines([line]);
  return tokens;
}
