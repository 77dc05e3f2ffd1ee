// A small table model shared by the hover (Markdown) and the CLI (aligned
// text), so both show the same rows from the same numbers.

export interface Table {
  readonly header: readonly string[];
  /** 'l' left, 'r' right, one per column. */
  readonly align: readonly ('l' | 'r')[];
  readonly rows: readonly (readonly string[])[];
}

function escapeCell(s: string): string {
  return s.replace(/\|/g, '\\|');
}

export function markdownTable(t: Table): string {
  const head = `| ${t.header.map(escapeCell).join(' | ')} |`;
  const rule = `|${t.align.map((a) => (a === 'r' ? '--:' : ':--')).join('|')}|`;
  const rows = t.rows.map((r) => `| ${r.map(escapeCell).join(' | ')} |`);
  return [head, rule, ...rows].join('\n');
}

export function textTable(t: Table, indent = '  '): string {
  const width = (s: string): number => Array.from(s).length;
  const widths = t.header.map((h, i) => Math.max(width(h), ...t.rows.map((r) => width(r[i] ?? ''))));
  const pad = (s: string, i: number): string => {
    const fill = ' '.repeat(widths[i] - width(s));
    return t.align[i] === 'r' ? fill + s : s + fill;
  };
  const line = (cells: readonly string[]): string => indent + cells.map((c, i) => pad(c, i)).join('  ').trimEnd();
  return [line(t.header), indent + widths.map((w) => '-'.repeat(w)).join('  '), ...t.rows.map(line)].join('\n');
}
