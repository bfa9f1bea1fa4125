import { execFile } from 'node:child_process';
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { promisify } from 'node:util';
import { describe, expect, it } from 'vitest';
import type { Dataset } from '../../src/engine/core';
import { generateSsiMonitoring, generateSsiRegistry } from '../../src/engine/demo';
import type { MonitoringRecord } from '../../src/engine/monitoring';
import { toJson } from '../../src/cli/json';
import { createApi } from '../../src/worker/api';

/**
 * One monitoring record: the invented registry is fitted and its invented second year monitored through the worker
 * api (as the page does: import, fit, open the monitoring file, monitor) and through
 * `npm run fit -- … --monitor FILE --date COL --unit COL --json`; the two MonitoringRecords must agree number for
 * number after the same JSON encoding.
 */
const run = promisify(execFile);

function csv(d: Dataset): string {
  const cell = (c: Dataset['columns'][number], i: number) =>
    c.kind === 'numeric'
      ? Number.isNaN(c.values[i])
        ? ''
        : String(c.values[i])
      : c.codes[i] < 0
        ? ''
        : c.levels[c.codes[i]];
  const lines = [d.columns.map((c) => c.name).join(',')];
  for (let i = 0; i < d.nRows; i++) lines.push(d.columns.map((c) => cell(c, i)).join(','));
  return lines.join('\n') + '\n';
}

const bytes = (path: string): ArrayBuffer => {
  const b = readFileSync(path);
  return b.buffer.slice(b.byteOffset, b.byteOffset + b.byteLength) as ArrayBuffer;
};

describe('the page and npm run fit give one monitoring record', () => {
  it('monitors the invented second year by ward the same way on both paths', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'fulcra-monitor-'));
    const reg = join(dir, 'registry.csv'),
      mon = join(dir, 'year2.csv');
    writeFileSync(reg, csv(generateSsiRegistry().dataset));
    writeFileSync(mon, csv(generateSsiMonitoring().dataset));
    const argv = ['--outcome', 'ssi_30d', '--event', 'yes', '--no-profile', '--no-term-tests'];
    const monitorArgs = ['--monitor', mon, '--date', 'op_date', '--unit', 'ward', '--period', 'quarter'];
    const { stdout } = await run('npx', ['tsx', 'src/cli/fit.ts', reg, ...argv, ...monitorArgs, '--json'], {
      maxBuffer: 64 << 20,
    });
    const cliRun = JSON.parse(stdout);
    const { file, ...cli } = cliRun.monitoring as MonitoringRecord & { file: { file: string; rows: number } };
    expect(file).toMatchObject({ file: 'year2.csv', rows: 3000 });

    const api = createApi();
    await api.importFile(bytes(reg), 'registry.csv', {}, 'import');
    await api.fitModel({ ...cliRun.request, profile: false, termTests: false }, 'fit');
    const view = await api.openMonitoringFile(bytes(mon), 'year2.csv', 'open');
    expect(view.dateCandidates).toContain('op_date');
    expect(view.unitCandidates).toContain('ward');
    const page = await api.monitor({ dateColumn: 'op_date', unitColumn: 'ward', period: 'quarter' }, 'current-fit');
    expect(JSON.parse(toJson(page))).toEqual(cli);
    expect(page.periods.map((p) => p.label)).toEqual(['2025 Q1', '2025 Q2', '2025 Q3', '2025 Q4']);
    const recal = await api.recalibrateOnPeriods(2);
    expect(recal.periods).toEqual(['2025 Q3', '2025 Q4']);
    expect(recal.model?.coefficients.length).toBe(cliRun.fit.coefficients.length);
  }, 180_000);

  it('monitors the invented demo year from the worker with the current fit', async () => {
    const api = createApi();
    await api.loadDemo('ssi');
    const d = generateSsiRegistry();
    await api.fitModel({ spec: d.spec, profile: false, termTests: false }, 'fit');
    const view = await api.loadDemoMonitoring();
    expect(view.notice).toMatch(/^Invented data/);
    expect(view.suggested).toEqual({ dateColumn: 'op_date', unitColumn: 'ward' });
    const r = await api.monitor({ dateColumn: 'op_date', unitColumn: 'ward' }, 'current-fit');
    expect(r.funnel!.units.find((u) => u.unit === 'Cedar')!.flag).toMatch(/^above/);
    expect(r.model).toMatchObject({ source: 'current-fit', outcome: 'ssi_30d', event: 'yes' });
  }, 120_000);
});
