import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { CELL_MISSING, CELL_NUMBER, CELL_TEXT, CellReader } from '../../src/io/cellReader';
import {
  DEFAULT_MISSING_TOKENS,
  numberFlags,
  parseNumberText,
  parseSpanNumber,
  splitUnit,
} from '../../src/io/cellText';

describe('parseNumberText', () => {
  it('reads plain decimals with a point and rejects what Number() would wrongly accept', () => {
    expect(parseNumberText('1.5', false)).toBe(1.5);
    expect(parseNumberText('-2e3', false)).toBe(-2000);
    expect(parseNumberText('+.5', false)).toBe(0.5);
    for (const s of ['0x10', 'Infinity', '1_000', '12 mg', '1.2.3', '--1', '', ' ', 'e5', '1,5']) {
      expect(parseNumberText(s, false), s).toBeNaN();
    }
  });

  it('reads decimal commas and thousands groups, and flags the thousands separator', () => {
    expect(parseNumberText('1,5', true)).toBe(1.5);
    expect(numberFlags.thousands).toBe(false);
    expect(parseNumberText('1.234,5', true)).toBe(1234.5);
    expect(numberFlags.thousands).toBe(true);
    expect(parseNumberText('1 234,5', true)).toBe(1234.5);
    expect(parseNumberText('1\u00a0234', true)).toBe(1234);
    expect(parseNumberText('1,234.5', false)).toBe(1234.5);
    expect(numberFlags.thousands).toBe(true);
    // Not a valid grouping: stays text rather than being guessed.
    expect(parseNumberText('12,34.5', false)).toBeNaN();
    expect(parseNumberText('1.5', true)).toBeNaN();
  });
});

describe('splitUnit', () => {
  it('splits a number and its unit, with prefix currency and percent', () => {
    expect(splitUnit('12 mg', false)).toEqual({ value: 12, unit: 'mg' });
    expect(splitUnit('37.5°C', false)).toEqual({ value: 37.5, unit: '°C' });
    expect(splitUnit('45%', false)).toEqual({ value: 45, unit: '%' });
    expect(splitUnit('$12', false)).toEqual({ value: 12, unit: '$' });
    expect(splitUnit('2,5 mmol/l', true)).toEqual({ value: 2.5, unit: 'mmol/l' });
    expect(splitUnit('12', false)).toBeNull();
    expect(splitUnit('ward 12', false)).toBeNull();
    expect(splitUnit('03/04/2021', false)).toBeNull();
  });
});

describe('CellReader', () => {
  it('recognises every default missing token case-insensitively, and spreadsheet errors as errors', () => {
    const r = new CellReader(false, DEFAULT_MISSING_TOKENS);
    for (const t of [
      '',
      '  ',
      'NA',
      'na',
      'N/A',
      'n/a',
      '.',
      '-',
      '?',
      '#N/A',
      '#DIV/0!',
      '#VALUE!',
      '#REF!',
      '#NAME?',
      '#NUM!',
      '#NULL!',
    ]) {
      expect(r.read(t), JSON.stringify(t)).toBe(CELL_MISSING);
    }
    r.read('#REF!');
    expect(r.isError).toBe(true);
    r.read('NA');
    expect(r.isError).toBe(false);
    expect(r.read('NaN')).toBe(CELL_TEXT);
    expect(r.read(' 7 ')).toBe(CELL_NUMBER);
    expect(r.trimmed).toBe(true);
    expect(r.value).toBe(7);
  });

  it('treats a numeric missing code such as -99 as missing only when the user lists it', () => {
    expect(new CellReader(false, DEFAULT_MISSING_TOKENS).read('-99')).toBe(CELL_NUMBER);
    expect(new CellReader(false, ['', '-99']).read('-99.0')).toBe(CELL_MISSING);
  });
});

describe('parseSpanNumber', () => {
  const span = (s: string, dec = 46) => parseSpanNumber(`|${s}|`, 1, s.length + 1, dec);

  it('property: equals Number() bit for bit whenever it answers, and answers for short decimals', () => {
    fc.assert(
      fc.property(fc.double({ noNaN: true, noDefaultInfinity: true }), fc.integer({ min: 0, max: 8 }), (x, digits) => {
        for (const s of [String(x), x.toFixed(digits), x.toExponential(digits)]) {
          const v = span(s);
          if (!Number.isNaN(v)) expect(Object.is(v, Number(s)), s).toBe(true);
        }
        const short = (Math.round(x) % 1e6).toFixed(digits);
        expect(Object.is(span(short), Number(short)), short).toBe(true);
      }),
      { numRuns: 2000 },
    );
  });

  it('reads a decimal comma when told, and declines anything that is not a plain decimal', () => {
    expect(span('12,75', 44)).toBe(12.75);
    for (const s of ['', '-', '.', '1e', '1,5', '1.2.3', '12 mg', '0x10', '1e400', '1'.repeat(30)])
      expect(span(s), s).toBeNaN();
  });
});
