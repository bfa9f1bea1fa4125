import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { FulcraError, type CategoricalColumn, type NumericColumn } from '../../src/engine/core/data';
import { importFile, importText, type ImportOptions, type ImportResult } from '../../src/io/index';
import { nonFinitePaths, stem } from './walk';

/** NaN is documented for a missing numeric cell and for the min/median/max of a column with no numbers. */
const documentedNaN = (path: string, v: number) =>
  Number.isNaN(v) &&
  (stem(path) === 'dataset.columns.values' || /^columns\.profile\.(min|median|max)$/.test(stem(path)));

/** Structural checks every import result must pass. */
function checkResult(r: ImportResult): void {
  expect(nonFinitePaths(r, documentedNaN), 'import result').toEqual([]);
  expect(r.sourceRows.length).toBe(r.dataset.nRows);
  expect(r.columns.length).toBe(r.dataset.columns.length);
  for (const c of r.dataset.columns) {
    if (c.kind === 'numeric') expect(c.values.length).toBe(r.dataset.nRows);
    else {
      expect(c.codes.length).toBe(r.dataset.nRows);
      for (const k of c.codes) expect(k >= -1 && k < c.levels.length).toBe(true);
    }
  }
  for (const w of r.warnings)
    expect(typeof w.code === 'string' && w.code.length > 0 && w.message.length > 0).toBe(true);
}

async function onlyFulcraErrors(run: () => Promise<ImportResult>): Promise<ImportResult | null> {
  try {
    return await run();
  } catch (e) {
    if (e instanceof FulcraError) return null;
    throw e;
  }
}

/** Bytes that matter to a delimited-text reader, mixed with random ones (no NUL: a NUL makes the file binary). */
const hostileByte = fc.oneof(
  { weight: 1, arbitrary: fc.integer({ min: 1, max: 255 }) },
  { weight: 10, arbitrary: fc.constantFrom(...Array.from(',;\t|"\r\n\n\na1.- eNA', (c) => c.charCodeAt(0))) },
  { weight: 1, arbitrary: fc.constantFrom(0xff, 0xfe, 0xef, 0xbb, 0xbf, 0xc3, 0xa9, 0x80) },
);
const options: fc.Arbitrary<ImportOptions> = fc.record({
  delimiter: fc.constantFrom('auto' as const, ',' as const, ';' as const, '\t' as const, '|' as const),
  decimal: fc.constantFrom('auto' as const, '.' as const, ',' as const),
  encoding: fc.constantFrom('auto' as const, 'utf-8' as const, 'windows-1252' as const, 'utf-16le' as const),
  header: fc.constantFrom('auto' as const, true, false),
});

const SETTINGS = { numRuns: 150, seed: 8675309, endOnFailure: true } as const;

describe('delimited import under hostile bytes', () => {
  it('random bytes with random import options: only FulcraError is thrown and results are consistent', async () => {
    await fc.assert(
      fc.asyncProperty(
        fc.array(hostileByte, { minLength: 1, maxLength: 3000, size: 'large' }).map((a) => Uint8Array.from(a)),
        options,
        async (bytes, o) => {
          const r = await onlyFulcraErrors(() => importFile(bytes, 'fuzz.csv', o));
          if (r) checkResult(r);
        },
      ),
      SETTINGS,
    );
  });
});

// ---- structured tables: the row count and the cell texts must survive quoting, delimiters and line ends ----

const MISSING = ['', 'NA', 'n/a', '.', '-', '?', '#N/A', '#DIV/0!'];
const textChar = fc.constantFrom(
  ...Array.from('abcXYZ019 .,;|\t"\'éß中😀#-+e'),
  '\n',
  '\r',
  '\r\n',
  '\u00a0',
  '\u0000',
);
const textCell = fc.oneof(
  { weight: 6, arbitrary: fc.array(textChar, { minLength: 1, maxLength: 12 }).map((a) => a.join('')) },
  {
    weight: 2,
    arbitrary: fc.constantFrom('007', '1.50', '1,234', '1e5', '-0', '12 mg', 'TRUE', ' padded ', 'Infinity', '0x1F'),
  },
);

interface Table {
  delimiter: ',' | ';' | '\t' | '|';
  rows: string[][];
  width: number;
  eol: ('\n' | '\r\n' | '\r')[];
  trailingEol: boolean;
  bom: boolean;
}

const table: fc.Arbitrary<Table> = fc
  .record({
    delimiter: fc.constantFrom(',' as const, ';' as const, '\t' as const, '|' as const),
    width: fc.integer({ min: 1, max: 6 }),
    height: fc.integer({ min: 1, max: 25 }),
    trailingEol: fc.boolean(),
    bom: fc.boolean(),
    seed: fc.nat(),
  })
  .chain((t) =>
    fc.record({
      delimiter: fc.constant(t.delimiter),
      width: fc.constant(t.width),
      trailingEol: fc.constant(t.trailingEol),
      bom: fc.constant(t.bom),
      rows: fc.array(
        fc.array(fc.oneof({ weight: 5, arbitrary: textCell }, { weight: 2, arbitrary: fc.constantFrom(...MISSING) }), {
          minLength: t.width,
          maxLength: t.width,
        }),
        { minLength: t.height, maxLength: t.height },
      ),
      eol: fc.array(fc.constantFrom('\n' as const, '\r\n' as const, '\r' as const), {
        minLength: t.height + 1,
        maxLength: t.height + 1,
      }),
    }),
  );

/** RFC 4180 writing: a field is quoted when it holds the delimiter, a quote, a line end, or starts with a quote. */
function writeField(s: string, d: string): string {
  return /["\r\n]/.test(s) || s.includes(d) ? `"${s.replace(/"/g, '""')}"` : s;
}

function writeTable(t: Table): string {
  const header = Array.from({ length: t.width }, (_, j) => `c${j}`);
  const lines = [header, ...t.rows].map((r) => r.map((f) => writeField(f, t.delimiter)).join(t.delimiter));
  let out = t.bom ? '\ufeff' : '';
  lines.forEach((l, i) => {
    out += l + (i < lines.length - 1 || t.trailingEol ? t.eol[i] : '');
  });
  return out;
}

const isMissingToken = (s: string) => MISSING.some((m) => m.toUpperCase() === s.trim().toUpperCase());
/** Blank rows (every cell empty after trimming) are skipped by the importer, by its documented contract. */
const nonBlank = (row: string[]) => row.some((c) => c.trim() !== '');

describe('delimited import of generated tables', () => {
  it('has one dataset row per non-blank data line and keeps every text cell exactly (trimmed)', async () => {
    await fc.assert(
      fc.asyncProperty(table, async (t) => {
        if (t.rows.some((r) => r.some((c) => c.includes('\u0000')))) {
          // NUL bytes make the file binary: the importer must refuse it with a FulcraError, not crash.
          const e = await importText(writeTable(t), { delimiter: t.delimiter, header: true }).then(
            () => null,
            (x: unknown) => x,
          );
          expect(e === null || e instanceof FulcraError).toBe(true);
          return;
        }
        const columnTypes = Object.fromEntries(Array.from({ length: t.width }, (_, j) => [`c${j}`, 'text' as const]));
        const r = await importText(writeTable(t), {
          delimiter: t.delimiter,
          header: true,
          columnTypes,
          missingTokens: MISSING,
        });
        checkResult(r);
        const kept = t.rows.filter(nonBlank);
        expect(r.dataset.nRows).toBe(kept.length);
        expect(r.dataset.columns.length).toBe(t.width);
        for (let j = 0; j < t.width; j++) {
          const col = r.dataset.columns[j] as CategoricalColumn;
          expect(col.kind).toBe('categorical');
          const got = Array.from(col.codes, (k) => (k < 0 ? null : col.levels[k]));
          const want = kept.map((row) => (isMissingToken(row[j]) ? null : row[j].trim()));
          expect(got).toEqual(want);
        }
      }),
      { ...SETTINGS, numRuns: 200 },
    );
  });
});

// ---- numbers written in known formats read back to the same double ----

const finiteDouble = fc.double({ noNaN: true, noDefaultInfinity: true });
const writers: Record<string, (v: number) => string> = {
  shortest: (v) => String(v),
  precision17: (v) => v.toPrecision(17),
  exponential: (v) => v.toExponential(),
};

describe('numbers round-trip exactly', () => {
  for (const [name, write] of Object.entries(writers)) {
    it(`reads back every double written as ${name} with a decimal point`, async () => {
      await fc.assert(
        fc.asyncProperty(fc.array(finiteDouble, { minLength: 1, maxLength: 40 }), async (xs) => {
          const text = 'x,tag\n' + xs.map((v, i) => `${write(v)},r${i}`).join('\n') + '\n';
          const r = await importText(text, { delimiter: ',', header: true, columnTypes: { x: 'numeric' } });
          const col = r.dataset.columns[0] as NumericColumn;
          expect(col.kind).toBe('numeric');
          expect(Array.from(col.values)).toEqual(xs.map((v) => (v === 0 ? 0 : v)));
        }),
        { ...SETTINGS, numRuns: 100 },
      );
    });
  }

  it('reads back every double written with a decimal comma in a semicolon file', async () => {
    await fc.assert(
      fc.asyncProperty(fc.array(finiteDouble, { minLength: 1, maxLength: 40 }), async (xs) => {
        const text = 'x;tag\n' + xs.map((v, i) => `${String(v).replace('.', ',')};r${i}`).join('\r\n');
        const r = await importText(text, { delimiter: ';', decimal: ',', header: true, columnTypes: { x: 'numeric' } });
        const col = r.dataset.columns[0] as NumericColumn;
        expect(Array.from(col.values)).toEqual(xs.map((v) => (v === 0 ? 0 : v)));
      }),
      { ...SETTINGS, numRuns: 100 },
    );
  });

  it('reads back safe integers written with en-US thousands separators in quoted fields', async () => {
    await fc.assert(
      fc.asyncProperty(
        fc.array(fc.integer({ min: -(2 ** 53) + 1, max: 2 ** 53 - 1 }), { minLength: 1, maxLength: 40 }),
        async (xs) => {
          const text = 'x,tag\n' + xs.map((v, i) => `"${v.toLocaleString('en-US')}",r${i}`).join('\n');
          const r = await importText(text, { delimiter: ',', header: true, columnTypes: { x: 'numeric' } });
          const col = r.dataset.columns[0] as NumericColumn;
          expect(Array.from(col.values)).toEqual(xs.map((v) => (v === 0 ? 0 : v)));
        },
      ),
      { ...SETTINGS, numRuns: 100 },
    );
  });
});

// ---- fixed hostile files ----

describe('delimited import of fixed hostile files', () => {
  it('reads a 300 000-character cell (larger than the detection sample) into one row', async () => {
    const huge = 'x'.repeat(300_000);
    const r = await importText(`id,note\n1,${huge}\n2,short\n`, { header: true });
    expect(r.dataset.nRows).toBe(2);
    const note = r.dataset.columns[1] as CategoricalColumn;
    expect(note.levels[note.codes[0]]).toBe(huge);
    checkResult(r);
  });

  it('refuses a file with NUL bytes with a FulcraError that says it is not text', async () => {
    const bytes = new TextEncoder().encode('a,b\n1,2\n\u0000\u0000\u0000,3\n');
    const e = await importFile(bytes, 'nul.csv').then(
      () => null,
      (x: unknown) => x,
    );
    expect(e).toBeInstanceOf(FulcraError);
    expect((e as FulcraError).code).toBe('not-text');
  });

  it('counts lone CRs as row ends (old Mac files)', async () => {
    const r = await importText('a,b\r1,2\r3,4\r5,6', { header: true });
    expect(r.dataset.nRows).toBe(3);
    checkResult(r);
  });

  it('reads invalid UTF-8 as Windows-1252 with an encoding-fallback warning, keeping the row count', async () => {
    const bytes = Uint8Array.from([
      ...new TextEncoder().encode('name,y\n'),
      0x43,
      0x61,
      0x66,
      0xe9,
      0x2c,
      0x31,
      0x0a,
      0x41,
      0x2c,
      0x30,
      0x0a,
    ]);
    const r = await importFile(bytes, 'latin.csv');
    expect(r.warnings.map((w) => w.code)).toContain('encoding-fallback');
    expect(r.dataset.nRows).toBe(2);
    const name = r.dataset.columns[0] as CategoricalColumn;
    expect(name.levels).toContain('Café');
  });

  it('keeps a quoted field that never closes and says so', async () => {
    const r = await importText('a,b\n1,"open\n2,3\n', { header: true, delimiter: ',' });
    expect(r.warnings.map((w) => w.code)).toContain('unclosed-quote');
    checkResult(r);
  });
});
