import type { Dataset } from '../src/engine/core/data';

/** A dataset written as CSV text (missing cells empty), the way a spreadsheet export looks. */
export function toCsv(d: Dataset, rows = d.nRows): string {
  const lines = [d.columns.map((c) => c.name).join(',')];
  for (let i = 0; i < rows; i++) {
    lines.push(
      d.columns
        .map((c) => {
          if (c.kind === 'numeric') return Number.isNaN(c.values[i]) ? '' : String(c.values[i]);
          return c.codes[i] < 0 ? '' : c.levels[c.codes[i]];
        })
        .join(','),
    );
  }
  return lines.join('\n');
}
