import { FulcraError, getColumn, type Dataset } from '../engine/core';
import { dateOrderEvidence, parseDateText } from './dates';
import type { ColumnInfo, DateOrder } from './types';
import { serialDate } from './xlsxSheet';

const DAY_MS = 86_400_000;
/** Spreadsheet serial day numbers of 1900-01-01 … 9999-12-31 (1900 date system). */
const SERIAL_MAX = 2_958_465;
const SERIAL = /^\d+(\.\d+)?$/;

/** The dates of a monitoring file as epoch days, and how they were read. */
export interface MonitoringDates {
  /** Days since 1970-01-01 UTC per data row; NaN where the cell is empty or not a date. */
  days: Float64Array;
  how: 'date-column' | 'spreadsheet-serial' | 'date-text';
  /** Non-empty cells that are not dates. */
  unreadable: number;
}

/**
 * Reads column `name` of a monitoring file as dates for the engine (epoch days), consistently with the importer
 * (src/io/dates.ts): a column the importer typed as dates is used as it is; another numeric column is read as
 * spreadsheet serial day numbers (1900 date system, as src/io/xlsxSheet.ts) and must hold whole or fractional
 * numbers from 1 to 2 958 465; a text column is parsed cell by cell with parseDateText (YYYY-MM-DD, d/m/y or
 * m/d/y — `order`, or settled by the cells themselves, else day/month — and 4 Mar 2021), a cell holding a plain
 * number as a spreadsheet serial date.
 */
export function monitoringDates(
  data: Dataset,
  columns: ColumnInfo[] | null,
  name: string,
  order: 'auto' | DateOrder = 'auto',
): MonitoringDates {
  const col = getColumn(data, name);
  const info = columns?.find((c) => c.name === name);
  if (col.kind === 'numeric') {
    if (info?.type === 'date') return { days: col.values, how: 'date-column', unreadable: 0 };
    const days = new Float64Array(col.values.length);
    for (let i = 0; i < days.length; i++) {
      const v = col.values[i];
      if (Number.isNaN(v)) {
        days[i] = NaN;
        continue;
      }
      if (!(v >= 1 && v <= SERIAL_MAX))
        throw new FulcraError(
          'not-dates',
          `Column "${name}" holds the number ${v}, which is neither a date nor a spreadsheet serial date.`,
          'Choose the column that holds each case’s date (for example 2025-03-14 or 14/03/2025).',
        );
      days[i] = serialDate(v, false).getTime() / DAY_MS;
    }
    return { days, how: 'spreadsheet-serial', unreadable: 0 };
  }
  let use: DateOrder = order === 'auto' ? 'dmy' : order;
  if (order === 'auto') {
    const seen = new Set(col.levels.map(dateOrderEvidence).filter((o) => o !== null));
    if (seen.size === 1) use = [...seen][0] as DateOrder;
  }
  let serials = 0;
  const parsed = col.levels.map((l) => {
    const t = l.trim();
    const d = parseDateText(t, use);
    if (!Number.isNaN(d) || !SERIAL.test(t)) return d;
    const v = Number(t);
    if (!(v >= 1 && v <= SERIAL_MAX)) return NaN;
    serials++;
    return serialDate(v, false).getTime() / DAY_MS;
  });
  const days = new Float64Array(col.codes.length);
  let unreadable = 0;
  for (let i = 0; i < days.length; i++) {
    const c = col.codes[i];
    days[i] = c < 0 ? NaN : parsed[c];
    if (c >= 0 && Number.isNaN(parsed[c])) unreadable++;
  }
  if (unreadable === days.length)
    throw new FulcraError(
      'not-dates',
      `Column "${name}" holds no dates (for example "${col.levels[0] ?? ''}").`,
      'Choose the column that holds each case’s date (for example 2025-03-14 or 14/03/2025).',
    );
  return { days, how: serials === col.levels.length ? 'spreadsheet-serial' : 'date-text', unreadable };
}
