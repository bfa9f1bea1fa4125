import { describe, expect, it } from 'vitest';
import { dateOrderEvidence, formatEpochDay, parseDateText } from '../../src/io/dates';

const day = (y: number, m: number, d: number) => Date.UTC(y, m - 1, d) / 86_400_000;

describe('parseDateText', () => {
  it('reads ISO, numeric (by order) and named-month dates as epoch days (checked against Date.UTC)', () => {
    expect(parseDateText('2021-03-04', 'dmy')).toBe(day(2021, 3, 4));
    expect(parseDateText('2021/03/04', 'mdy')).toBe(day(2021, 3, 4));
    expect(parseDateText('04/03/2021', 'dmy')).toBe(day(2021, 3, 4));
    expect(parseDateText('04/03/2021', 'mdy')).toBe(day(2021, 4, 3));
    expect(parseDateText('04.03.21', 'dmy')).toBe(day(2021, 3, 4));
    expect(parseDateText('4 Mar 2021', 'mdy')).toBe(day(2021, 3, 4));
    expect(parseDateText('04-Mar-1999', 'dmy')).toBe(day(1999, 3, 4));
    expect(parseDateText('1969-12-31', 'dmy')).toBe(-1);
  });

  it('keeps the time of day as a fraction', () => {
    expect(parseDateText('2021-03-04 18:00', 'dmy')).toBe(day(2021, 3, 4) + 0.75);
  });

  it('rejects impossible dates and non-dates', () => {
    for (const s of ['2021-02-30', '31/04/2021', '13/13/2021', 'yesterday', '2021', '12', '2021-03-04x']) {
      expect(parseDateText(s, 'dmy'), s).toBeNaN();
    }
    expect(parseDateText('2020-02-29', 'dmy')).toBe(day(2020, 2, 29));
  });

  it('settles the order only when a part is above 12', () => {
    expect(dateOrderEvidence('25/12/2021')).toBe('dmy');
    expect(dateOrderEvidence('12/25/2021')).toBe('mdy');
    expect(dateOrderEvidence('03/04/2021')).toBeNull();
    expect(formatEpochDay(day(2021, 3, 4))).toBe('2021-03-04');
  });
});
