import Papa from 'papaparse';
import { describe, expect, it } from 'vitest';
import { FulcraError, type Dataset } from '../../src/engine/core/data';
import { fit } from '../../src/engine/fitting/fit';
import { predict } from '../../src/engine/fitting/predict';
import { neutraliseCell, predictionsCsv, predictionsCsvChunks, quoteField } from '../../src/io/export/predictionsCsv';

describe('neutraliseCell (OWASP CSV-injection rule: quote-prefix formula starters, keep plain numbers)', () => {
  it('prefixes cells starting with = + - @ tab or carriage return', () => {
    for (const s of ['=SUM(A1:A9)', '+cmd|calc', '-2+3', '@SUM(1)', '\tx', '\rx', '-', '+41 20 123 4567', '=1']) {
      expect(neutraliseCell(s)).toBe(`'${s}`);
    }
  });

  it('leaves plain numbers (negative, signed, exponent) and ordinary text unchanged', () => {
    for (const s of ['-1.5', '+2', '-3e-4', '-.5', '-10.', 'ward A', 'x=1', '1-2', ''])
      expect(neutraliseCell(s)).toBe(s);
  });

  it('follows the decimal mark: "-1,5" is a number only with a decimal comma', () => {
    expect(neutraliseCell('-1,5', ',')).toBe('-1,5');
    expect(neutraliseCell('-1,5', '.')).toBe("'-1,5");
    expect(neutraliseCell('-1.5', ',')).toBe("'-1.5");
  });
});

describe('quoteField (RFC 4180)', () => {
  it('quotes fields holding the delimiter, quotes or line breaks and doubles inner quotes', () => {
    expect(quoteField('a,b', ',')).toBe('"a,b"');
    expect(quoteField('say "hi"', ',')).toBe('"say ""hi"""');
    expect(quoteField('two\nlines', ',')).toBe('"two\nlines"');
    expect(quoteField('cr\rhere', ';')).toBe('"cr\rhere"');
    expect(quoteField('a,b', ';')).toBe('a,b');
    expect(quoteField('a;b', ';')).toBe('"a;b"');
  });
});

const data: Dataset = {
  nRows: 8,
  columns: [
    { kind: 'numeric', name: 'ssi', values: Float64Array.of(0, 1, 0, 1, 0, 0, 0, 1) },
    { kind: 'numeric', name: 'duration', values: Float64Array.of(-1.5, 95, 60, 180, NaN, 45, 150, 75) },
    {
      kind: 'categorical',
      name: 'note',
      levels: ['=HYPERLINK("http://x")', 'ward, "B"', 'two\nlines', '-3', '@risk'],
      codes: Int32Array.of(0, 1, 2, 3, 4, -1, 1, 0),
    },
  ],
};

describe('predictionsCsv', () => {
  const r = fit(data, { outcome: 'ssi', terms: [{ type: 'main', column: 'duration' }] });
  const pred = predict(r, data);

  it('is tested on a fit with intervals (no separation) and one unscored row', () => {
    expect(r.covariance).not.toBeNull();
    expect(Array.from(pred.rowsUsed)).toEqual([0, 1, 2, 3, 5, 6, 7]);
    expect(pred.lower.every(Number.isFinite)).toBe(true);
  });

  it('writes the original columns plus risk, its interval and the flag; reading it back gives the same cells', () => {
    const csv = predictionsCsv(data, pred, { threshold: 0.5 });
    expect(csv.endsWith('\r\n')).toBe(true);
    const parsed = Papa.parse<string[]>(csv, { skipEmptyLines: true }).data;
    expect(parsed[0]).toEqual([
      'ssi',
      'duration',
      'note',
      'predicted risk',
      'risk lower 95% CI',
      'risk upper 95% CI',
      'flagged at risk >= 0.5',
    ]);
    expect(parsed).toHaveLength(1 + data.nRows);
    const notes = [
      '\'=HYPERLINK("http://x")',
      'ward, "B"',
      'two\nlines',
      '-3',
      "'@risk",
      '',
      'ward, "B"',
      '\'=HYPERLINK("http://x")',
    ];
    parsed.slice(1).forEach((row, r0) => {
      expect(row[2]).toBe(notes[r0]);
      expect(row[1]).toBe(
        Number.isNaN((data.columns[1] as { values: Float64Array }).values[r0])
          ? ''
          : String((data.columns[1] as { values: Float64Array }).values[r0]),
      );
      const i = Array.from(pred.rowsUsed).indexOf(r0);
      if (i < 0) {
        expect(row.slice(3)).toEqual(['', '', '', '']);
      } else {
        const back = (cell: string) => (cell === '' ? NaN : Number(cell));
        expect(back(row[3])).toBe(pred.risk[i]);
        expect(back(row[4])).toBe(pred.lower[i]);
        expect(back(row[5])).toBe(pred.upper[i]);
        expect(row[6]).toBe(pred.risk[i] >= 0.5 ? '1' : '0');
      }
    });
    expect(parsed[1][1]).toBe('-1.5');
  });

  it('writes decimal commas with a semicolon delimiter, and refuses a comma delimiter with decimal commas', () => {
    const csv = predictionsCsv(data, pred, { decimal: ',', newline: '\n' });
    const lines = csv.split('\n');
    expect(lines[0]).toBe('ssi;duration;note;predicted risk;risk lower 95% CI;risk upper 95% CI');
    expect(lines[1].startsWith('0;-1,5;')).toBe(true);
    expect(lines[1]).toContain(String(pred.risk[0]).replace('.', ','));
    expect(() => predictionsCsv(data, pred, { decimal: ',', delimiter: ',' })).toThrow(FulcraError);
  });

  it('gives the same text in chunks (header first), and checks its arguments before the first chunk', () => {
    const chunks = [...predictionsCsvChunks(data, pred, { threshold: 0.3 }, 3)];
    expect(chunks).toHaveLength(1 + 3);
    expect(chunks.join('')).toBe(predictionsCsv(data, pred, { threshold: 0.3 }));
    expect(() => predictionsCsvChunks(data, pred, { threshold: 2 })).toThrow(/between 0 and 1/);
  });

  it('renames its own columns when the data already has a "predicted risk" column', () => {
    const d2: Dataset = {
      ...data,
      columns: [...data.columns, { kind: 'numeric', name: 'predicted risk', values: new Float64Array(8) }],
    };
    const header = predictionsCsv(d2, pred).split('\r\n')[0];
    expect(header).toContain('predicted risk,predicted risk (Fulcra)');
  });

  it('neutralises a column name that starts a formula', () => {
    const d3: Dataset = { nRows: data.nRows, columns: [{ ...data.columns[1], name: '=cmd|"/C calc"!A0' }] };
    const header = predictionsCsv(d3, { risk: new Float64Array(0), rowsUsed: new Int32Array(0) }).split('\r\n')[0];
    expect(header).toBe('"\'=cmd|""/C calc""!A0",predicted risk');
  });
});
