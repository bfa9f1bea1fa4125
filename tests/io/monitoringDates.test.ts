import { describe, expect, it } from 'vitest';
import { importText, monitoringDates } from '../../src/io';

const day = (y: number, m: number, d: number) => Date.UTC(y, m - 1, d) / 86_400_000;

describe('monitoringDates', () => {
  it('uses a column the importer typed as dates as it is', async () => {
    const r = await importText('when,y\n2025-03-01,1\n2025-03-02,0\n2025-03-04,1\n');
    const d = monitoringDates(r.dataset, r.columns, 'when');
    expect(d.how).toBe('date-column');
    expect([...d.days]).toEqual([day(2025, 3, 1), day(2025, 3, 2), day(2025, 3, 4)]);
  });

  it('reads plain numbers as spreadsheet serial dates (1900 system: 45717 = 2025-03-01; common practice)', async () => {
    const r = await importText('when,y\n45717,1\n45718,0\n');
    const d = monitoringDates(r.dataset, r.columns, 'when');
    expect(d.how).toBe('spreadsheet-serial');
    expect([...d.days]).toEqual([day(2025, 3, 1), day(2025, 3, 2)]);
  });

  it('parses date text, settling day/month order from the cells, and counts cells that are not dates', () => {
    const dataset = {
      nRows: 4,
      columns: [
        {
          kind: 'categorical' as const,
          name: 'when',
          levels: ['25/03/2025', '01/04/2025', 'soon'],
          codes: Int32Array.from([0, 1, 2, -1]),
        },
      ],
    };
    const d = monitoringDates(dataset, null, 'when');
    expect(d.how).toBe('date-text');
    expect(d.days[0]).toBe(day(2025, 3, 25));
    expect(d.days[1]).toBe(day(2025, 4, 1));
    expect(Number.isNaN(d.days[2]) && Number.isNaN(d.days[3])).toBe(true);
    expect(d.unreadable).toBe(1);
  });

  it('rejects a numeric column that cannot hold dates, naming it', async () => {
    const rows = Array.from({ length: 40 }, (_, i) => `${i - 3}.5,${i % 2}`).join('\n');
    const r = await importText(`score,y\n${rows}\n`);
    expect(() => monitoringDates(r.dataset, r.columns, 'score')).toThrow(/"score" holds the number -3.5/);
  });
});
