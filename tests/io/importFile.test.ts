import { describe, expect, it } from 'vitest';
import { FulcraError, getColumn, type NumericColumn } from '../../src/engine/core/data';
import { importFile, importText, importTransferables, resolveImportOptions } from '../../src/io/index';
import { makeXlsx } from '../fixtures/bad-input/xlsxWriter';

/** A CSV of `rows` rows, large enough to span several 4 MB chunks when rows ≈ 250 000. */
function bigCsv(rows: number): Uint8Array {
  const parts = ['id,age,ward,ssi\n'];
  for (let i = 0; i < rows; i++)
    parts.push(`${i + 1},${20 + (i % 70)},${['A', 'B', 'C'][i % 3]},${i % 4 === 0 ? 'yes' : 'no'}\n`);
  return new TextEncoder().encode(parts.join(''));
}

describe('importFile: progress and cancellation', () => {
  const bytes = bigCsv(400_000);

  it('reports increasing progress per chunk, ending at 1, and awaits tick between chunks', async () => {
    const seen: [number, number][] = [];
    let ticks = 0;
    const r = await importFile(
      bytes,
      'big.csv',
      {},
      { onProgress: (f, n) => seen.push([f, n]), tick: async () => void ticks++ },
    );
    expect(r.dataset.nRows).toBe(400_000);
    expect(seen.length).toBeGreaterThanOrEqual(3);
    expect(ticks).toBeGreaterThanOrEqual(2);
    for (let i = 1; i < seen.length; i++) {
      expect(seen[i][0]).toBeGreaterThanOrEqual(seen[i - 1][0]);
      expect(seen[i][1]).toBeGreaterThanOrEqual(seen[i - 1][1]);
    }
    expect(seen.at(-1)![0]).toBe(1);
  });

  it('throws FulcraError("cancelled") at the next chunk once the signal is aborted', async () => {
    const signal = { aborted: false };
    let calls = 0;
    const run = importFile(
      bytes,
      'big.csv',
      {},
      {
        signal,
        onProgress: () => {
          calls++;
          signal.aborted = true;
        },
      },
    );
    await expect(run).rejects.toMatchObject({ name: 'FulcraError', code: 'cancelled' });
    expect(calls).toBe(1);
  });

  it('accepts onProgress and signal as positional arguments', async () => {
    const signal = { aborted: true };
    await expect(importFile(bytes, 'big.csv', {}, () => {}, signal)).rejects.toMatchObject({ code: 'cancelled' });
  });

  it('cancels a workbook import too', async () => {
    const xlsx = makeXlsx([{ name: 'S', rows: [['a'], [1], [2]] }]);
    await expect(importFile(xlsx, 'w.xlsx', {}, { signal: { aborted: true } })).rejects.toBeInstanceOf(FulcraError);
  });
});

describe('import result', () => {
  it('survives structuredClone unchanged (it crosses the worker boundary)', async () => {
    const r = await importText(
      'id,age,ward,ssi,when\n1,34,A,yes,2021-01-02\n2,,B,no,2021-01-03\n3,51,A,no,2021-02-01\n4,47,C,no,2021-02-03\n',
    );
    expect(structuredClone(r)).toEqual(r);
    expect(r.dataset.columns[1].kind === 'numeric' && r.dataset.columns[1].values).toBeInstanceOf(Float64Array);
  });

  it('lists one transferable buffer per column plus the row numbers, and they can be transferred', async () => {
    const r = await importText('id,age,ward,ssi\n1,34,A,yes\n2,40,B,no\n3,51,C,no\n');
    const buffers = importTransferables(r);
    expect(buffers).toHaveLength(5);
    const moved = structuredClone(r, { transfer: buffers });
    expect(moved.dataset.columns[1]).toMatchObject({ kind: 'numeric', values: Float64Array.from([34, 40, 51]) });
  });

  it('profiles numeric columns (min, median, max, histogram) and categorical ones (top levels)', async () => {
    const ages = Array.from({ length: 101 }, (_, i) => i);
    const r = await importText(
      'age,ward\n' + ages.map((a) => `${a},${a % 10 === 0 ? 'ICU' : 'ward'}`).join('\n') + '\nNA,ICU\n',
    );
    const p = r.columns[0].profile;
    expect(p).toMatchObject({ n: 102, missing: 1, distinct: 101, min: 0, median: 50, max: 100 });
    expect(p.missingPct).toBeCloseTo(100 / 102, 12);
    expect(p.histogram!.counts.length).toBeLessThanOrEqual(20);
    expect(p.histogram!.counts.reduce((s, c) => s + c, 0)).toBe(101);
    expect(p.histogram!.edges[0]).toBe(0);
    expect(p.histogram!.edges.at(-1)).toBe(100);
    expect(r.columns[1].profile.topLevels).toEqual([
      { level: 'ward', count: 90 },
      { level: 'ICU', count: 12 },
    ]);
  });

  it('applies a type chosen by the user and says so in the reason', async () => {
    const r = await importText('grade,ssi\n1,yes\n2,no\n3,no\n2,yes\n', { columnTypes: { grade: 'categorical' } });
    expect(r.columns[0]).toMatchObject({ type: 'categorical', inferredType: 'numeric', modelling: true });
    expect(r.columns[0].reason).toMatch(/^chosen by you \(inferred numeric/);
    expect(getColumn(r.dataset, 'grade')).toMatchObject({ kind: 'categorical', levels: ['1', '2', '3'] });
  });

  it('rejects a type for a column that does not exist, naming the columns', async () => {
    await expect(importText('a,b\n1,2\n', { columnTypes: { c: 'numeric' } })).rejects.toMatchObject({
      code: 'unknown-column',
      message: expect.stringContaining('Columns are: a, b'),
    });
    await expect(importText('a,b\n1,2\n', { stripUnits: ['dose'] })).rejects.toMatchObject({ code: 'unknown-column' });
  });

  it('marks identifier and free-text columns not-for-modelling but keeps them', async () => {
    const rows = Array.from(
      { length: 30 },
      (_, i) => `P${1000 + i},patient said ${i} things about the wound,${i % 2 ? 'yes' : 'no'}`,
    );
    const r = await importText('mrn,notes,ssi\n' + rows.join('\n'));
    expect(r.columns.map((c) => [c.type, c.modelling])).toEqual([
      ['identifier', false],
      ['text', false],
      ['binary', true],
    ]);
    expect(r.dataset.columns).toHaveLength(3);
  });

  it('takes the first non-blank row as the header and keeps spreadsheet row numbers', async () => {
    const r = await importText('\n\nage,ssi\n34,yes\n51,no\n47,no\n');
    expect(r.format.headerRow).toBe(3);
    expect(Array.from(r.sourceRows)).toEqual([4, 5, 6]);
  });

  it('honours manual delimiter, decimal mark and header settings', async () => {
    const r = await importText('1;2,5\n3;4,5\n5;6,5\n', { delimiter: ';', decimal: ',', header: false });
    expect(r.format).toMatchObject({ delimiter: ';', decimal: ',', header: false });
    expect(Array.from((r.dataset.columns[1] as NumericColumn).values)).toEqual([2.5, 4.5, 6.5]);
  });
});

describe('resolveImportOptions', () => {
  it('throws a FulcraError naming a bad option value', () => {
    expect(() => resolveImportOptions({ delimiter: ':' as never })).toThrow(/delimiter = ":"/);
    expect(() => resolveImportOptions({ columnTypes: { a: 'number' as never } })).toThrow(
      /"number" chosen for column "a"/,
    );
    expect(() => resolveImportOptions({ sheet: -1 })).toThrow(FulcraError);
    expect(resolveImportOptions({ delimiter: undefined }).delimiter).toBe('auto');
  });
});
