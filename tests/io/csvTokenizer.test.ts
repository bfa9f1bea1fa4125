import { readFileSync } from 'node:fs';
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { FulcraError } from '../../src/engine/core/data';
import { CsvTokenizer, recordStrings } from '../../src/io/csvTokenizer';
import { importFile, importText } from '../../src/io/index';

const BAD = new URL('../fixtures/bad-input/', import.meta.url);
const ref = JSON.parse(readFileSync(new URL('../fixtures/io/csv-reference.json', import.meta.url), 'utf8'));

function tokenize(text: string, delimiter = ',', chunk = Infinity): string[][] {
  const out: string[][] = [];
  const t = new CsvTokenizer(delimiter, (r) => out.push(recordStrings(r)));
  if (!Number.isFinite(chunk)) t.feed(text, true);
  else {
    for (let i = 0; i < text.length; i += chunk) t.feed(text.slice(i, i + chunk), i + chunk >= text.length);
    if (text.length === 0) t.feed('', true);
  }
  return out;
}

describe('CsvTokenizer', () => {
  // Reference: Python 3.11.2 csv.reader (stdlib), see tests/fixtures/io/make-reference.py.
  for (const [name, records] of Object.entries(ref.records as Record<string, string[][]>)) {
    it(`splits ${name} into the same records as Python's csv.reader`, () => {
      const delim = name.endsWith('.tsv') || name.endsWith('.txt') ? '\t' : name.startsWith('semicolon') ? ';' : ',';
      const text = readFileSync(new URL(name, BAD), 'utf8').replace(/^\ufeff/, '');
      // csv.reader yields [] for a blank line where the tokenizer yields one empty field.
      const ours = tokenize(text, delim).map((r) => (r.length === 1 && r[0] === '' ? [] : r));
      expect(ours).toEqual(records);
    });
  }

  it('gives the same records whatever the chunk size, including quotes split across chunks', () => {
    const text = 'a,"b ""q"" c",d\r\n1,"x\ny",3\r2,,"z"\n"",last';
    const whole = tokenize(text);
    for (const size of [1, 2, 3, 5, 7, 64]) expect(tokenize(text, ',', size)).toEqual(whole);
    expect(whole).toEqual([
      ['a', 'b "q" c', 'd'],
      ['1', 'x\ny', '3'],
      ['2', '', 'z'],
      ['', 'last'],
    ]);
  });

  it('keeps a trailing empty field after a final delimiter and ignores a final line end', () => {
    expect(tokenize('a,b,\n')).toEqual([['a', 'b', '']]);
    expect(tokenize('a,b,')).toEqual([['a', 'b', '']]);
    expect(tokenize('a\n\nb')).toEqual([['a'], [''], ['b']]);
  });

  it('reports an unclosed quote and a stray quote with their record and field', () => {
    const t = new CsvTokenizer(',', () => {});
    t.feed('a,b\n1,"x"y\n2,"open\n3,4', true);
    expect(t.issues).toEqual([
      { kind: 'stray-quote', record: 1, field: 1 },
      { kind: 'unclosed-quote', record: 2, field: 1 },
    ]);
  });

  it('counts line-end styles', () => {
    const t = new CsvTokenizer(',', () => {});
    t.feed('a\r\nb\nc\rd', true);
    expect(t.lineEnds).toEqual({ lf: 1, crlf: 1, cr: 1 });
  });

  it('property: on any text, importText either returns a result or throws a FulcraError', async () => {
    await fc.assert(
      fc.asyncProperty(
        fc.string({
          unit: fc.constantFrom('a', '1', ',', ';', '\t', '"', '\n', '\r', ' ', '.', '-', 'é', '#N/A', '<'),
          maxLength: 60,
        }),
        async (s) => {
          try {
            const r = await importText(s);
            expect(r.dataset.nRows).toBeGreaterThan(0);
          } catch (e) {
            expect(e).toBeInstanceOf(FulcraError);
          }
        },
      ),
      { numRuns: 300 },
    );
  });

  it('property: on any bytes, importFile (.csv or .xlsx) either returns a result or throws a FulcraError', async () => {
    const zipLike = fc.uint8Array({ maxLength: 300 }).map((b) => Uint8Array.from([0x50, 0x4b, 3, 4, ...b]));
    await fc.assert(
      fc.asyncProperty(
        fc.oneof(fc.uint8Array({ maxLength: 300 }), zipLike),
        fc.constantFrom('x.csv', 'x.xlsx'),
        async (bytes, name) => {
          try {
            await importFile(bytes, name);
          } catch (e) {
            expect(e).toBeInstanceOf(FulcraError);
          }
        },
      ),
      { numRuns: 300 },
    );
  });

  it('property: a damaged workbook (truncated or with changed bytes) gives a result or a FulcraError', async () => {
    const good = new Uint8Array(readFileSync(new URL('deflated-shared-strings.xlsx', BAD)));
    const damaged = fc.oneof(
      fc.integer({ min: 0, max: good.length - 1 }).map((n) => good.slice(0, n)),
      fc
        .array(fc.tuple(fc.integer({ min: 0, max: good.length - 1 }), fc.integer({ min: 0, max: 255 })), {
          minLength: 1,
          maxLength: 8,
        })
        .map((edits) => {
          const b = good.slice();
          for (const [i, v] of edits) b[i] = v;
          return b;
        }),
    );
    await fc.assert(
      fc.asyncProperty(damaged, async (bytes) => {
        try {
          await importFile(bytes, 'w.xlsx');
        } catch (e) {
          expect(e).toBeInstanceOf(FulcraError);
        }
      }),
      { numRuns: 150 },
    );
  });

  it('property: the byte path (UTF-8) and the text path (UTF-16) give the same import', async () => {
    const utf16 = (s: string) => {
      const out = new Uint8Array(2 + 2 * s.length);
      out[0] = 0xff;
      out[1] = 0xfe;
      for (let i = 0; i < s.length; i++) {
        out[2 + 2 * i] = s.charCodeAt(i) & 0xff;
        out[3 + 2 * i] = s.charCodeAt(i) >> 8;
      }
      return out;
    };
    const cell = fc.oneof(
      fc.constantFrom(
        '',
        'NA',
        ' 7 ',
        '1,234',
        '12 mg',
        'yes',
        'no',
        'Café',
        '"q""x"',
        '"a,b"',
        '#DIV/0!',
        '007',
        '2021-03-04',
        '-0',
        '1e3',
        '\u00a0x',
      ),
      fc.integer({ min: -50, max: 50 }).map(String),
      fc.double({ noNaN: true, noDefaultInfinity: true }).map(String),
    );
    const table = fc.array(fc.array(cell, { minLength: 1, maxLength: 5 }), { minLength: 2, maxLength: 25 });
    await fc.assert(
      fc.asyncProperty(table, fc.constantFrom('\n', '\r\n', '\r'), async (rows, eol) => {
        const text = rows.map((r) => r.join(',')).join(eol) + eol;
        const opts = { delimiter: ',' as const, header: true as const, decimal: '.' as const };
        const a = await importFile(new TextEncoder().encode(text), 'a.csv', opts).catch((e: FulcraError) => e.code);
        const b = await importFile(utf16(text), 'b.csv', opts).catch((e: FulcraError) => e.code);
        if (typeof a === 'string' || typeof b === 'string') {
          expect(a).toEqual(b);
          return;
        }
        expect(b.dataset).toEqual(a.dataset);
        expect(b.columns).toEqual(a.columns);
        expect(b.warnings).toEqual(a.warnings);
      }),
      { numRuns: 200 },
    );
  });

  it('property: numbers it writes itself come back bit-for-bit (comma and semicolon/decimal-comma files)', async () => {
    const num = fc.double({ noNaN: true, noDefaultInfinity: true, min: -1e12, max: 1e12 });
    await fc.assert(
      fc.asyncProperty(
        fc.array(fc.tuple(num, num), { minLength: 3, maxLength: 30 }),
        fc.boolean(),
        async (rows, comma) => {
          const fmt = (v: number) => (comma ? String(v).replace('.', ',') : String(v));
          const sep = comma ? ';' : ',';
          const text = `x${sep}y\n` + rows.map(([a, b]) => `${fmt(a)}${sep}${fmt(b)}`).join('\n');
          const r = await importText(text, {
            decimal: comma ? ',' : '.',
            delimiter: sep,
            columnTypes: { x: 'numeric', y: 'numeric' },
          });
          const [x, y] = r.dataset.columns;
          expect(x.kind === 'numeric' && Array.from(x.values)).toEqual(rows.map((p) => p[0] + 0));
          expect(y.kind === 'numeric' && Array.from(y.values)).toEqual(rows.map((p) => p[1] + 0));
        },
      ),
      { numRuns: 150 },
    );
  });
});
