import { citlFit } from './calibrationFit';
import { observedExpectedRatio } from './poisson';
import type { MonitoringPeriod, MonitoringPeriodRow } from './types';

const DAY_MS = 86_400_000;

/** YYYY-MM-DD of an epoch day (UTC), as src/io/dates.ts formatEpochDay. */
export function dayLabel(day: number): string {
  return new Date(Math.round(day * DAY_MS)).toISOString().slice(0, 10);
}

/** The calendar period holding epoch day `day`: label, first day, first day of the next period. */
export function periodOf(day: number, period: MonitoringPeriod): { label: string; start: number; end: number } {
  const d = new Date(Math.floor(day) * DAY_MS);
  const y = d.getUTCFullYear();
  const m = d.getUTCMonth();
  const first = period === 'month' ? m : m - (m % 3);
  const months = period === 'month' ? 1 : 3;
  const start = Date.UTC(y, first, 1) / DAY_MS;
  const end = Date.UTC(y, first + months, 1) / DAY_MS;
  const label = period === 'month' ? `${y}-${String(m + 1).padStart(2, '0')}` : `${y} Q${first / 3 + 1}`;
  return { label, start, end };
}

/** Ranges [from, to) of cases (sorted by date) falling in each calendar period, oldest first. */
export function periodRanges(
  date: Float64Array,
  period: MonitoringPeriod,
): { label: string; start: number; end: number; from: number; to: number }[] {
  const out: { label: string; start: number; end: number; from: number; to: number }[] = [];
  const n = date.length;
  let i = 0;
  while (i < n) {
    const p = periodOf(date[i], period);
    let j = i;
    while (j < n && date[j] < p.end) j++;
    out.push({ ...p, from: i, to: j });
    i = j;
  }
  return out;
}

/** O, E, O/E (Garwood) and calibration-in-the-large per calendar period (Newton started at `start`). */
export function periodTable(
  y: Float64Array,
  eta: Float64Array,
  risk: Float64Array,
  date: Float64Array,
  period: MonitoringPeriod,
  level: number,
  start = 0,
  expNeg?: Float64Array,
): MonitoringPeriodRow[] {
  return periodRanges(date, period).map((r) => {
    let o = 0,
      e = 0;
    for (let i = r.from; i < r.to; i++) {
      o += y[i];
      e += risk[i];
    }
    return {
      label: r.label,
      start: r.start,
      end: r.end,
      n: r.to - r.from,
      observed: o,
      expected: e,
      oe: observedExpectedRatio(o, e, level),
      oMinusE: o - e,
      citl: citlFit(y, eta, level, r.from, r.to, start, expNeg),
    };
  });
}
