import { readdirSync, readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { FulcraError, getColumn, type CategoricalColumn, type NumericColumn } from '../../src/engine/core/data';
import { importFile, importText, proposeOutcomeEvent, type ImportOptions, type ImportResult } from '../../src/io/index';

const DIR = new URL('../fixtures/bad-input/', import.meta.url);
const read = (name: string) => new Uint8Array(readFileSync(new URL(name, DIR)));
const load = (name: string, options: ImportOptions = {}) => importFile(read(name), name, options);
const codes = (r: ImportResult) => r.warnings.map((w) => w.code);
const warn = (r: ImportResult, code: string) => {
  const w = r.warnings.find((x) => x.code === code);
  expect(w, `warning ${code} in ${codes(r).join(', ')}`).toBeDefined();
  return w!;
};
const info = (r: ImportResult, name: string) => r.columns.find((c) => c.name === name)!;
/** Values of a numeric column, or of a two-valued numeric column stored as levels (binary). */
const num = (r: ImportResult, name: string) => {
  const c = getColumn(r.dataset, name);
  return c.kind === 'numeric'
    ? Array.from((c as NumericColumn).values)
    : Array.from(c.codes, (k) => (k < 0 ? NaN : Number(c.levels[k])));
};
const cat = (r: ImportResult, name: string) => {
  const c = getColumn(r.dataset, name) as CategoricalColumn;
  return Array.from(c.codes, (k) => (k < 0 ? null : c.levels[k]));
};
async function fatal(name: string, code: string, options: ImportOptions = {}): Promise<FulcraError> {
  const e = await load(name, options).then(
    () => null,
    (x: unknown) => x,
  );
  expect(e).toBeInstanceOf(FulcraError);
  expect((e as FulcraError).code).toBe(code);
  return e as FulcraError;
}

/** Fixture → the behaviour expected of it. Every file the fixture script writes must be listed here. */
const cases: Record<string, () => Promise<void>> = {
  'empty.csv': async () => {
    const e = await fatal('empty.csv', 'empty-file');
    expect(e.message).toContain('0 bytes');
    expect(e.suggestion).toBeTruthy();
  },
  'whitespace-only.csv': async () => {
    expect((await fatal('whitespace-only.csv', 'empty-file')).message).toContain('4 blank rows');
  },
  'header-only.csv': async () => {
    const e = await fatal('header-only.csv', 'no-data-rows');
    expect(e.message).toContain('row 1: "id", "age", "ssi"');
  },
  'header-only.xlsx': async () => {
    await fatal('header-only.xlsx', 'no-data-rows');
  },
  'ragged-rows.csv': async () => {
    const r = await load('ragged-rows.csv');
    expect(warn(r, 'short-rows').message).toContain('row 3: 2 of 3 cells');
    expect(warn(r, 'long-rows').message).toContain('row 4: 4 of 3 cells');
    expect(cat(r, 'ssi')).toEqual(['yes', null, 'no', 'no']);
    expect(cat(r, 'column_4')).toEqual([null, null, 'extra', null]);
  },
  'duplicate-names.csv': async () => {
    const r = await load('duplicate-names.csv');
    expect(r.columns.map((c) => c.name)).toEqual(['id', 'age', 'age_2', 'ssi']);
    expect(warn(r, 'duplicate-name').message).toContain('column 3 is called "age_2"');
    expect(num(r, 'age_2')).toEqual([35, 50]);
  },
  'blank-name.csv': async () => {
    const r = await load('blank-name.csv');
    expect(r.columns[2].name).toBe('column_3');
    expect(r.columns[2].sourceName).toBe('');
    expect(warn(r, 'blank-name').terms).toEqual(['column_3']);
  },
  'bom-utf8.csv': async () => {
    const r = await load('bom-utf8.csv');
    expect(r.columns[0].name).toBe('age');
    expect(num(r, 'age')).toEqual([34, 51]);
  },
  'utf16le-bom.csv': async () => {
    const r = await load('utf16le-bom.csv');
    expect(r.format).toMatchObject({ encoding: 'utf-16le', delimiter: '\t' });
    expect(cat(r, 'ward')).toEqual(['Nord', 'Süd']);
  },
  'mixed-line-endings.csv': async () => {
    const r = await load('mixed-line-endings.csv');
    expect(num(r, 'age')).toEqual([34, 51, 47, 29]);
    expect(Array.from(r.sourceRows)).toEqual([2, 3, 4, 5]);
    warn(r, 'mixed-line-endings');
  },
  'quoted-newlines.csv': async () => {
    const r = await load('quoted-newlines.csv');
    expect(cat(r, 'comment')[0]).toBe('wound "red", swollen\nsecond line');
    expect(cat(r, 'ssi')).toEqual(['yes', 'no', 'no']);
    // A quoted line break stays inside its spreadsheet row: the next record is row 3, not 4.
    expect(Array.from(r.sourceRows)).toEqual([2, 3, 4]);
  },
  'unclosed-quote.csv': async () => {
    const r = await load('unclosed-quote.csv');
    expect(warn(r, 'unclosed-quote').message).toContain('row 3, column "comment"');
  },
  'stray-quote.csv': async () => {
    const r = await load('stray-quote.csv');
    expect(warn(r, 'stray-quote').message).toContain('row 2, column "comment"');
    expect(cat(r, 'comment')[0]).toBe('quotedtail');
  },
  'windows-1252.csv': async () => {
    const r = await load('windows-1252.csv');
    expect(r.format.encoding).toBe('windows-1252');
    expect(warn(r, 'encoding-fallback').message).toContain('byte 17');
    expect(cat(r, 'ward')).toEqual(['Café', 'Nord', 'Café']);
    const forced = await load('windows-1252.csv', { encoding: 'utf-8' });
    expect(cat(forced, 'ward')[0]).toBe('Caf\ufffd');
  },
  'one-class-outcome.csv': async () => {
    const r = await load('one-class-outcome.csv');
    expect(warn(r, 'constant').terms).toEqual(['ssi']);
    const p = proposeOutcomeEvent(getColumn(r.dataset, 'ssi'));
    expect(p.status).toBe('unsuitable');
    expect(p.reason).toContain('"yes"');
  },
  'all-missing-column.csv': async () => {
    const r = await load('all-missing-column.csv');
    expect(info(r, 'bmi')).toMatchObject({ type: 'empty', modelling: false });
    expect(warn(r, 'all-missing').terms).toEqual(['bmi']);
  },
  'constant-column.csv': async () => {
    const r = await load('constant-column.csv');
    expect(info(r, 'site').reason).toContain('a single value, "ward A"');
    expect(warn(r, 'constant').terms).toEqual(['site']);
  },
  'huge-cell.csv': async () => {
    const r = await load('huge-cell.csv');
    expect(warn(r, 'huge-cell').message).toContain('row 2 holds 100,000 characters');
    expect(cat(r, 'note')[0]).toHaveLength(100_000);
    expect(info(r, 'note').reason.length).toBeLessThan(200);
  },
  'html-header.csv': async () => {
    const r = await load('html-header.csv');
    expect(r.columns[1].name).toBe('<script>alert("x")</script>');
    expect(r.warnings.filter((w) => w.code === 'markup-name')).toHaveLength(2);
  },
  'semicolon-decimal-comma.csv': async () => {
    const r = await load('semicolon-decimal-comma.csv');
    expect(r.format).toMatchObject({ delimiter: ';', decimal: ',' });
    // Reference: pandas 1.5.3 read_csv(sep=';', decimal=',', thousands='.'), tests/fixtures/io/csv-reference.json.
    const ref = JSON.parse(
      readFileSync(new URL('../fixtures/io/csv-reference.json', import.meta.url), 'utf8'),
    ).pandasDecimalComma;
    expect(num(r, 'bmi')).toEqual(ref.bmi);
    expect(num(r, 'crp')).toEqual(ref.crp);
    expect(warn(r, 'thousands-separator').message).toContain('row 4 ("1.250,5")');
  },
  'thousands-separators.csv': async () => {
    const r = await load('thousands-separators.csv');
    expect(num(r, 'cost')).toEqual([1234.5, 12000, 987.25]);
    expect(warn(r, 'thousands-separator').message).toContain('rows 2 ("1,234.50"), 3 ("12,000")');
  },
  'units-in-cells.csv': async () => {
    const r = await load('units-in-cells.csv');
    expect(info(r, 'dose').type).not.toBe('numeric');
    expect(warn(r, 'units-in-cells').suggestion).toContain('strip units');
    expect(cat(r, 'dose')[0]).toBe('5 mg');
    const stripped = await load('units-in-cells.csv', { stripUnits: ['dose'] });
    expect(info(stripped, 'dose').type).toBe('numeric');
    expect(num(stripped, 'dose')).toEqual([5, 10, 15, 20, 25, 30]);
    expect(warn(stripped, 'units-stripped').message).toContain('mg (6)');
  },
  'mixed-units.csv': async () => {
    const r = await load('mixed-units.csv', { stripUnits: ['dose'] });
    expect(num(r, 'dose')).toEqual([500, 1, 250, 2]);
    expect(warn(r, 'mixed-units').message).toContain('mg, g');
  },
  'text-in-numeric.csv': async () => {
    const r = await load('text-in-numeric.csv');
    expect(info(r, 'age').type).toBe('numeric');
    expect(info(r, 'age').reason).toBe(
      '92% of present cells are numbers; 3 cells are text: rows 14, 32, 37 (read as missing)',
    );
    expect(warn(r, 'text-in-numeric').message).toContain('14 ("unknown"), 32 ("see notes"), 37 ("4o")');
    expect(num(r, 'age')[12]).toBeNaN();
    const asText = await load('text-in-numeric.csv', { columnTypes: { age: 'categorical' } });
    expect(info(asText, 'age')).toMatchObject({ type: 'categorical', inferredType: 'numeric' });
    expect(cat(asText, 'age')[12]).toBe('unknown');
    expect(cat(asText, 'age')[0]).toBe('30');
  },
  'many-rows-mostly-numeric.csv': async () => {
    const r = await load('many-rows-mostly-numeric.csv');
    expect(info(r, 'crp').reason).toBe(
      '99% of present cells are numbers; 3 cells are text: rows 14, 88, 301 (read as missing)',
    );
    expect(info(r, 'id').type).toBe('identifier');
  },
  'missing-tokens.csv': async () => {
    const r = await load('missing-tokens.csv');
    expect(num(r, 'age').map((v) => (Number.isNaN(v) ? null : v))).toEqual([
      34,
      null,
      null,
      null,
      null,
      null,
      null,
      null,
      null,
      null,
      47,
    ]);
    expect(info(r, 'age').profile.missingTokens).toEqual({
      NA: 2,
      'N/A': 1,
      '.': 1,
      '-': 1,
      '?': 1,
      '#N/A': 1,
      '#DIV/0!': 1,
    });
    expect(warn(r, 'spreadsheet-errors').message).toContain('rows 8 ("#N/A"), 9 ("#DIV/0!")');
    const custom = await load('missing-tokens.csv', { missingTokens: ['', 'NA'], columnTypes: { age: 'categorical' } });
    expect(cat(custom, 'age').filter((v) => v === null)).toHaveLength(3);
  },
  'blank-rows.csv': async () => {
    const r = await load('blank-rows.csv');
    expect(warn(r, 'blank-rows').message).toContain('rows 3, 5');
    expect(r.format.headerRow).toBe(1);
    expect(Array.from(r.sourceRows)).toEqual([2, 4, 6]);
  },
  'tab-separated.tsv': async () => {
    const r = await load('tab-separated.tsv');
    expect(r.format.delimiter).toBe('\t');
    expect(num(r, 'age')).toEqual([34, 51, 47]);
  },
  'pasted-from-spreadsheet.txt': async () => {
    const r = await importText(new TextDecoder().decode(read('pasted-from-spreadsheet.txt')));
    expect(r.columns.map((c) => c.name)).toEqual(['Patient', 'Age (years)', 'Infected']);
    expect(proposeOutcomeEvent(getColumn(r.dataset, 'Infected'))).toMatchObject({
      status: 'proposed',
      event: 'infected',
      nonEvent: 'not infected',
    });
  },
  'leading-zeros.csv': async () => {
    const r = await load('leading-zeros.csv');
    expect(info(r, 'postcode')).toMatchObject({ type: 'identifier', modelling: false });
    expect(cat(r, 'postcode')).toEqual(['01234', '00501', '02139']);
  },
  'case-variants.csv': async () => {
    const r = await load('case-variants.csv');
    expect(warn(r, 'case-variants').message).toMatch(/"male" and "Male"|"Male" and "male"/);
    expect(new Set(cat(r, 'sex'))).toEqual(new Set(['Male', 'male', 'Female']));
  },
  'dates-day-first.csv': async () => {
    const r = await load('dates-day-first.csv');
    expect(info(r, 'admitted').type).toBe('date');
    expect(info(r, 'admitted').note).toContain('days since 1970-01-01');
    expect(num(r, 'admitted')).toEqual(
      [Date.UTC(2021, 11, 25), Date.UTC(2022, 0, 3), Date.UTC(2022, 1, 14)].map((t) => t / 86_400_000),
    );
    expect(codes(r)).not.toContain('ambiguous-date-order');
  },
  'dates-ambiguous.csv': async () => {
    const r = await load('dates-ambiguous.csv');
    expect(warn(r, 'ambiguous-date-order').message).toContain('day/month/year');
    expect(num(r, 'admitted')[0]).toBe(Date.UTC(2021, 3, 3) / 86_400_000);
    const us = await load('dates-ambiguous.csv', { dateOrder: 'mdy' });
    expect(num(us, 'admitted')[0]).toBe(Date.UTC(2021, 2, 4) / 86_400_000);
    expect(codes(us)).not.toContain('ambiguous-date-order');
  },
  'no-header.csv': async () => {
    const r = await load('no-header.csv');
    expect(r.format).toMatchObject({ header: false, headerRow: 0 });
    expect(r.columns.map((c) => c.name)).toEqual(['column_1', 'column_2', 'column_3']);
    expect(Array.from(r.sourceRows)).toEqual([1, 2, 3]);
    expect(codes(r)).not.toContain('blank-name');
  },
  'trailing-delimiter.csv': async () => {
    const r = await load('trailing-delimiter.csv');
    expect(info(r, 'column_4').type).toBe('empty');
    warn(r, 'blank-name');
  },
  'single-column.csv': async () => {
    const r = await load('single-column.csv');
    expect(num(r, 'age')).toEqual([34, 51, 47]);
    warn(r, 'single-column');
  },
  'ambiguous-outcome.csv': async () => {
    const r = await load('ambiguous-outcome.csv');
    expect(proposeOutcomeEvent(getColumn(r.dataset, 'result'))).toMatchObject({
      status: 'needsChoice',
      levels: ['A', 'B'],
    });
  },
  'spaces-around.csv': async () => {
    const r = await load('spaces-around.csv');
    expect(r.columns.map((c) => c.name)).toEqual(['id', 'age', 'ssi']);
    expect(num(r, 'age')).toEqual([34, 51]);
    expect(warn(r, 'spaces-trimmed').message).toContain('row 2, column "age"');
    expect(r.warnings.filter((w) => w.code === 'name-cleaned')).toHaveLength(2);
  },
  'binary-garbage.csv': async () => {
    expect((await fatal('binary-garbage.csv', 'not-text')).suggestion).toContain('.xlsx');
  },
  'error-cells-formulas.xlsx': async () => {
    const r = await load('error-cells-formulas.xlsx');
    expect(warn(r, 'spreadsheet-errors').message).toContain('rows 2 ("#DIV/0!"), 4 ("#N/A")');
    expect(warn(r, 'formulas').message).toContain('3 cells hold formulas');
    expect(num(r, 'ratio').map((v) => (Number.isNaN(v) ? null : v))).toEqual([null, 5.1, null, 2.9]);
    expect(info(r, 'admitted').type).toBe('date');
    expect(num(r, 'admitted')[0]).toBe(Date.UTC(2021, 2, 4) / 86_400_000);
    expect(cat(r, 'ssi')).toEqual(['yes', 'no', 'no', 'TRUE']);
  },
  'deflated-shared-strings.xlsx': async () => {
    // Written like spreadsheet programs do: deflated parts and a shared-strings table.
    const r = await load('deflated-shared-strings.xlsx');
    expect(r.format.sheet).toBe('Audit 2021');
    expect(r.dataset.nRows).toBe(44);
    expect(warn(r, 'spreadsheet-errors').message).toContain('rows 2 ("#DIV/0!"), 4 ("#N/A")');
    expect(cat(r, 'ssi').slice(0, 5)).toEqual(['yes', 'no', 'no', 'TRUE', 'yes']);
    expect(info(r, 'ratio').type).toBe('numeric');
  },
  'formula-no-value.xlsx': async () => {
    const r = await load('formula-no-value.xlsx');
    expect(warn(r, 'formula-no-value').message).toContain('(B2)');
    expect(num(r, 'bmi')[0]).toBeNaN();
  },
  'multi-sheet.xlsx': async () => {
    const first = await load('multi-sheet.xlsx');
    expect(first.format).toMatchObject({ sheet: 'Notes', sheets: ['Notes', 'Cases & controls'] });
    warn(first, 'several-sheets');
    const byName = await load('multi-sheet.xlsx', { sheet: 'Cases & controls' });
    expect(num(byName, 'age')).toEqual([34, 51, 47]);
    const byIndex = await load('multi-sheet.xlsx', { sheet: 1 });
    expect(byIndex.dataset).toEqual(byName.dataset);
    const e = await fatal('multi-sheet.xlsx', 'unknown-sheet', { sheet: 'Data' });
    expect(e.message).toContain('Sheets are: "Notes", "Cases & controls"');
  },
  'empty.xlsx': async () => {
    expect((await fatal('empty.xlsx', 'empty-file')).message).toContain('0 bytes');
  },
  'not-a-spreadsheet.xlsx': async () => {
    const e = await fatal('not-a-spreadsheet.xlsx', 'not-xlsx');
    expect(e.message).toContain('plain text starting "id,age,ssi');
    expect(e.suggestion).toContain('.csv');
  },
  'old-format.xlsx': async () => {
    expect((await fatal('old-format.xlsx', 'xls-not-supported')).suggestion).toContain('.xlsx');
  },
  'old-format.xls': async () => {
    await fatal('old-format.xls', 'xls-not-supported');
  },
  'sep-line.csv': async () => {
    const r = await load('sep-line.csv');
    expect(r.format).toMatchObject({ delimiter: ';', decimal: ',', headerRow: 1 });
    expect(r.columns.map((c) => c.name)).toEqual(['id', 'bmi', 'ssi']);
    expect(num(r, 'bmi')).toEqual([24.5, 31.2, 27]);
    warn(r, 'separator-line');
  },
  'truncated.xlsx': async () => {
    await fatal('truncated.xlsx', 'bad-zip');
  },
  'zip-not-workbook.xlsx': async () => {
    expect((await fatal('zip-not-workbook.xlsx', 'not-xlsx')).message).toContain('no xl/workbook.xml');
  },
  'workbook-named-csv.csv': async () => {
    const r = await load('workbook-named-csv.csv');
    expect(r.format.kind).toBe('xlsx');
    expect(r.warnings[0].code).toBe('workbook-content');
  },
};

describe('bad input fixtures', () => {
  it('has at least 30 fixtures and a test for each file the fixture script writes', () => {
    const files = readdirSync(DIR)
      .filter((f) => !f.endsWith('.ts'))
      .sort();
    expect(files.length).toBeGreaterThanOrEqual(30);
    expect(files).toEqual(Object.keys(cases).sort());
  });
  for (const [name, run] of Object.entries(cases)) it(`handles ${name}`, run);
});
