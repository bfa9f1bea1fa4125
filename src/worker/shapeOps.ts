import { FulcraError, type Column, type Dataset } from '../engine/core';
import type { FitResult } from '../engine/core';
import { predict } from '../engine/fitting';
import type { RiskCurveView } from './protocol';
import { requireData, requireFit, type Session } from './session';

/** Rows in the recipe's columns: `vary` takes each of `values`, every other predictor is held at `held`. */
function gridRows(
  f: FitResult,
  held: Record<string, string | number>,
  vary: { column: string; values: (string | number)[] },
): Dataset {
  const n = vary.values.length;
  const columns: Column[] = [];
  for (const t of f.recipe.terms) {
    if (t.type === 'interaction') continue;
    const valueAt = (i: number) => (vary.column === t.column ? vary.values[i] : held[t.column]);
    if (t.type === 'categorical') {
      columns.push({
        kind: 'categorical',
        name: t.column,
        levels: [...t.levels],
        codes: Int32Array.from({ length: n }, (_, i) => t.levels.indexOf(String(valueAt(i)))),
      });
    } else {
      columns.push({
        kind: 'numeric',
        name: t.column,
        values: Float64Array.from({ length: n }, (_, i) => Number(valueAt(i))),
      });
    }
  }
  return { nRows: n, columns };
}

/** Predicted risk against one predictor, the others at their typical values, with a CI band and a rug. */
export function riskCurve(s: Session, predictor: string, typical: Record<string, string | number>): RiskCurveView {
  const f = requireFit(s);
  const data = requireData(s);
  const term = f.recipe.terms.find((t) => t.type !== 'interaction' && t.column === predictor);
  if (!term || term.type === 'interaction')
    throw new FulcraError('unknown-predictor', `"${predictor}" is not a predictor of the model.`);
  const col = data.columns.find((c) => c.name === predictor)!;
  let values: (string | number)[];
  let rug: number[] = [];
  if (term.type === 'categorical') {
    values = term.levels;
  } else {
    if (col.kind !== 'numeric') throw new FulcraError('not-numeric', `${predictor} is not numeric.`);
    const v = col.values.filter((x) => !Number.isNaN(x)).sort();
    const lo = v[Math.floor(0.01 * (v.length - 1))],
      hi = v[Math.ceil(0.99 * (v.length - 1))];
    // lo·(1 − t) + hi·t stays finite for any finite lo and hi (hi − lo may not: 1.2e308 − (−1e308) overflows).
    values = Array.from({ length: 61 }, (_, i) => lo * (1 - i / 60) + hi * (i / 60));
    const step = Math.max(1, Math.floor(col.values.length / 300));
    for (let i = 0; i < col.values.length; i += step) if (!Number.isNaN(col.values[i])) rug.push(col.values[i]);
    rug = rug.filter((x) => x >= lo && x <= hi);
  }
  const held: Record<string, string | number> = { ...typical };
  delete held[predictor];
  const r = predict(f, gridRows(f, typical, { column: predictor, values }));
  return {
    predictor,
    numeric: term.type !== 'categorical',
    points: values.map((v, i) => ({
      x: typeof v === 'number' ? v : i,
      label: typeof v === 'number' ? (Math.abs(v) < 1e15 ? String(Math.round(v * 1000) / 1000) : v.toPrecision(4)) : v,
      risk: r.risk[i],
      lower: r.lower[i],
      upper: r.upper[i],
    })),
    rug,
    heldAt: held,
  };
}
