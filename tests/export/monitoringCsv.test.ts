import Papa from 'papaparse';
import { describe, expect, it } from 'vitest';
import { monitoringSignalsCsv, monitoringUnitsCsv } from '../../src/io/export/monitoringCsv';
import { monitoringRecord, UNIT_NAMES } from '../report/monitoringRecord';

// papaparse 5 (Papa.parse) is the independent CSV reader, as in the predictions-CSV tests.
const parse = (text: string) => Papa.parse<string[]>(text.trim(), { skipEmptyLines: true }).data;

describe('the monitoring CSVs', () => {
  const { record } = monitoringRecord();

  it('writes one line per unit with O, E, O/E, its interval and the funnel limits, as the record holds them', () => {
    const rows = parse(monitoringUnitsCsv(record)!);
    expect(rows[0].slice(0, 8)).toEqual([
      'unit',
      'cases',
      'observed',
      'expected',
      'O/E',
      'O/E lower 95%',
      'O/E upper 95%',
      'O - E',
    ]);
    expect(rows[0]).toContain('limit upper 99.8%');
    expect(rows).toHaveLength(1 + record.funnel!.units.length);
    for (const u of record.funnel!.units) {
      const line = rows.find((r) => r[0] === u.unit || r[0] === `'${u.unit}`)!;
      expect(Number(line[1])).toBe(u.n);
      expect(Number(line[2])).toBe(u.observed);
      expect(Number(line[3])).toBe(u.expected);
      expect(Number(line[4])).toBe(u.oe.estimate);
      expect(Number(line[8])).toBe(u.limits.inner.lower);
      expect(Number(line[11])).toBe(u.limits.outer.upper);
      expect(line[12]).toBe(u.flag);
    }
    const total = record.funnel!.units.reduce((s, u) => s + u.n, 0);
    expect(total).toBe(record.nUsed);
  });

  it('neutralises a unit name that a spreadsheet would run as a formula (OWASP CSV injection)', () => {
    const text = monitoringUnitsCsv(record)!;
    const names = parse(text)
      .slice(1)
      .map((r) => r[0]);
    expect(names).toContain(`'${UNIT_NAMES[2]}`);
    expect(names).not.toContain(UNIT_NAMES[2]);
    expect(names).toContain('Ward 1');
  });

  it('has no unit table without a unit column', () => {
    expect(monitoringUnitsCsv(monitoringRecord({ unitColumn: null }).record)).toBeNull();
  });

  it('lists every signal of both charts in case order, with date, unit and spreadsheet row, then each unit’s', () => {
    const rows = parse(monitoringSignalsCsv(record));
    expect(rows[0]).toEqual([
      'chart',
      'run on',
      'odds ratio',
      'limit h',
      'case',
      'date',
      'unit',
      'spreadsheet row',
      'chart value',
    ]);
    const all = [...record.cusum.deteriorate.signals, ...record.cusum.improve.signals];
    const own = [record.cusum.deteriorate, record.cusum.improve].flatMap((c) =>
      (c.byUnit ?? []).flatMap((u) => u.signals.map((s) => ({ unit: u.unit, s }))),
    );
    expect(rows).toHaveLength(1 + all.length + own.length);
    const overall = rows.slice(1, 1 + all.length);
    expect(overall.every((r) => r[1] === 'all cases')).toBe(true);
    const cases = overall.map((r) => Number(r[4]));
    expect(cases).toEqual([...cases].sort((a, b) => a - b));
    for (const s of all) {
      const line = overall.find((r) => Number(r[4]) === s.case)!;
      expect(line[5]).toBe(s.dateLabel);
      expect(Number(line[7])).toBe(s.row);
    }
    const unitLines = rows.slice(1 + all.length);
    for (const { unit, s } of own)
      expect(unitLines.some((r) => r[1].replace(/^'/, '') === unit && Number(r[7]) === s.row)).toBe(true);
  });
});
