// The notebook report (Markdown and HTML) and the `report` command: what it
// contains, that the HTML's tags balance, and the command's options.
import { mkdtempSync, readFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { describe, expect, it } from 'vitest';
import { runCli } from '../../server/src/cli/commands';
import { analyse } from '../../server/src/notebook/ide/analysis';
import { reportHtml, reportMarkdown } from '../../server/src/notebook/ide/report';

const EXAMPLE = resolve(__dirname, '../../examples/pilot-esterification.eqnb');

/** Open tags still unclosed, or closing tags that do not match, in order (void elements skipped). */
function tagProblems(html: string): string[] {
  const stack: string[] = [];
  const problems: string[] = [];
  const VOID = new Set(['meta', 'br', 'hr', 'img', 'link', 'input']);
  for (const m of html.matchAll(/<(\/?)([a-zA-Z0-9]+)[^>]*>/g)) {
    const [, closing, tag] = m;
    if (VOID.has(tag.toLowerCase())) continue;
    if (!closing) stack.push(tag);
    else if (stack.pop() !== tag) problems.push(`unexpected </${tag}>`);
  }
  return [...problems, ...stack.map((t) => `unclosed <${t}>`)];
}

describe('report', () => {
  const text = readFileSync(EXAMPLE, 'utf8');
  const a = analyse(text);

  it('in Markdown: the reactions table, each batch with its tables, targets and sweeps', () => {
    const md = reportMarkdown(a, 'Pilot');
    expect(md.startsWith('# Pilot\n')).toBe(true);
    expect(md).toContain('| esterify | acid + EtOH <=> ester + water | reversible | balanced |');
    for (const b of a.model.batches) expect(md).toContain(`## batch ${b.name}`);
    expect(md).toContain('| Species | Phase | Initial / mol | Change / mol | Equilibrium / mol | At equilibrium |');
    // 95 % conversion with K = 4 needs n = 0.95 + 0.95²/(4 × 0.05) = 5.4625 equiv (closed form)
    expect(md).toContain('Target conversion of acid = 95.0 %: reached at EtOH = **5.462 equiv**');
    expect(md).toContain('### Sweep of EtOH (6 points)');
    expect(md).toContain('not a process-safety assessment');
  });

  it('in HTML: a self-contained page whose tags balance, with the same content', () => {
    const html = reportHtml(a, 'Pilot <run>');
    expect(tagProblems(html)).toEqual([]);
    expect(html).toContain('<title>Pilot &lt;run&gt;</title>');
    expect(html).toContain('<strong>5.462 equiv</strong>');
    expect(html).not.toMatch(/<script|https?:\/\//);
  });

  it('the command writes Markdown or HTML, to a file or standard output', () => {
    const dir = mkdtempSync(join(tmpdir(), 'stillpoint-report-'));
    const out: string[] = [];
    const io = { out: (t: string) => out.push(t), err: (t: string) => out.push(t) };
    expect(runCli(['report', EXAMPLE], io)).toBe(0);
    expect(out.join('\n')).toContain('# Equilibrium notebook: pilot-esterification.eqnb');
    const file = join(dir, 'r.html');
    expect(runCli(['report', EXAMPLE, '--format', 'html', '--out', file], io)).toBe(0);
    expect(tagProblems(readFileSync(file, 'utf8'))).toEqual([]);
    expect(runCli(['report', EXAMPLE, '--format', 'pdf'], io)).toBe(2);
    expect(runCli(['check', EXAMPLE, '--out', file], io)).toBe(2);
  });
});
