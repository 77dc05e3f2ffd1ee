// Open documents and their analyses. Inputs (document text and version) are
// kept apart from derived state: an analysis is cached per document version
// and recomputed only when the version changes.
import { TextDocument } from 'vscode-languageserver-textdocument';
import { TextDocuments } from 'vscode-languageserver/node';
import type { Analysis, NotebookService } from '../notebook/ide/service';

export class DocumentStore {
  readonly documents = new TextDocuments(TextDocument);
  private readonly cache = new Map<string, { version: number; analysis: Analysis }>();

  constructor(private readonly service: NotebookService) {
    this.documents.onDidClose((e) => this.cache.delete(e.document.uri));
  }

  analysis(uri: string): Analysis | undefined {
    const doc = this.documents.get(uri);
    if (!doc) return undefined;
    const hit = this.cache.get(uri);
    if (hit && hit.version === doc.version) return hit.analysis;
    const analysis = this.service.analyse(doc.getText());
    this.cache.set(uri, { version: doc.version, analysis });
    return analysis;
  }
}
