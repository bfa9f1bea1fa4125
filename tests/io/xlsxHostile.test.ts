import { deflateRawSync } from 'node:zlib';
import { describe, expect, it } from 'vitest';
import { FulcraError, getColumn, type NumericColumn } from '../../src/engine/core/data';
import { createRng } from '../../src/engine/numerics/rng';
import { importFile } from '../../src/io/index';
import { makeXlsx, zipStore, type XCell } from '../fixtures/bad-input/xlsxWriter';

/** Sets the uncompressed size that the central directory declares for entry `name` (PKWARE APPNOTE 4.3.12). */
function declareSize(zip: Uint8Array, name: string, size: number): Uint8Array {
  const out = zip.slice();
  const view = new DataView(out.buffer);
  const dec = new TextDecoder();
  for (let p = 0; p + 46 < out.length; p++) {
    if (view.getUint32(p, true) !== 0x02014b50) continue;
    const len = view.getUint16(p + 28, true);
    if (dec.decode(out.subarray(p + 46, p + 46 + len)) === name) view.setUint32(p + 24, size, true);
  }
  return out;
}

const failure = (p: Promise<unknown>) =>
  p.then(
    () => null,
    (e: unknown) => e as FulcraError,
  );

describe('hostile and unusual .xlsx workbooks', () => {
  it('reads a 200 000-row workbook (seeded, built in memory) without recursion', async () => {
    const rng = createRng(18);
    const rows: XCell[][] = [['id', 'age', 'event']];
    for (let i = 0; i < 200_000; i++) rows.push([i + 1, Math.round(20 + 60 * rng.next()), rng.next() < 0.3 ? 1 : 0]);
    const r = await importFile(makeXlsx([{ name: 'Big', rows }], true), 'big.xlsx');
    expect(r.dataset.nRows).toBe(200_000);
    const age = getColumn(r.dataset, 'age') as NumericColumn;
    expect(age.values[199_999]).toBe(rows[200_000][1]);
  }, 120_000);

  it('reads cells and rows without the optional r attribute (ECMA-376 Part 1, §18.3.1.4, §18.3.1.73)', async () => {
    const rows: XCell[][] = [
      ['id', 'age', 'ssi'],
      [1, 34, 'yes'],
      [2, null, 'no'],
      [3, 47, { date: '2021-03-04' }],
      [4, 60, 'no'],
    ];
    const r = await importFile(makeXlsx([{ name: 'S', rows, noRefs: true }]), 'norefs.xlsx');
    expect(r.dataset.nRows).toBe(4);
    expect(Array.from((getColumn(r.dataset, 'age') as NumericColumn).values)).toEqual([34, NaN, 47, 60]);
    const ssi = getColumn(r.dataset, 'ssi');
    expect(ssi.kind === 'categorical' && ssi.levels[ssi.codes[3]]).toBe('no');
  });

  it('refuses a workbook whose parts declare a huge unpacked size, before inflating, in plain words', async () => {
    const good = makeXlsx([{ name: 'S', rows: [['a'], [1], [2]] }], true);
    const bomb = declareSize(good, 'xl/worksheets/sheet1.xml', 1_100_000_000);
    const e = await failure(importFile(bomb, 'bomb.xlsx'));
    expect(e).toBeInstanceOf(FulcraError);
    expect(e!.code).toBe('xlsx-too-big');
    expect(e!.message).toMatch(/"bomb\.xlsx" would unpack to about 1 GB/);
  });

  it('stops inflating a part that unpacks to more than it declares (a zip bomb that lies)', async () => {
    const enc = new TextEncoder();
    const good = makeXlsx([{ name: 'S', rows: [['a'], [1]] }]);
    // A 64 MB run of spaces, deflated to a few dozen KB, declared as 2 000 bytes.
    const huge = new Uint8Array(64 * 1024 * 1024).fill(32);
    const zip = zipStore(
      [
        {
          name: 'xl/workbook.xml',
          data: enc.encode('<workbook><sheets><sheet name="S" r:id="rId1"/></sheets></workbook>'),
        },
        {
          name: 'xl/_rels/workbook.xml.rels',
          data: enc.encode('<Relationships><Relationship Id="rId1" Target="worksheets/sheet1.xml"/></Relationships>'),
        },
        { name: 'xl/worksheets/sheet1.xml', data: huge },
      ],
      true,
    );
    expect(good.length).toBeGreaterThan(0);
    const lying = declareSize(zip, 'xl/worksheets/sheet1.xml', 2000);
    expect(deflateRawSync(huge).length).toBeLessThan(lying.length);
    const e = await failure(importFile(lying, 'liar.xlsx'));
    expect(e).toBeInstanceOf(FulcraError);
    expect(e!.code).toBe('bad-zip');
    expect(e!.message).toContain('unpacks to more than the 2,000 bytes it declares');
  });

  it('reports merged cells instead of reading them as missing without a word', async () => {
    const rows: XCell[][] = [
      ['ward', 'age'],
      ['A', 34],
      [null, 51],
      [null, 47],
      ['B', 60],
    ];
    const r = await importFile(makeXlsx([{ name: 'S', rows, merges: ['A2:A4'] }]), 'merged.xlsx');
    const w = r.warnings.find((x) => x.code === 'merged-cells');
    expect(w?.message).toContain('A2:A4');
    expect(w?.message).toContain('rows 3–4');
  });
});
