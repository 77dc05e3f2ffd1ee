// Offsets <-> (line, column). Offsets are JavaScript string indices (UTF-16
// code units), which is also what the Language Server Protocol counts; the CLI
// reports 1-based lines and 1-based columns counted in Unicode characters.

export interface Position {
  /** 0-based line */
  readonly line: number;
  /** 0-based UTF-16 column */
  readonly character: number;
}

export class LineIndex {
  private readonly starts: number[] = [0];

  constructor(private readonly text: string) {
    for (let i = 0; i < text.length; i++) if (text.charCodeAt(i) === 10) this.starts.push(i + 1);
  }

  get lineCount(): number {
    return this.starts.length;
  }

  lineStart(line: number): number {
    return this.starts[Math.max(0, Math.min(line, this.starts.length - 1))];
  }

  position(offset: number): Position {
    const o = Math.max(0, Math.min(offset, this.text.length));
    let lo = 0;
    let hi = this.starts.length - 1;
    while (lo < hi) {
      const mid = (lo + hi + 1) >> 1;
      if (this.starts[mid] <= o) lo = mid;
      else hi = mid - 1;
    }
    return { line: lo, character: o - this.starts[lo] };
  }

  offset(position: Position): number {
    const start = this.lineStart(position.line);
    return Math.min(start + Math.max(0, position.character), this.text.length);
  }

  /** 1-based line and 1-based column in Unicode characters (code points). */
  humanPosition(offset: number): { line: number; column: number } {
    const p = this.position(offset);
    const start = this.starts[p.line];
    const column = Array.from(this.text.slice(start, start + p.character)).length + 1;
    return { line: p.line + 1, column };
  }
}
