import { FulcraError } from '../engine/core';
import type { PointsBaseUnit } from '../engine/points';
import type { PointsRecord } from '../engine/workflow';
import { POINTS_CAUTIONS, pointsCasesText, pointsComparisonRows, pointsText, riskText } from '../report/pointsCard';
import { table } from './format';

/**
 * `--points-base X`: `auto` (the most influential predictor spans 10 points), a positive number (the log odds one
 * point stands for), or COLUMN:INCREASE (one point = the effect of that increase of a linear numeric predictor,
 * e.g. age:5).
 */
export function parsePointsBase(v: string): PointsBaseUnit {
  const t = v.trim();
  if (t === 'auto') return { kind: 'auto' };
  const k = t.lastIndexOf(':');
  if (k > 0) {
    const increase = Number(t.slice(k + 1));
    if (!(Number.isFinite(increase) && increase > 0))
      throw new FulcraError(
        'bad-argument',
        `--points-base ${v}: the increase after ":" must be a positive number, e.g. --points-base age:5.`,
      );
    return { kind: 'per-increase', column: t.slice(0, k), increase };
  }
  const x = Number(t);
  if (t === '' || !Number.isFinite(x) || x <= 0)
    throw new FulcraError(
      'bad-argument',
      `--points-base must be auto, a positive number of log odds per point (e.g. 0.25) or COLUMN:INCREASE ` +
        `(e.g. age:5); got "${v}".`,
    );
  return { kind: 'log-odds', value: x };
}

/** The readable lines of `npm run fit -- … --points` (the JSON prints the whole record under `points`). */
export function pointsLines(p: PointsRecord): string[] {
  const s = p.score;
  const out = [`Bedside points score (Sullivan, Massaro & D'Agostino 2004) for "${s.outcome}" = ${s.event}`];
  out.push(`  ${s.baseUnit.description}`);
  for (const t of s.terms) {
    out.push(`  ${t.term}: ` + t.categories.map((c) => `${c.label} ${pointsText(c.points)}`).join('; '));
  }
  out.push(`  Total points → risk: ` + s.table.map((r) => `${pointsText(r.total)} ${riskText(r.risk)}`).join(', '));
  out.push(`  ${pointsCasesText(p)}`);
  const rows = pointsComparisonRows(p);
  out.push(
    ...table(['', 'points card', 'full model'], rows)
      .split('\n')
      .map((l) => `  ${l}`),
  );
  for (const c of POINTS_CAUTIONS) out.push(`  ${c}`);
  return out;
}
