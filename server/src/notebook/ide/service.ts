// The analysis API: one factory returning plain functions over offsets and
// plain data. The language server and the CLI are thin callers of this; it
// knows nothing of the protocol or the terminal.
import { analyse, createCaches, type Analysis } from './analysis';
import { codeActions } from './actions';
import { hover } from './hover';
import { documentSymbols } from './symbols';
import { inlayHints } from './inlay-hints';
import { batchReport } from './batch-report';
import { definition, documentHighlights, prepareRename, references, rename } from './references';
import { foldingRanges } from './folding';
import { semanticTokens } from './semantic-tokens';
import { completions } from './completion';
import { formatting } from './formatting';
import { balanceAllEdits, batchMarkdown, codeLenses, summary } from './commands';
import { reportHtml, reportMarkdown } from './report';
import { batchChartSvg } from './chart';

export type { Analysis } from './analysis';
export type { CodeAction } from './actions';
export type { Hover } from './hover';
export type { NotebookSymbol } from './symbols';
export type { InlayHint } from './inlay-hints';
export type { BatchReport } from './batch-report';
export type { Highlight, Range, RenameResult } from './references';
export type { FoldingRange } from './folding';
export type { SemanticToken } from './semantic-tokens';
export type { CompletionItem, CompletionResult } from './completion';
export type { CodeLens, NotebookSummary } from './commands';
export type { Diagnostic, Fix, TextEdit, Severity, DiagnosticCode } from '../semantic/codes';

export interface NotebookService {
  analyse(text: string): Analysis;
  hover: typeof hover;
  codeActions: typeof codeActions;
  documentSymbols: typeof documentSymbols;
  inlayHints: typeof inlayHints;
  batchReport: typeof batchReport;
  definition: typeof definition;
  references: typeof references;
  documentHighlights: typeof documentHighlights;
  prepareRename: typeof prepareRename;
  rename: typeof rename;
  foldingRanges: typeof foldingRanges;
  semanticTokens: typeof semanticTokens;
  completions: typeof completions;
  formatting: typeof formatting;
  balanceAllEdits: typeof balanceAllEdits;
  batchMarkdown: typeof batchMarkdown;
  summary: typeof summary;
  codeLenses: typeof codeLenses;
  reportMarkdown: typeof reportMarkdown;
  reportHtml: typeof reportHtml;
  batchChartSvg: typeof batchChartSvg;
}

export function createNotebookService(): NotebookService {
  const caches = createCaches();
  return { analyse: (text) => analyse(text, caches), hover, codeActions, documentSymbols, inlayHints, batchReport, definition, references, documentHighlights, prepareRename, rename, foldingRanges, semanticTokens, completions, formatting, balanceAllEdits, batchMarkdown, summary, codeLenses, reportMarkdown, reportHtml, batchChartSvg };
}
