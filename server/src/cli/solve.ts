// `stillpoint solve FILE [--batch NAME] [--json]`: each batch's equilibrium
// composition from the same analysis the editor shows, as aligned text tables
// or as JSON for scripts.
import { createNotebookService } from '../notebook/ide/service';
import { textTable } from '../notebook/ide/tables';
import { ESTIMATE_NOTE } from '../notebook/ide/batch-report';
import type { CliIo } from './commands';
import { readNotebook } from './files';

interface JsonBatch {
  name: string;
  from: string | null;
  temperature_K: number | null;
  pressure_bar: number | null;
  vessel_L: number | null;
  converged: boolean;
  message?: string;
  species: { name: string; formula: string; phase: string; initial_mol: number; equilibrium_mol: number }[];
  reactions: { label: string; K: number; extent_mol: number }[];
  heat_kJ: number | null;
  adiabatic_rise_K: number | null;
  targets: { goal: string; variable: string; unit: string; value: number | null; reachable: boolean }[];
  sweeps: { variable: string; unit: string; points: { value: number; conversion: number | null; K: number | null; pressure_bar: number | null; species: Record<string, number> }[] }[];
}

export function solve(file: string, only: string | undefined, json: boolean, io: CliIo): number {
  const text = readNotebook(file, io);
  if (text === undefined) return 1;
  const service = createNotebookService();
  const analysis = service.analyse(text);
  const batches = analysis.model.batches.filter((b) => only === undefined || b.name === only);
  if (only !== undefined && batches.length === 0) {
    const names = analysis.model.batches.map((b) => `\`${b.name}\``).join(', ');
    io.err(`stillpoint: ${file} has no batch named \`${only}\`${names ? `; batches: ${names}` : ''}`);
    return 1;
  }
  let failed = analysis.diagnostics.some((d) => d.severity === 'error');
  const out: JsonBatch[] = [];
  const human: string[] = [];
  for (const b of batches) {
    const result = analysis.results.get(b);
    const report = service.batchReport(analysis, b);
    const converged = result?.status === 'converged';
    if (!converged) failed = true;
    out.push({
      name: b.name,
      from: b.source ?? null,
      temperature_K: result ? result.inputs.temperature : (b.temperature ?? null),
      pressure_bar: result && converged ? result.pressure / 1e5 : null,
      vessel_L: result ? (result.inputs.vessel !== undefined ? result.inputs.vessel * 1000 : null) : b.vessel !== undefined ? b.vessel * 1000 : null,
      converged,
      ...(converged ? {} : { message: report.problem ?? 'not solved' }),
      species: result
        ? result.inputs.species.map((s, i) => ({
            name: s.label,
            formula: s.species.formula.text,
            phase: s.phase,
            initial_mol: result.charged[i],
            equilibrium_mol: result.equilibrium[i],
          }))
        : [],
      reactions: result
        ? result.reactions.map((r) => ({ label: r.input.reaction.label, K: Math.exp(r.input.lnK), extent_mol: r.extent }))
        : [],
      heat_kJ: result && converged && result.heat.released !== undefined ? result.heat.released / 1000 : null,
      adiabatic_rise_K: result && converged && result.adiabaticRise !== undefined ? result.adiabaticRise : null,
      targets: (analysis.targets.get(b) ?? []).map((t) => ({
        goal: `${t.target.goal}${t.target.species ? ` of ${t.target.species}` : ''} = ${t.target.goal === 'pressure' ? `${t.target.value / 1e5} bar` : `${t.target.value * 100} %`}`,
        variable: t.target.label,
        unit: t.target.unitText,
        value: t.values.length > 0 ? t.values[0] : null,
        reachable: t.values.length > 0,
      })),
      sweeps: (analysis.sweeps.get(b) ?? []).map((s) => ({
        variable: s.sweep.label,
        unit: s.sweep.unitText,
        points: s.points.map((p) => {
          const r = p.result?.status === 'converged' ? p.result : undefined;
          return {
            value: p.written,
            conversion: r?.conversion ?? null,
            K: r && r.inputs.reversible.length > 0 ? Math.exp(r.inputs.reversible[0].lnK) : null,
            pressure_bar: r ? r.pressure / 1e5 : null,
            species: r ? Object.fromEntries(r.inputs.species.map((sp, i) => [sp.label, r.equilibrium[i]])) : {},
          };
        }),
      })),
    });
    human.push(`== ${report.title}`, ...report.conditions.map((c) => `  ${c}`));
    if (!report.solved) {
      human.push(`  ${report.problem ?? 'Not solved.'}`, '');
      continue;
    }
    human.push(`  ${ESTIMATE_NOTE}`);
    for (const c of report.cautions) human.push(`  CAUTION: ${c}`);
    if (report.species) human.push('', textTable(report.species));
    if (report.reactions && report.reactions.rows.length > 0) human.push('', textTable(report.reactions));
    human.push('', ...report.summary.map((x) => `  ${x.replace(/\*\*/g, '').replace(/`/g, '')}`));
    for (const t of report.targets) human.push(`  ${t.replace(/\*\*/g, '')}`);
    for (const sw of report.sweeps) human.push('', `  ${sw.title}`, textTable(sw.table));
    if (report.assumptions.length > 0) human.push(`  Assumptions: ${report.assumptions.join('; ')}.`);
    human.push('');
  }
  if (json) io.out(JSON.stringify({ file, batches: out }, null, 2));
  else {
    io.out(human.join('\n').trimEnd());
    const errors = analysis.diagnostics.filter((d) => d.severity === 'error');
    if (errors.length > 0) io.out(`\n${errors.length} error${errors.length === 1 ? '' : 's'} in ${file}; run \`stillpoint check ${file}\` for details.`);
  }
  return failed ? 1 : 0;
}
