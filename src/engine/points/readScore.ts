import { FulcraError } from '../core/data';
import type { EngineWarning } from '../core/warnings';
import type { PointsBaseUnitRecord, PointsCategory, PointsScore, PointsTableRow, PointsTerm } from './types';

type Obj = Record<string, unknown>;

function fail(path: string, what: string): never {
  throw new FulcraError(
    'bad-points-score',
    `The stored points score is damaged: "${path}" ${what}.`,
    'Build the points score again from the model, or use a model file saved by Fulcra.',
  );
}

function obj(v: unknown, path: string): Obj {
  if (typeof v !== 'object' || v === null || Array.isArray(v)) fail(path, 'must be an object');
  return v as Obj;
}
function arr(v: unknown, path: string): unknown[] {
  if (!Array.isArray(v)) fail(path, 'must be a list');
  return v;
}
function num(v: unknown, path: string): number {
  if (typeof v !== 'number' || !Number.isFinite(v)) fail(path, 'must be a finite number');
  return v;
}
function whole(v: unknown, path: string): number {
  const x = num(v, path);
  if (!Number.isInteger(x)) fail(path, 'must be a whole number');
  return x;
}
function str(v: unknown, path: string): string {
  if (typeof v !== 'string') fail(path, 'must be text');
  return v;
}
function numOrNull(v: unknown, path: string): number | null {
  return v === null ? null : num(v, path);
}
function oneOf<T extends string>(v: unknown, path: string, allowed: readonly T[]): T {
  if (!allowed.includes(v as T)) fail(path, `must be one of ${allowed.map((a) => `"${a}"`).join(', ')}`);
  return v as T;
}

function readBaseUnit(v: unknown, path: string): PointsBaseUnitRecord {
  const o = obj(v, path);
  const logOdds = num(o.logOdds, `${path}.logOdds`);
  if (!(logOdds > 0)) fail(`${path}.logOdds`, 'must be positive');
  const out: PointsBaseUnitRecord = {
    logOdds,
    rule: oneOf(o.rule, `${path}.rule`, ['auto', 'per-increase', 'log-odds'] as const),
    description: str(o.description, `${path}.description`),
  };
  if (o.column !== undefined) out.column = str(o.column, `${path}.column`);
  if (o.increase !== undefined) out.increase = num(o.increase, `${path}.increase`);
  if (o.widestTerm !== undefined) out.widestTerm = str(o.widestTerm, `${path}.widestTerm`);
  if (o.widestTermPoints !== undefined) out.widestTermPoints = whole(o.widestTermPoints, `${path}.widestTermPoints`);
  return out;
}

function readCategory(v: unknown, path: string, kind: PointsTerm['kind']): PointsCategory {
  const o = obj(v, path);
  const c: PointsCategory = {
    label: str(o.label, `${path}.label`),
    level: o.level === null ? null : str(o.level, `${path}.level`),
    lower: numOrNull(o.lower, `${path}.lower`),
    upper: numOrNull(o.upper, `${path}.upper`),
    reference: numOrNull(o.reference, `${path}.reference`),
    contribution: num(o.contribution, `${path}.contribution`),
    difference: num(o.difference, `${path}.difference`),
    exactPoints: num(o.exactPoints, `${path}.exactPoints`),
    points: whole(o.points, `${path}.points`),
  };
  if (kind === 'categorical' && c.level === null) fail(`${path}.level`, 'must name the level of a categorical term');
  if (kind !== 'categorical' && c.reference === null) fail(`${path}.reference`, 'must be a number for a numeric term');
  return c;
}

function readTerm(v: unknown, path: string): PointsTerm {
  const o = obj(v, path);
  const kind = oneOf(o.kind, `${path}.kind`, ['categorical', 'numeric', 'spline'] as const);
  const categories = arr(o.categories, `${path}.categories`).map((c, j) =>
    readCategory(c, `${path}.categories[${j}]`, kind),
  );
  if (categories.length === 0) fail(`${path}.categories`, 'must hold at least one category');
  if (kind !== 'categorical')
    categories.forEach((c, j) => {
      const ok = j === 0 ? c.lower === null : c.lower !== null && c.lower === categories[j - 1].upper;
      if (!ok || (j === categories.length - 1 && c.upper !== null))
        fail(`${path}.categories[${j}].lower`, 'must continue the previous range (ranges in increasing order)');
    });
  const base = whole(o.base, `${path}.base`);
  if (base < 0 || base >= categories.length) fail(`${path}.base`, 'must be the index of one of its categories');
  return {
    term: str(o.term, `${path}.term`),
    column: str(o.column, `${path}.column`),
    kind,
    grouping: oneOf(o.grouping, `${path}.grouping`, ['levels', 'values', 'user-ranges', 'default-ranges'] as const),
    base,
    categories,
  };
}

function readWarning(v: unknown, path: string): EngineWarning {
  const o = obj(v, path);
  const w: EngineWarning = {
    code: str(o.code, `${path}.code`),
    message: str(o.message, `${path}.message`),
    suggestion: str(o.suggestion, `${path}.suggestion`),
  };
  if (o.terms !== undefined) w.terms = arr(o.terms, `${path}.terms`).map((t, k) => str(t, `${path}.terms[${k}]`));
  return w;
}

/**
 * Checks a stored points score (e.g. the `points` field of a model file read back) field by field and returns it
 * as a PointsScore; anything missing, of the wrong type or inconsistent (ranges out of order, totals that do not
 * match the categories' points, a table risk that is not the stated formula's) throws
 * FulcraError('bad-points-score') naming the field, e.g. "points.terms[1].categories[0].points". `path` is the
 * name the field has in the file.
 */
export function readPointsScore(value: unknown, path = 'points'): PointsScore {
  const o = obj(value, path);
  if (o.kind !== 'points-score') fail(`${path}.kind`, 'must be "points-score"');
  if (o.version !== 1) fail(`${path}.version`, 'must be 1 (a later Fulcra may have written it)');
  const terms = arr(o.terms, `${path}.terms`).map((t, i) => readTerm(t, `${path}.terms[${i}]`));
  const baseUnit = readBaseUnit(o.baseUnit, `${path}.baseUnit`);
  const baseLinearPredictor = num(o.baseLinearPredictor, `${path}.baseLinearPredictor`);
  const minTotal = whole(o.minTotal, `${path}.minTotal`);
  const maxTotal = whole(o.maxTotal, `${path}.maxTotal`);
  const sum = (pick: (ps: number[]) => number) =>
    terms.reduce((a, t) => a + pick(t.categories.map((c) => c.points)), 0);
  if (minTotal !== sum((ps) => Math.min(...ps))) fail(`${path}.minTotal`, "must be the sum of the terms' least points");
  if (maxTotal !== sum((ps) => Math.max(...ps))) fail(`${path}.maxTotal`, "must be the sum of the terms' most points");
  const table = arr(o.table, `${path}.table`).map((r, k): PointsTableRow => {
    const p = `${path}.table[${k}]`;
    const row = obj(r, p);
    const total = whole(row.total, `${p}.total`);
    const linearPredictor = num(row.linearPredictor, `${p}.linearPredictor`);
    const risk = num(row.risk, `${p}.risk`);
    const expected = baseLinearPredictor + baseUnit.logOdds * total;
    if (total < minTotal || total > maxTotal) fail(`${p}.total`, `must lie from ${minTotal} to ${maxTotal}`);
    if (Math.abs(linearPredictor - expected) > 1e-9 * Math.max(1, Math.abs(expected)))
      fail(`${p}.linearPredictor`, 'must be baseLinearPredictor + baseUnit.logOdds × total');
    if (Math.abs(risk - 1 / (1 + Math.exp(-linearPredictor))) > 1e-12) fail(`${p}.risk`, 'must be 1/(1 + exp(−LP))');
    return { total, linearPredictor, risk };
  });
  return {
    kind: 'points-score',
    version: 1,
    outcome: str(o.outcome, `${path}.outcome`),
    event: str(o.event, `${path}.event`),
    intercept: num(o.intercept, `${path}.intercept`),
    baseUnit,
    baseLinearPredictor,
    terms,
    minTotal,
    maxTotal,
    table,
    unitsPerPoint: arr(o.unitsPerPoint, `${path}.unitsPerPoint`).map((u, k) => {
      const p = `${path}.unitsPerPoint[${k}]`;
      const e = obj(u, p);
      return {
        term: str(e.term, `${p}.term`),
        column: str(e.column, `${p}.column`),
        units: num(e.units, `${p}.units`),
      };
    }),
    warnings: arr(o.warnings, `${path}.warnings`).map((w, k) => readWarning(w, `${path}.warnings[${k}]`)),
  };
}
