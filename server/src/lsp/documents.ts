// Open documents and their analyses. Inputs (document text and version) are
// kept apart from derived state: an analysis is cached per document version.
//
// Two ways to ask for one:
// - `current(uri)`: the analysis of the text as it is now, computed if needed.
//   For requests whose answer edits the text (quick fixes, rename, formatting,
//   completion), which must never work on stale text.
// - `latest(uri)`: the latest finished analysis, even of an older version, with
//   a fresh one scheduled in the background. For requests that only show
//   something (hover, inlay hints, code lens, semantic tokens), so typing in a
//   large notebook never makes them wait. A scheduled analysis that a newer
//   edit supersedes before it starts is dropped (cancelled).
import { TextDocument } from 'vscode-languageserver-textdocument';
import { TextDocuments } from 'vscode-languageserver/node';
import type { Analysis, NotebookService } from '../notebook/ide/service';

export class DocumentStore {
  readonly documents = new TextDocuments(TextDocument);
  private readonly cache = new Map<string, { version: number; analysis: Analysis }>();
  private readonly pending = new Map<string, ReturnType<typeof setTimeout>>();
  /** How long typing must pause before a background analysis starts (ms). */
  delayMs = 250;
  /** Called after each analysis finishes (for diagnostics and the status summary). */
  onAnalysed: (uri: string, analysis: Analysis) => void = () => undefined;

  constructor(private readonly service: NotebookService) {
    this.documents.onDidClose((e) => {
      this.cache.delete(e.document.uri);
      this.cancel(e.document.uri);
    });
  }

  /** The analysis of the current text. */
  current(uri: string): Analysis | undefined {
    const doc = this.documents.get(uri);
    if (!doc) return undefined;
    const hit = this.cache.get(uri);
    if (hit && hit.version === doc.version) return hit.analysis;
    this.cancel(uri);
    const analysis = this.service.analyse(doc.getText());
    this.cache.set(uri, { version: doc.version, analysis });
    return analysis;
  }

  /** The latest finished analysis; computes one only when there is none at all. */
  latest(uri: string): Analysis | undefined {
    const doc = this.documents.get(uri);
    if (!doc) return undefined;
    const hit = this.cache.get(uri);
    if (!hit) return this.current(uri);
    if (hit.version !== doc.version) this.schedule(uri);
    return hit.analysis;
  }

  /** Whether the cached analysis is of the current version. */
  isFresh(uri: string): boolean {
    const doc = this.documents.get(uri);
    return doc !== undefined && this.cache.get(uri)?.version === doc.version;
  }

  /**
   * Analyses the current version once typing has paused for `delayMs`; every new request
   * restarts the wait, so no analysis runs (and blocks requests) in the middle of a burst
   * of edits, and an analysis a newer edit supersedes is never started.
   */
  schedule(uri: string): void {
    this.cancel(uri);
    this.pending.set(
      uri,
      setTimeout(() => {
        this.pending.delete(uri);
        if (this.isFresh(uri)) return;
        const analysis = this.current(uri);
        if (analysis) this.onAnalysed(uri, analysis);
      }, this.delayMs),
    );
  }

  cancel(uri: string): void {
    const p = this.pending.get(uri);
    if (p) clearTimeout(p);
    this.pending.delete(uri);
  }

  /** Kept for callers that only need some analysis of the current text. */
  analysis(uri: string): Analysis | undefined {
    return this.current(uri);
  }
}
