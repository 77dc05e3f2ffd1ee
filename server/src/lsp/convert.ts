// The only place that turns analysis data (offsets, plain objects) into
// protocol types (positions, LSP diagnostics, edits, symbols).
import {
  CodeAction as LspCodeAction,
  CodeActionKind,
  CompletionItemKind,
  type CompletionList,
  Diagnostic as LspDiagnostic,
  DiagnosticSeverity,
  DocumentSymbol,
  MarkupKind,
  SymbolKind,
  type Hover as LspHover,
  type InlayHint as LspInlayHint,
  type SemanticTokens,
  type SymbolInformation,
  type Range,
} from 'vscode-languageserver/node';
import type { Analysis, CodeAction, CompletionResult, Diagnostic, Hover, InlayHint, NotebookSymbol, SemanticToken, Severity } from '../notebook/ide/service';
import { SEMANTIC_TOKEN_TYPES } from '../notebook/ide/semantic-tokens';

export const DIAGNOSTIC_SOURCE = 'stillpoint';

export function toRange(analysis: Analysis, start: number, end: number): Range {
  return { start: analysis.lines.position(start), end: analysis.lines.position(end) };
}

const SEVERITY: Readonly<Record<Severity, DiagnosticSeverity>> = {
  error: DiagnosticSeverity.Error,
  warning: DiagnosticSeverity.Warning,
  information: DiagnosticSeverity.Information,
  hint: DiagnosticSeverity.Hint,
};

export function toDiagnostic(analysis: Analysis, d: Diagnostic): LspDiagnostic {
  return {
    range: toRange(analysis, d.start, d.end),
    severity: SEVERITY[d.severity],
    code: d.code,
    source: DIAGNOSTIC_SOURCE,
    message: d.message,
  };
}

export function toHover(analysis: Analysis, h: Hover): LspHover {
  return { contents: { kind: MarkupKind.Markdown, value: h.markdown }, range: toRange(analysis, h.start, h.end) };
}

export function toCodeAction(analysis: Analysis, uri: string, a: CodeAction): LspCodeAction {
  return {
    title: a.title,
    kind: CodeActionKind.QuickFix,
    isPreferred: a.preferred,
    diagnostics: [toDiagnostic(analysis, a.diagnostic)],
    edit: {
      changes: {
        [uri]: a.edits.map((e) => ({ range: toRange(analysis, e.start, e.end), newText: e.newText })),
      },
    },
  };
}

const SYMBOL_KIND: Readonly<Record<NotebookSymbol['kind'], SymbolKind>> = {
  species: SymbolKind.Constant,
  reaction: SymbolKind.Event,
  batch: SymbolKind.Struct,
};

export function toDocumentSymbol(analysis: Analysis, s: NotebookSymbol): DocumentSymbol {
  return {
    name: s.name,
    detail: s.detail,
    kind: SYMBOL_KIND[s.kind],
    range: toRange(analysis, s.start, s.end),
    selectionRange: toRange(analysis, s.selectionStart, s.selectionEnd),
  };
}

export function toInlayHint(analysis: Analysis, h: InlayHint): LspInlayHint {
  return { position: analysis.lines.position(h.offset), label: h.label, paddingLeft: true, tooltip: h.tooltip };
}

export function toSymbolInformation(analysis: Analysis, uri: string, s: NotebookSymbol): SymbolInformation {
  return { name: s.name, kind: SYMBOL_KIND[s.kind], location: { uri, range: toRange(analysis, s.selectionStart, s.selectionEnd) }, containerName: s.detail };
}

/** Relative (delta) encoding of semantic tokens, as the protocol wants; tokens never span lines. */
export function toSemanticTokens(analysis: Analysis, tokens: readonly SemanticToken[]): SemanticTokens {
  const data: number[] = [];
  let prevLine = 0;
  let prevChar = 0;
  for (const t of [...tokens].sort((a, b) => a.start - b.start)) {
    const p = analysis.lines.position(t.start);
    const deltaLine = p.line - prevLine;
    const deltaChar = deltaLine === 0 ? p.character - prevChar : p.character;
    data.push(deltaLine, deltaChar, t.length, SEMANTIC_TOKEN_TYPES.indexOf(t.type), t.declaration ? 1 : 0);
    prevLine = p.line;
    prevChar = p.character;
  }
  return { data };
}

const COMPLETION_KIND: Readonly<Record<CompletionResult['items'][number]['kind'], CompletionItemKind>> = {
  keyword: CompletionItemKind.Keyword,
  species: CompletionItemKind.Variable,
  label: CompletionItemKind.Event,
  batch: CompletionItemKind.Struct,
  property: CompletionItemKind.Property,
  unit: CompletionItemKind.Unit,
  element: CompletionItemKind.Constant,
};

export function toCompletionList(analysis: Analysis, r: CompletionResult): CompletionList {
  const range = toRange(analysis, r.start, r.end);
  return {
    isIncomplete: false,
    items: r.items.map((item, i) => ({
      label: item.label,
      kind: COMPLETION_KIND[item.kind],
      detail: item.detail,
      sortText: String(i).padStart(5, '0'),
      textEdit: { range, newText: item.insertText ?? item.label },
    })),
  };
}
