import type { ColumnBuilder } from './columnBuilder';
import type { NumericSummary } from './numericSummary';
import { dateOrderEvidence, parseDateText } from './dates';
import { plural, pct, rowList } from './rows';
import type { ColumnType, DateOrder } from './types';

export interface Inference {
  type: ColumnType;
  reason: string;
  /** Date columns: the order used, and whether the file settled it. */
  dateOrder: DateOrder;
  dateOrderSettled: boolean;
  dateOrderConflict: boolean;
}

/** Shares at or above which a column is called numeric / date although some cells are not. */
export const NUMERIC_SHARE = 0.9;
export const DATE_SHARE = 0.9;
const NUMERIC_DATE = /^\d{1,2}[/.-]\d{1,2}[/.-]\d{2,4}/;
const ID_NAME = /(^|[^a-z])(id|mrn|uuid|guid|key|record|ref|code|number|nr|no)([^a-z]|$)/i;

/** Date order for a column: the user's choice, else what its cells settle, else day/month/year. */
export function chooseDateOrder(levels: readonly string[], wanted: 'auto' | DateOrder) {
  let dmy = false,
    mdy = false,
    numericForm = false;
  for (const l of levels) {
    if (!numericForm && NUMERIC_DATE.test(l)) numericForm = true;
    const e = dateOrderEvidence(l);
    if (e === 'dmy') dmy = true;
    else if (e === 'mdy') mdy = true;
  }
  if (wanted !== 'auto') return { order: wanted, settled: true, conflict: false };
  return {
    order: (mdy && !dmy ? 'mdy' : 'dmy') as DateOrder,
    settled: !numericForm || dmy !== mdy,
    conflict: dmy && mdy,
  };
}

/**
 * Proposes a column type from pass-one counts: numbers vs text share, distinct values, date patterns,
 * identifier look (all different, or leading zeros), free text (many distinct values with spaces).
 * `num` summarises the column's number cells.
 */
export function inferType(b: ColumnBuilder, name: string, num: NumericSummary, wanted: 'auto' | DateOrder): Inference {
  const present = b.numberCount + b.textCount;
  const d = chooseDateOrder(b.levels, wanted);
  const base = { dateOrder: d.order, dateOrderSettled: d.settled, dateOrderConflict: d.conflict };
  const out = (type: ColumnType, reason: string): Inference => ({ type, reason, ...base });
  if (present === 0) return out('empty', `every cell is missing (${plural(b.missingCount, 'cell')})`);

  if (b.numberCount > 0 && b.numberCount >= NUMERIC_SHARE * present) {
    const distinct = num.distinct;
    const textPart =
      b.textCount === 0
        ? ''
        : `; ${plural(b.textCount, 'cell is', 'cells are')} text: ${rowList(b.textCells)} (read as missing)`;
    const share =
      b.textCount === 0
        ? `all ${plural(present, 'present cell')} are numbers`
        : `${pct(b.numberCount, present)} of present cells are numbers`;
    if (b.leadingZeroCells.count > 0 && (distinct === b.numberCount || ID_NAME.test(name))) {
      return out(
        'identifier',
        `numbers written with leading zeros ` +
          `(e.g. "${b.leadingZeroCells.examples[0]}" at row ${b.leadingZeroCells.rows[0]}), read as codes`,
      );
    }
    if (num.integers && distinct === b.numberCount && b.numberCount >= 10 && ID_NAME.test(name)) {
      return out('identifier', `every value is a different whole number and the name looks like a record number`);
    }
    if (distinct === 2 && b.textCount === 0) {
      return out('binary', `${share}, with two distinct values: ${num.min} and ${num.max}`);
    }
    return out('numeric', share + textPart);
  }

  let dates = 0;
  for (let i = 0; i < b.levels.length; i++)
    if (!Number.isNaN(parseDateText(b.levels[i], d.order))) dates += b.levelCounts[i];
  if (b.numberCount === 0 && dates > 0 && dates >= DATE_SHARE * present) {
    const order = b.levels.some((l) => NUMERIC_DATE.test(l))
      ? d.order === 'dmy'
        ? ' (day/month/year)'
        : ' (month/day/year)'
      : '';
    return out('date', `${dates === present ? 'all' : pct(dates, present) + ' of'} present cells are dates${order}`);
  }

  const distinct = b.levels.length + num.distinct;
  const mix =
    b.numberCount > 0
      ? ` (${pct(b.textCount, present)} of present cells are text, ${pct(b.numberCount, present)} numbers)`
      : '';
  if (distinct === 2) return out('binary', `two distinct values${mix}: ${twoLevels(b, num)}`);
  if (distinct === 1)
    return out(
      'categorical',
      `a single value, "${String(b.levels[0] ?? num.min).slice(0, 40)}", in every present cell`,
    );
  const spaced = b.levels.filter((l) => l.indexOf(' ') >= 0).length;
  if (distinct === present && present >= 10) {
    return spaced > present / 2
      ? out('text', `free text: every present cell is different (${plural(distinct, 'value')})`)
      : out('identifier', `every present cell is different (${plural(distinct, 'value')}), like a record number`);
  }
  if (distinct > 50 && distinct > present / 2) {
    return spaced > b.levels.length / 2
      ? out('text', `free text: ${plural(distinct, 'distinct value')} among ${plural(present, 'present cell')}`)
      : out(
          'identifier',
          `${plural(distinct, 'distinct value')} among ${plural(present, 'present cell')}, like codes or names`,
        );
  }
  return out('categorical', `text with ${plural(distinct, 'distinct value')}${mix}`);
}

function twoLevels(b: ColumnBuilder, num: NumericSummary): string {
  const vals = [...b.levels];
  if (num.count > 0) vals.push(String(num.min));
  return vals.map((v) => `"${v.length > 40 ? v.slice(0, 40) + '…' : v}"`).join(' and ');
}
