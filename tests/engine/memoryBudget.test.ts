import { execFile } from 'node:child_process';
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { promisify } from 'node:util';
import { afterEach, describe, expect, it, vi } from 'vitest';
import { FulcraError, type Dataset } from '../../src/engine/core/data';
import { fit } from '../../src/engine/fitting/fit';
import {
  availableBytes,
  checkBudget,
  DEFAULT_TAB_BYTES,
  designColumnCount,
  estimateFitBytes,
  estimateImportBytes,
  formatBytes,
  sampleShape,
  type MemoryEstimate,
} from '../../src/engine/fitting/memoryBudget';
import type { ModelSpec } from '../../src/engine/core/model';
import { createRng } from '../../src/engine/numerics/rng';

const MiB = 1024 ** 2,
  GiB = 1024 ** 3;
const ROOT = fileURLToPath(new URL('../../', import.meta.url));

afterEach(() => vi.unstubAllGlobals());

describe('estimateFitBytes', () => {
  it('counts two n×p float64 arrays and ~20 doubles a row for a fit, plus a fixed 32 MiB', () => {
    const e = estimateFitBytes({ rows: 100_000, designColumns: 30, evaluate: false });
    expect(e.bytes).toBe(8 * 100_000 * 30 * 2 + 8 * 20 * 100_000 + 32 * MiB);
    expect(e.job).toBe('fit');
  });

  it('takes the larger of the fit and evaluation phases', () => {
    // p = 1: evaluation (53·8n, a design and the calibration designs not yet freed: 8n + 56n, a diagnostics
    // block: 8n) outweighs fitting (2·8n + 160n)
    const thin = estimateFitBytes({ rows: 1000, designColumns: 1, evaluate: true });
    expect(thin.bytes).toBe(8 * (53 + 1 + 7 + 1) * 1000 + 32 * MiB);
    // wide and long: fitting's two designs outweigh the evaluation (whose diagnostics block stops at 65 536 rows)
    const wide = estimateFitBytes({ rows: 1e6, designColumns: 100, evaluate: true });
    expect(wide.bytes).toBe(8 * 1e6 * 100 * 2 + 8 * 20 * 1e6 + 32 * MiB);
  });

  it('refuses a negative or non-finite row count with a FulcraError', () => {
    expect(() => estimateFitBytes({ rows: -1, designColumns: 3 })).toThrow(FulcraError);
    expect(() => estimateFitBytes({ rows: 10, designColumns: NaN })).toThrow(FulcraError);
  });
});

describe('designColumnCount', () => {
  it('matches the number of coefficients fit() returns for numeric, categorical, spline and interaction terms', () => {
    const n = 300,
      rng = createRng(11);
    const x = Float64Array.from({ length: n }, () => rng.normal());
    const z = Float64Array.from({ length: n }, () => rng.normal());
    const g = Int32Array.from({ length: n }, () => Math.floor(rng.next() * 4));
    const y = Float64Array.from(x, (v, i) => (rng.next() < 1 / (1 + Math.exp(-(v + 0.3 * g[i]))) ? 1 : 0));
    const data: Dataset = {
      nRows: n,
      columns: [
        { kind: 'numeric', name: 'y', values: y },
        { kind: 'numeric', name: 'x', values: x },
        { kind: 'numeric', name: 'z', values: z },
        { kind: 'categorical', name: 'g', codes: g, levels: ['a', 'b', 'c', 'd'] },
      ],
    };
    const spec: ModelSpec = {
      outcome: 'y',
      terms: [
        { type: 'main', column: 'x' },
        { type: 'main', column: 'g' },
        { type: 'spline', column: 'z', knots: 4 },
        { type: 'interaction', columns: ['x', 'g'] },
      ],
    };
    expect(designColumnCount(data, spec)).toBe(1 + 1 + 3 + 3 + 3);
    expect(designColumnCount(data, spec)).toBe(fit(data, spec, { profile: false }).coefficients.length);
  });
});

describe('sampleShape and estimateImportBytes', () => {
  it('counts records at line ends outside quotes and the widest record in fields', () => {
    const s = sampleShape('a,b,c\r\n1,"two\nlines",3\r\n4,5,6\r\n7,8', 1000, 30);
    expect(s.sampleRows).toBe(3);
    expect(s.columns).toBe(3);
  });

  it('counts the last line without a line end when the sample is the whole file', () => {
    const text = 'a;b\n1;2\n3;4';
    expect(sampleShape(text, text.length).sampleRows).toBe(3);
  });

  it('scales rows from the sample by bytes and charges 28 bytes a cell plus the file and its decoded chunks', () => {
    const e = estimateImportBytes({
      fileBytes: 100 * MiB,
      sampleBytes: 1 * MiB,
      sampleRows: 10_000,
      columns: 20,
      format: 'delimited',
    });
    expect(e.rows).toBe(1_000_000);
    expect(e.bytes).toBe(100 * MiB + 16 * MiB + 28 * 1_000_000 * 20 + 8 * 1_000_000 + 32 * MiB);
  });

  it('charges a workbook for its unzipped sheet text', () => {
    const shape = { fileBytes: 10 * MiB, sampleBytes: 10 * MiB, sampleRows: 1000, columns: 5 };
    const xlsx = estimateImportBytes({ ...shape, format: 'xlsx' }).bytes;
    const csv = estimateImportBytes({ ...shape, format: 'delimited' }).bytes;
    expect(xlsx - csv).toBe(2 * 8 * 10 * MiB - 2 * 2 * 4 * MiB);
  });
});

describe('checkBudget', () => {
  const big: MemoryEstimate = {
    job: 'import',
    bytes: 3.1 * GiB,
    rows: 2_000_000,
    columns: 40,
    parts: [{ label: 'working overhead', bytes: 32 * MiB }],
  };

  it('passes an estimate within the budget', () => {
    expect(checkBudget({ ...big, bytes: GiB }, 2 * GiB)).toEqual({ ok: true, needed: GiB, available: 2 * GiB });
  });

  it('refuses an estimate over the budget with a plain message naming both amounts and a sample size that fits', () => {
    const c = checkBudget(big, 2 * GiB);
    expect(c.ok).toBe(false);
    if (c.ok) return;
    expect(c.code).toBe('too-big');
    expect(c.message).toBe('This file needs about 3.1 GB of memory to open; the tab can use about 2 GB.');
    expect(c.suggestion).toMatch(/only the columns you need/);
    const m = /about ([\d,]+) of the 2,000,000 rows/.exec(c.suggestion);
    expect(m).not.toBeNull();
    const rows = Number(m![1].replace(/,/g, ''));
    expect(rows).toBeGreaterThan(1_000_000);
    expect(rows).toBeLessThan(2_000_000 * (2 / 3.1));
  });

  it('words a fit refusal in terms of predictors and rows', () => {
    const c = checkBudget(estimateFitBytes({ rows: 5_000_000, designColumns: 60 }), 2 * GiB);
    expect(c.ok).toBe(false);
    if (!c.ok) {
      expect(c.message).toMatch(
        /^This model needs about \d+(\.\d)? GB of memory to fit and check; the tab can use about 2 GB\.$/,
      );
      expect(c.suggestion).toMatch(/fewer predictors/);
    }
  });

  it('formats sizes in MB below 1 GB and without a trailing .0', () => {
    expect(formatBytes(740 * MiB)).toBe('740 MB');
    expect(formatBytes(2 * GiB)).toBe('2 GB');
    expect(formatBytes(12.4 * GiB)).toBe('12 GB');
  });
});

describe('availableBytes', () => {
  it('is 2 GiB when the browser does not report device memory', () => {
    vi.stubGlobal('navigator', {});
    expect(availableBytes()).toBe(DEFAULT_TAB_BYTES);
    expect(DEFAULT_TAB_BYTES).toBe(2 * GiB);
  });

  it('is a quarter of navigator.deviceMemory, capped at 2 GiB', () => {
    vi.stubGlobal('navigator', { deviceMemory: 4 });
    expect(availableBytes()).toBe(GiB);
    vi.stubGlobal('navigator', { deviceMemory: 0.5 });
    expect(availableBytes()).toBe(128 * MiB);
    vi.stubGlobal('navigator', { deviceMemory: 32 });
    expect(availableBytes()).toBe(2 * GiB);
  });

  it('ignores a deviceMemory that is not a positive number', () => {
    vi.stubGlobal('navigator', { deviceMemory: 'lots' });
    expect(availableBytes()).toBe(DEFAULT_TAB_BYTES);
  });
});

/**
 * Measured in a fresh Node process (`--expose-gc`, tsx loader): the rise of peak RSS
 * (process.resourceUsage().maxRSS) above the RSS after a full GC, while the job runs. Not timed.
 */
async function probe(body: string): Promise<Record<string, number>> {
  const dir = mkdtempSync(join(tmpdir(), 'fulcra-mem-'));
  const file = join(dir, 'probe.mjs');
  writeFileSync(
    file,
    `const root = ${JSON.stringify(ROOT)};\nconst peak = () => process.resourceUsage().maxRSS * 1024;\n${body}`,
  );
  const { stdout } = await promisify(execFile)(process.execPath, ['--expose-gc', '--import', 'tsx', file], {
    cwd: ROOT,
    maxBuffer: 1 << 20,
  });
  return JSON.parse(stdout.trim().split('\n').pop()!);
}

/** Probe script lines: 100 000 seeded rows of y, two numeric predictors and a 28-level factor g (30 design columns). */
const PROBE_DATA = `
      const { createRng } = await import(root + 'src/engine/numerics/rng.ts');
      const n = 100000, L = 28, rng = createRng(3);
      const x1 = new Float64Array(n), x2 = new Float64Array(n), g = new Int32Array(n), y = new Float64Array(n);
      for (let i = 0; i < n; i++) {
        x1[i] = rng.normal(); x2[i] = rng.normal(); g[i] = Math.floor(rng.next() * L);
        y[i] = rng.next() < 1 / (1 + Math.exp(0.5 - 0.4 * x1[i] + 0.2 * x2[i] - 0.05 * (g[i] % 6))) ? 1 : 0;
      }
      const levels = Array.from({ length: L }, (_, l) => 'L' + l);
      const data = { nRows: n, columns: [{ kind: 'numeric', name: 'y', values: y },
        { kind: 'numeric', name: 'x1', values: x1 }, { kind: 'numeric', name: 'x2', values: x2 },
        { kind: 'categorical', name: 'g', codes: g, levels }] };`;

describe('estimates against measured memory', () => {
  it('covers the measured peak of a 100 000-row fit with 30 design columns, within a factor of 4', async () => {
    const m = await probe(`
      const { fit } = await import(root + 'src/engine/fitting/fit.ts');
      ${PROBE_DATA}
      const spec = { outcome: 'y',
        terms: [{ type: 'main', column: 'x1' }, { type: 'main', column: 'x2' }, { type: 'main', column: 'g' }] };
      globalThis.gc();
      const before = peak(), rss = process.memoryUsage().rss;
      const r = fit(data, spec, { profile: false });
      console.log(JSON.stringify({ before, rss, after: peak(), n, p: r.coefficients.length }));
    `);
    expect(m.p).toBe(30);
    expect(m.after).toBeGreaterThan(m.before); // the fit set a new peak, so the rise is the fit's
    const measured = m.after - m.rss;
    const est = estimateFitBytes({ rows: m.n, designColumns: m.p, evaluate: false }).bytes;
    expect(est).toBeGreaterThanOrEqual(measured);
    expect(est).toBeLessThanOrEqual(4 * measured);
  }, 180_000);

  it(
    "covers the measured peak of the worker's whole fit job (fit with profile intervals and term tests, then " +
      'the evaluation) at 100 000 × 30',
    async () => {
      const m = await probe(`
      const { createApi } = await import(root + 'src/worker/api.ts');
      ${PROBE_DATA}
      const spec = { outcome: 'y', event: '1',
        terms: [{ type: 'main', column: 'x1' }, { type: 'main', column: 'x2' }, { type: 'main', column: 'g' }] };
      const api = createApi();
      await api.loadDataset(data, null, 'probe.csv');
      globalThis.gc();
      const before = peak(), rss = process.memoryUsage().rss;
      const v = await api.fitModel({ spec, method: 'ml', level: 0.95, alpha: 1, profile: true }, 'job');
      console.log(JSON.stringify({ before, rss, after: peak(), n, p: v.fit.coefficients.length }));
    `);
      expect(m.p).toBe(30);
      expect(m.after).toBeGreaterThan(m.before);
      const measured = m.after - m.rss;
      const est = estimateFitBytes({ rows: m.n, designColumns: m.p }).bytes;
      expect(est).toBeGreaterThanOrEqual(measured);
      expect(est).toBeLessThanOrEqual(4 * measured);
    },
    180_000,
  );

  it('covers the measured peak of importing a 100 000-row, 11-column CSV, within a factor of 4', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'fulcra-csv-'));
    const csv = join(dir, 'probe.csv');
    const lines = ['x0,x1,x2,x3,x4,x5,x6,x7,x8,x9,site'];
    for (let i = 0; i < 100_000; i++)
      lines.push(
        [...Array.from({ length: 10 }, (_, j) => (Math.sin(i * 7 + j) * 1000).toFixed(3)), `S${i % 37}`].join(','),
      );
    writeFileSync(csv, lines.join('\n') + '\n');
    const m = await probe(`
      const { readFileSync } = await import('node:fs');
      const { importFile } = await import(root + 'src/io/index.ts');
      const bytes = new Uint8Array(readFileSync(${JSON.stringify(csv)}));
      globalThis.gc();
      const before = peak(), rss = process.memoryUsage().rss;
      const r = await importFile(bytes, 'probe.csv');
      console.log(JSON.stringify({ before, rss, after: peak(), rows: r.dataset.nRows, fileBytes: bytes.length }));
    `);
    expect(m.rows).toBe(100_000);
    expect(m.after).toBeGreaterThan(m.before);
    const measured = m.after - m.rss;
    const sample = lines.slice(0, 600).join('\n');
    // the file was already loaded
    const est = estimateImportBytes(sampleShape(sample, m.fileBytes, sample.length)).bytes - m.fileBytes;
    expect(est).toBeGreaterThanOrEqual(measured);
    expect(est).toBeLessThanOrEqual(4 * measured);
  }, 180_000);
});
