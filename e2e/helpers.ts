import type { Dataset } from '../src/engine/core/data';
import { createRng } from '../src/engine/numerics/rng';

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

/**
 * `rows` invented rows of a fictional plant's fault log (dose, age, shift → fault yes/no), seeded: with 32 768 rows
 * or more the engine shares a fit's passes over its threads.
 */
export function faultLogCsv(rows: number, seed: number): string {
  const rng = createRng(seed);
  const lines = ['dose,age,shift,fault'];
  for (let i = 0; i < rows; i++) {
    const dose = rng.normal(),
      age = 40 + 10 * rng.normal(),
      shift = rng.next() < 0.3 ? 1 : 0;
    const eta = -1.5 + 0.7 * dose + 0.02 * (age - 40) + 0.4 * shift;
    lines.push(`${dose.toFixed(3)},${age.toFixed(1)},${shift},${rng.next() < 1 / (1 + Math.exp(-eta)) ? 'yes' : 'no'}`);
  }
  return lines.join('\n');
}
