// The whole notebook as a readable document for a lab record: each reaction
// with its balance status and K data, each batch with its tables, sweeps,
// targets, cautions and assumptions. One document model, rendered as Markdown
// (tables paste cleanly) or as a self-contained HTML page.
import { gibbsFromLnK } from '../../chem/thermo';
import { kAt } from '../semantic/batch-inputs';
import type { Analysis } from './analysis';
import { batchReport, celsius, ESTIMATE_NOTE, kSourceText, num } from './batch-report';
import { markdownTable, type Table } from './tables';

type Block =
  | { readonly kind: 'heading'; readonly level: 1 | 2 | 3; readonly text: string }
  | { readonly kind: 'paragraph'; readonly text: string }
  | { readonly kind: 'list'; readonly items: readonly string[] }
  | { readonly kind: 'table'; readonly table: Table };

export function reportBlocks(analysis: Analysis, title: string): Block[] {
  const out: Block[] = [{ kind: 'heading', level: 1, text: title }, { kind: 'paragraph', text: `_${ESTIMATE_NOTE} Ideal gases and ideal solutions are assumed; follow local codes and your site's process-safety review for anything that is scaled up._` }];
  const { model } = analysis;
  const errors = analysis.diagnostics.filter((d) => d.severity === 'error').length;
  const warnings = analysis.diagnostics.filter((d) => d.severity === 'warning').length;
  const count = (n: number, word: string, plural = `${word}s`): string => `${n} ${n === 1 ? word : plural}`;
  out.push({
    kind: 'paragraph',
    text: `${count(model.speciesList.length, 'species', 'species')}, ${count(model.reactions.length, 'reaction')}, ${count(model.batches.length, 'batch', 'batches')}; ${count(errors, 'error')} and ${count(warnings, 'warning')} in the notebook.`,
  });

  if (model.reactions.length > 0) {
    out.push({ kind: 'heading', level: 2, text: 'Reactions' });
    const rows = model.reactions.map((r) => {
      const equation = analysis.text.slice(r.equationStart, r.equationEnd);
      const balance = !r.balance ? 'not checked' : r.balance.balanced ? 'balanced' : 'NOT balanced';
      const k = r.reversible ? kAt(r, model, 298.15) : undefined;
      const own = [...(r.thermo?.points.map((p) => `${p.written} at ${celsius(p.T)}`) ?? []), ...(r.thermo?.dH !== undefined ? [`ΔH° = ${num(r.thermo.dH / 1000)} kJ/mol`] : [])];
      const data = own.length > 0 ? own.join('; ') : k ? `Hess's law (${kSourceText(k.source).replace(/^Hess's law: /, '')})` : '—';
      return [r.label, equation, r.reversible ? 'reversible' : 'one-way', balance, data, k ? num(Math.exp(k.lnK)) : '—', k ? `${num(gibbsFromLnK(k.lnK, 298.15) / 1000)} kJ/mol` : '—'];
    });
    out.push({
      kind: 'table',
      table: { header: ['Label', 'Equation', 'Kind', 'Balance', 'Data', 'K at 25 °C', 'ΔG° at 25 °C'], align: ['l', 'l', 'l', 'l', 'l', 'r', 'r'], rows },
    });
  }

  for (const b of model.batches) {
    const r = batchReport(analysis, b);
    out.push({ kind: 'heading', level: 2, text: r.title }, { kind: 'list', items: [...r.conditions] });
    if (!r.solved) {
      out.push({ kind: 'paragraph', text: r.problem ?? 'Not solved.' });
      continue;
    }
    if (r.cautions.length > 0) out.push({ kind: 'list', items: r.cautions.map((c) => `Caution: ${c}`) });
    if (r.species) out.push({ kind: 'table', table: r.species });
    if (r.reactions && r.reactions.rows.length > 0) out.push({ kind: 'table', table: r.reactions });
    if (r.summary.length > 0) out.push({ kind: 'list', items: [...r.summary] });
    if (r.targets.length > 0) out.push({ kind: 'heading', level: 3, text: 'Targets' }, { kind: 'list', items: [...r.targets] });
    for (const s of r.sweeps) out.push({ kind: 'heading', level: 3, text: s.title }, { kind: 'table', table: s.table });
    if (r.assumptions.length > 0) out.push({ kind: 'paragraph', text: `_Assumptions: ${r.assumptions.join('; ')}._` });
  }
  return out;
}

export function reportMarkdown(analysis: Analysis, title: string): string {
  const parts: string[] = [];
  for (const b of reportBlocks(analysis, title)) {
    if (b.kind === 'heading') parts.push(`${'#'.repeat(b.level)} ${b.text}`);
    else if (b.kind === 'paragraph') parts.push(b.text);
    else if (b.kind === 'list') parts.push(b.items.map((i) => `- ${i}`).join('\n'));
    else parts.push(markdownTable(b.table));
  }
  return `${parts.join('\n\n')}\n`;
}

function escapeHtml(s: string): string {
  return s.replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;').replace(/"/g, '&quot;');
}

/** The little Markdown our own texts use inside cells and lines: **bold**, _italic_, `code`. */
function inline(s: string): string {
  return escapeHtml(s)
    .replace(/\*\*([^*]+)\*\*/g, '<strong>$1</strong>')
    .replace(/`([^`]+)`/g, '<code>$1</code>')
    .replace(/(^|\s)_([^_]+)_(?=\s|$|[.,;])/g, '$1<em>$2</em>');
}

export function reportHtml(analysis: Analysis, title: string): string {
  const body: string[] = [];
  for (const b of reportBlocks(analysis, title)) {
    if (b.kind === 'heading') body.push(`<h${b.level}>${inline(b.text)}</h${b.level}>`);
    else if (b.kind === 'paragraph') body.push(`<p>${inline(b.text)}</p>`);
    else if (b.kind === 'list') body.push(`<ul>${b.items.map((i) => `<li>${inline(i)}</li>`).join('')}</ul>`);
    else {
      const t = b.table;
      const cell = (tag: 'th' | 'td', s: string, i: number): string => `<${tag} class="${t.align[i] === 'r' ? 'r' : 'l'}">${inline(s)}</${tag}>`;
      body.push(
        `<table><thead><tr>${t.header.map((h, i) => cell('th', h, i)).join('')}</tr></thead><tbody>${t.rows.map((r) => `<tr>${r.map((c, i) => cell('td', c, i)).join('')}</tr>`).join('')}</tbody></table>`,
      );
    }
  }
  return [
    '<!DOCTYPE html>',
    '<html lang="en"><head><meta charset="utf-8">',
    `<title>${escapeHtml(title)}</title>`,
    '<style>body{font-family:system-ui,sans-serif;max-width:60rem;margin:2rem auto;padding:0 1rem;color:#1b2838}table{border-collapse:collapse;margin:1rem 0}th,td{border:1px solid #ccd;padding:.25rem .5rem}td.r,th.r{text-align:right}code{background:#f3f4f6;padding:0 .2rem}</style>',
    '</head><body>',
    ...body,
    '</body></html>',
    '',
  ].join('\n');
}
