import { gzipSync } from 'node:zlib';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { checkBudget, estimateFitBytes, estimateImportBytes, type ImportShape } from '../../src/engine/fitting';
import { generateDemo } from '../../src/engine/demo';
import { createApi } from '../../src/worker/api';

const MiB = 1024 ** 2;
const GiB = 1024 ** 3;

/** A CSV of `rows` lines of 10 numeric columns (seeded by the row index; about 30 bytes a line). */
function csv(rows: number): string {
  const lines = ['y,a,b,c,d,e,f,g,h,i'];
  for (let i = 0; i < rows; i++) lines.push(`${i % 2},${i % 7},${i % 11},${i % 13},3,4,5,6,7,8`);
  return lines.join('\n');
}

const codeOf = (p: Promise<unknown>) =>
  p.then(
    () => 'no error',
    (e: { code?: string; message?: string }) => `${e.code}: ${e.message}`,
  );

describe('the memory guard on every way in (the worker api)', () => {
  // navigator.deviceMemory = 0.25 GiB → the tab may use 64 MiB (availableBytes: a quarter of the device memory).
  let saved: PropertyDescriptor | undefined;
  beforeEach(() => {
    saved = Object.getOwnPropertyDescriptor(globalThis, 'navigator');
    Object.defineProperty(globalThis, 'navigator', { value: { deviceMemory: 0.25 }, configurable: true });
  });
  afterEach(() => {
    if (saved) Object.defineProperty(globalThis, 'navigator', saved);
    else delete (globalThis as { navigator?: unknown }).navigator;
  });

  const big = new TextEncoder().encode(csv(400_000)); // ≈ 9 MB, 400 000 × 10 cells ≈ 107 MB to read

  it('refuses a file to score, before reading it, when the tab cannot hold it', async () => {
    const api = createApi();
    const buf = big.slice().buffer;
    expect(await codeOf(api.scoreBatch(buf, 'new-cases.csv', 0.2, 'j1'))).toMatch(/^too-big: This file needs about/);
  });

  it('refuses a file for external validation the same way', async () => {
    const api = createApi();
    expect(await codeOf(api.externalValidate(big.slice().buffer, 'next-year.csv', 'j2'))).toMatch(/^too-big/);
  });

  it('refuses pasted cells the same way', async () => {
    const api = createApi();
    expect(await codeOf(api.importText(csv(400_000), {}, 'j3'))).toMatch(/^too-big/);
  });

  it('refuses a workspace file that would unpack to more than the tab can hold (gzip ISIZE, RFC 1952)', async () => {
    const api = createApi();
    const packed = new Uint8Array(gzipSync(Buffer.alloc(40 * MiB, 32)));
    expect(packed.length).toBeLessThan(1 * MiB);
    expect(await codeOf(api.readWorkspaceFile(packed))).toMatch(/^too-big: This workspace file needs about/);
  });
});

describe("the guard's suggestions", () => {
  it('suggests a sample that fits by its own formula and is not far smaller than what fits (3M × 100 CSV)', () => {
    // The reported case: 3 000 000 rows × 100 columns in 1.96 GB (about 653 bytes a row).
    const perRow = 1.96e9 / 3e6;
    const shape = (rows: number): ImportShape => ({
      fileBytes: rows * perRow,
      sampleBytes: Math.min(rows * perRow, 64 * 1024),
      sampleRows: Math.min(rows, Math.floor((64 * 1024) / perRow)),
      columns: 100,
      format: 'delimited',
    });
    const c = checkBudget(estimateImportBytes(shape(3e6)), 2 * GiB);
    expect(c.ok).toBe(false);
    if (c.ok) return;
    const m = /about ([\d,]+) of the ([\d,]+) rows/.exec(c.suggestion);
    expect(m).not.toBeNull();
    const rows = Number(m![1].replace(/,/g, ''));
    expect(estimateImportBytes(shape(rows)).bytes).toBeLessThanOrEqual(2 * GiB);
    expect(estimateImportBytes(shape(rows * 1.25)).bytes).toBeGreaterThan(2 * GiB);
  });

  it('does not tell a fit to turn off a control the page does not have', () => {
    const c = checkBudget(estimateFitBytes({ rows: 5_000_000, designColumns: 60 }), 2 * GiB);
    expect(c.ok).toBe(false);
    if (c.ok) return;
    expect(c.suggestion).not.toMatch(/profile/);
    const rows = Number(/about ([\d,]+) of the/.exec(c.suggestion)![1].replace(/,/g, ''));
    expect(estimateFitBytes({ rows, designColumns: 60 }).bytes).toBeLessThanOrEqual(2 * GiB);
    expect(estimateFitBytes({ rows: rows * 1.25, designColumns: 60 }).bytes).toBeGreaterThan(2 * GiB);
  });
});

describe('large outputs as Blob parts', () => {
  it('hands the scored CSV over as parts of at most 20 000 rows, never as one string', async () => {
    const { createSession } = await import('../../src/worker/session');
    const { loadDemo } = await import('../../src/worker/dataOps');
    const { fitModel } = await import('../../src/worker/modelOps');
    const { readPasted } = await import('../../src/worker/ioOps');
    const { scoreImported } = await import('../../src/worker/scoreOps');
    const s = createSession();
    loadDemo(s, 'ssi');
    const data = s.data!;
    await fitModel(s, { spec: generateDemo('ssi').spec, method: 'ml', level: 0.95, alpha: 0.5, profile: false }, {});
    const cell = (j: number, r: number) => {
      const c = data.columns[j];
      if (c.kind === 'numeric') return Number.isNaN(c.values[r]) ? '' : String(c.values[r]);
      return c.codes[r] < 0 ? '' : c.levels[c.codes[r]];
    };
    const rows = [data.columns.map((c) => c.name).join('\t')];
    for (let i = 0; i < 45_000; i++) rows.push(data.columns.map((_, j) => cell(j, i % data.nRows)).join('\t'));
    const batch = scoreImported(s, await readPasted(rows.join('\n'), {}, {}), 0.2);
    const lines = batch.csvParts.map((p) => p.split('\r\n').length - 1);
    expect(lines.length).toBeGreaterThanOrEqual(3);
    expect(Math.max(...lines)).toBeLessThanOrEqual(20_001);
    expect(lines.reduce((a, b) => a + b, 0)).toBe(45_001);
  }, 60_000);
});
