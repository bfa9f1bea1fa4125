import { sigmoid } from '../numerics/loss';
import type { PointsTableRow, PointsTerm } from './types';

/**
 * The totals some combination of categories (one per term) gives, from minTotal to maxTotal, by a reachability
 * pass over the terms (O(terms × categories × span)); e.g. terms scoring {0, 2} and {0, 4} reach 0, 2, 4, 6 only.
 */
export function attainableTotals(
  terms: ReadonlyArray<Pick<PointsTerm, 'categories'>>,
  minTotal: number,
  maxTotal: number,
) {
  const span = maxTotal - minTotal;
  let reach = new Uint8Array(span + 1);
  reach[0] = 1;
  for (const t of terms) {
    const ps = t.categories.map((c) => c.points);
    const low = Math.min(...ps);
    const shifts = [...new Set(ps.map((p) => p - low))];
    const next = new Uint8Array(span + 1);
    for (let s = 0; s <= span; s++) {
      if (!reach[s]) continue;
      for (const d of shifts) if (s + d <= span) next[s + d] = 1;
    }
    reach = next;
  }
  const out: number[] = [];
  for (let s = 0; s <= span; s++) if (reach[s]) out.push(minTotal + s);
  return out;
}

/** The risk of every attainable total: 1 / (1 + exp(−(baseLinearPredictor + B·total))). */
export function pointsTable(
  terms: ReadonlyArray<Pick<PointsTerm, 'categories'>>,
  baseLinearPredictor: number,
  B: number,
  minTotal: number,
  maxTotal: number,
): PointsTableRow[] {
  return attainableTotals(terms, minTotal, maxTotal).map((total) => {
    const linearPredictor = baseLinearPredictor + B * total;
    return { total, linearPredictor, risk: sigmoid(linearPredictor) };
  });
}
