// The analysis API: one factory returning plain functions over offsets and
// plain data. The language server and the CLI are thin callers of this; it
// knows nothing of the protocol or the terminal.
import { analyse, type Analysis } from './analysis';
import { codeActions } from './actions';
import { hover } from './hover';
import { documentSymbols } from './symbols';

export type { Analysis } from './analysis';
export type { CodeAction } from './actions';
export type { Hover } from './hover';
export type { NotebookSymbol } from './symbols';
export type { Diagnostic, Fix, TextEdit, Severity, DiagnosticCode } from '../semantic/codes';

export interface NotebookService {
  analyse(text: string): Analysis;
  hover: typeof hover;
  codeActions: typeof codeActions;
  documentSymbols: typeof documentSymbols;
}

export function createNotebookService(): NotebookService {
  return { analyse, hover, codeActions, documentSymbols };
}
