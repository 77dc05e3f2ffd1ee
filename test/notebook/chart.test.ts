// The sweep chart: well-formed SVG (parsed by Python's standard XML parser,
// an independent implementation), points drawn where the data say, no
// scripts or external references, and the CLI command.
import { execFileSync } from 'node:child_process';
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { describe, expect, it } from 'vitest';
import { runCli } from '../../server/src/cli/commands';
import { analyse } from '../../server/src/notebook/ide/analysis';
import { batchChartSvg, chartScales, chartSvg, sweepChartData } from '../../server/src/notebook/ide/chart';

const EXAMPLE = resolve(__dirname, '../../examples/autoclave-synthesis.eqnb');

function xmlParses(svg: string): string {
  const dir = mkdtempSync(join(tmpdir(), 'stillpoint-svg-'));
  const file = join(dir, 'c.svg');
  writeFileSync(file, svg);
  const python = ['/usr/bin/python3', 'python3'].find((p) => {
    try {
      execFileSync(p, ['-c', 'import xml.etree.ElementTree'], { stdio: 'ignore' });
      return true;
    } catch {
      return false;
    }
  });
  if (!python) throw new Error('python3 is needed for the XML check (apt-get install python3)');
  return execFileSync(python, ['-c', 'import sys, xml.etree.ElementTree as E; r = E.parse(sys.argv[1]).getroot(); print(r.tag)', file]).toString().trim();
}

describe('sweep chart', () => {
  const a = analyse(readFileSync(EXAMPLE, 'utf8'));
  const batch = a.model.batches.find((b) => b.name === 'flow-c')!;

  it('is well-formed SVG with no scripts or external references', () => {
    const svg = batchChartSvg(a, batch)!;
    expect(xmlParses(svg)).toBe('{http://www.w3.org/2000/svg}svg');
    expect(svg).not.toMatch(/<script|href=|https?:\/\/(?!www\.w3\.org\/2000\/svg)/);
  });

  it('draws each point where the data say (inverse of the scales, property over every point)', () => {
    const sweep = a.sweeps.get(batch)![0];
    const data = sweepChartData(sweep, a.results.get(batch)!);
    const svg = chartSvg(data);
    const { x, y } = chartScales(data);
    const circles = [...svg.matchAll(/<circle cx="([\d.]+)" cy="([\d.]+)"/g)].map((m) => [Number(m[1]), Number(m[2])]);
    const expected = data.series.flatMap((s) => data.xs.flatMap((xv, i) => (s.ys[i] === undefined ? [] : [[x(xv), y(s.ys[i]!)]])));
    expect(circles).toHaveLength(expected.length);
    circles.forEach(([cx, cy], i) => {
      expect(Math.abs(cx - expected[i][0])).toBeLessThan(0.01); // drawn to 0.01 px
      expect(Math.abs(cy - expected[i][1])).toBeLessThan(0.01);
    });
    // the x axis runs over the swept range: the first and last temperatures are the plot's edges
    expect(data.xs[0]).toBe(350);
    expect(data.xs[data.xs.length - 1]).toBe(500);
  });

  it('the CLI writes it, and says when a batch has no sweep', () => {
    const dir = mkdtempSync(join(tmpdir(), 'stillpoint-chart-'));
    const out: string[] = [];
    const io = { out: (t: string) => out.push(t), err: (t: string) => out.push(t) };
    const file = join(dir, 'c.svg');
    expect(runCli(['chart', EXAMPLE, '--batch', 'flow-c', '--out', file], io)).toBe(0);
    expect(xmlParses(readFileSync(file, 'utf8'))).toBe('{http://www.w3.org/2000/svg}svg');
    expect(runCli(['chart', EXAMPLE, '--batch', 'charge-a'], io)).toBe(1);
    expect(runCli(['chart', EXAMPLE], io)).toBe(2);
  });
});
