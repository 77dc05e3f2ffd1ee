// A clean SVG line chart of a sweep: the swept variable across, the headline
// quantities up (conversion and yields in %, one line each), axes with units,
// a marker at the batch's own conditions, and a <title> read-out on every
// point. It uses currentColor and attributes only (no styles, no scripts), so
// it follows the editor's light or dark theme under a strict content policy. Pure: data in, SVG text out, shared by the CLI and the editor's view.
import { num } from './batch-report';
import type { SweepResult } from '../semantic/sweeps';
import type { BatchResult } from '../semantic/batch-results';
import type { BatchModel } from '../semantic/model';
import { parseUnit } from '../../chem/units';
import type { Analysis } from './analysis';

export interface ChartSeries {
  readonly name: string;
  /** One y per x; undefined where the point was not solved. */
  readonly ys: readonly (number | undefined)[];
}

export interface ChartData {
  readonly title: string;
  readonly xLabel: string;
  readonly yLabel: string;
  readonly xs: readonly number[];
  readonly series: readonly ChartSeries[];
  /** The batch's own x, marked on the chart when it lies in the range. */
  readonly marker?: number;
}

/** Chart geometry (px). */
const WIDTH = 640;
const HEIGHT = 400;
const MARGIN = { left: 64, right: 160, top: 40, bottom: 52 };
const TICKS = 5;
/** Line colours, chosen to read on light and dark backgrounds alike. */
const COLOURS = ['#2f80ed', '#eb5757', '#27ae60', '#f2994a', '#9b51e0', '#56ccf2'];

/** The headline quantities of a sweep as chart data (percentages). */
export function sweepChartData(sweep: SweepResult, base: BatchResult, ownX?: number): ChartData {
  const { inputs } = base;
  const series: ChartSeries[] = [];
  if (inputs.basis !== undefined && base.conversion !== undefined) {
    series.push({ name: `conversion of ${inputs.species[inputs.basis].label}`, ys: sweep.points.map((p) => (p.result?.status === 'converged' && p.result.conversion !== undefined ? p.result.conversion * 100 : undefined)) });
  }
  for (const y of base.yields) {
    series.push({
      name: `yield of ${inputs.species[y.index].label}`,
      ys: sweep.points.map((p) => {
        const r = p.result;
        if (!r || r.status !== 'converged') return undefined;
        const yy = r.yields.find((x) => x.index === y.index);
        const start = r.afterOneWay[y.index];
        return yy && yy.theoretical > start ? (100 * (yy.formed - start)) / (yy.theoretical - start) : undefined;
      }),
    });
  }
  return {
    title: `Sweep of ${sweep.sweep.label}`,
    xLabel: `${sweep.sweep.label} / ${sweep.sweep.unitText}`,
    yLabel: '%',
    xs: sweep.points.map((p) => p.written),
    series,
    marker: ownX,
  };
}

function escapeXml(s: string): string {
  return s.replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;').replace(/"/g, '&quot;');
}

/** Maps data to pixels; exported so tests can check where a point was drawn. */
export function chartScales(data: ChartData): { x: (v: number) => number; y: (v: number) => number; yMin: number; yMax: number } {
  const xMin = Math.min(...data.xs);
  const xMax = Math.max(...data.xs);
  const ys = data.series.flatMap((s) => s.ys.filter((v): v is number => v !== undefined));
  let yMin = ys.length > 0 ? Math.min(...ys) : 0;
  let yMax = ys.length > 0 ? Math.max(...ys) : 1;
  if (yMax - yMin < 1e-9) {
    yMin -= 1;
    yMax += 1;
  }
  const plotW = WIDTH - MARGIN.left - MARGIN.right;
  const plotH = HEIGHT - MARGIN.top - MARGIN.bottom;
  return {
    x: (v) => MARGIN.left + (xMax > xMin ? ((v - xMin) / (xMax - xMin)) * plotW : plotW / 2),
    y: (v) => MARGIN.top + plotH - ((v - yMin) / (yMax - yMin)) * plotH,
    yMin,
    yMax,
  };
}

/** The chart as a standalone SVG document (no scripts, no external references). */
export function chartSvg(data: ChartData): string {
  const { x, y, yMin, yMax } = chartScales(data);
  const xMin = Math.min(...data.xs);
  const xMax = Math.max(...data.xs);
  const parts: string[] = [];
  parts.push(
    `<svg xmlns="http://www.w3.org/2000/svg" width="${WIDTH}" height="${HEIGHT}" viewBox="0 0 ${WIDTH} ${HEIGHT}" font-family="sans-serif" font-size="12" fill="currentColor">`,
    `<text x="${WIDTH / 2}" y="22" text-anchor="middle" font-size="14" font-weight="bold">${escapeXml(data.title)}</text>`,
  );
  const bottom = HEIGHT - MARGIN.bottom;
  const right = WIDTH - MARGIN.right;
  for (let i = 0; i <= TICKS; i++) {
    const yv = yMin + ((yMax - yMin) * i) / TICKS;
    const xv = xMin + ((xMax - xMin) * i) / TICKS;
    parts.push(
      `<line stroke="currentColor" stroke-opacity=".15" x1="${MARGIN.left}" x2="${right}" y1="${y(yv).toFixed(2)}" y2="${y(yv).toFixed(2)}"/>`,
      `<text x="${MARGIN.left - 6}" y="${(y(yv) + 4).toFixed(2)}" text-anchor="end">${escapeXml(num(yv))}</text>`,
      `<text x="${x(xv).toFixed(2)}" y="${bottom + 18}" text-anchor="middle">${escapeXml(num(xv))}</text>`,
    );
  }
  parts.push(
    `<line stroke="currentColor" x1="${MARGIN.left}" x2="${right}" y1="${bottom}" y2="${bottom}"/>`,
    `<line stroke="currentColor" x1="${MARGIN.left}" x2="${MARGIN.left}" y1="${MARGIN.top}" y2="${bottom}"/>`,
    `<text x="${(MARGIN.left + right) / 2}" y="${HEIGHT - 12}" text-anchor="middle">${escapeXml(data.xLabel)}</text>`,
    `<text x="16" y="${(MARGIN.top + bottom) / 2}" text-anchor="middle" transform="rotate(-90 16 ${(MARGIN.top + bottom) / 2})">${escapeXml(data.yLabel)}</text>`,
  );
  if (data.marker !== undefined && data.marker >= xMin && data.marker <= xMax) {
    parts.push(
      `<line x1="${x(data.marker).toFixed(2)}" x2="${x(data.marker).toFixed(2)}" y1="${MARGIN.top}" y2="${bottom}" stroke="currentColor" stroke-dasharray="4 4" stroke-opacity=".6"><title>the batch as written: ${escapeXml(num(data.marker))}</title></line>`,
    );
  }
  data.series.forEach((s, k) => {
    const colour = COLOURS[k % COLOURS.length];
    const pts = data.xs.map((xv, i) => (s.ys[i] === undefined ? undefined : `${x(xv).toFixed(2)},${y(s.ys[i]!).toFixed(2)}`));
    // Break the line where a point was not solved.
    let run: string[] = [];
    const flush = (): void => {
      if (run.length > 1) parts.push(`<polyline fill="none" stroke="${colour}" stroke-width="2" points="${run.join(' ')}"/>`);
      run = [];
    };
    for (const p of pts) {
      if (p === undefined) flush();
      else run.push(p);
    }
    flush();
    data.xs.forEach((xv, i) => {
      const yv = s.ys[i];
      if (yv === undefined) return;
      parts.push(
        `<circle cx="${x(xv).toFixed(2)}" cy="${y(yv).toFixed(2)}" r="3" fill="${colour}"><title>${escapeXml(`${s.name}: ${num(yv)} ${data.yLabel} at ${data.xLabel.split(' / ')[0]} = ${num(xv)}`)}</title></circle>`,
      );
    });
    parts.push(
      `<line x1="${right + 12}" x2="${right + 30}" y1="${MARGIN.top + 16 * k + 4}" y2="${MARGIN.top + 16 * k + 4}" stroke="${colour}" stroke-width="2"/>`,
      `<text x="${right + 36}" y="${MARGIN.top + 16 * k + 8}">${escapeXml(s.name)}</text>`,
    );
  });
  parts.push('</svg>');
  return `${parts.join('\n')}\n`;
}

/** The batch's own value of a sweep's variable, in the sweep's unit (for the marker). */
function ownValue(batch: BatchModel, sweep: SweepResult): number | undefined {
  const u = parseUnit(sweep.sweep.unitText);
  if (!u.ok) return undefined;
  const a = u.toSI(0);
  const b = u.toSI(1) - a;
  const v = sweep.sweep.variable;
  const si =
    v.kind === 'temperature' ? batch.temperature : v.kind === 'pressure' ? batch.pressure : v.kind === 'vessel' ? batch.vessel : v.amount.dimension === sweep.sweep.dimension ? v.amount.value : undefined;
  return si === undefined || b === 0 ? undefined : (si - a) / b;
}

/** The SVG of a batch's first solved sweep, or undefined when it has none. */
export function batchChartSvg(analysis: Analysis, batch: BatchModel, index = 0): string | undefined {
  const sweep = analysis.sweeps.get(batch)?.[index];
  const base = analysis.results.get(batch);
  if (!sweep || !base || base.status !== 'converged') return undefined;
  return chartSvg({ ...sweepChartData(sweep, base, ownValue(batch, sweep)), title: `batch ${batch.name}: sweep of ${sweep.sweep.label}` });
}
