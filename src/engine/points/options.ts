import { FulcraError } from '../core/data';
import { defaultPointsOptions, type PointsBaseUnit, type PointsOptions } from './types';

const bad = (field: string, message: string, suggestion: string) =>
  new FulcraError('bad-points-option', `Points score option "${field}": ${message}`, suggestion);

const isRecord = (v: unknown): v is Record<string, unknown> => typeof v === 'object' && v !== null && !Array.isArray(v);

/** Throws unless B would be a positive finite number; the message names the field and the value. */
export function checkBaseUnit(unit: unknown): PointsBaseUnit {
  const fix = 'Give the log odds one point stands for (a positive number), or leave the base unit to the default.';
  if (!isRecord(unit)) throw bad('baseUnit', `must be an object with a "kind", got ${String(unit)}.`, fix);
  if (unit.kind === 'auto') return { kind: 'auto' };
  if (unit.kind === 'log-odds') {
    const v = unit.value;
    if (typeof v !== 'number' || !Number.isFinite(v) || v <= 0)
      throw new FulcraError(
        'bad-points-base-unit',
        `The base unit (the log odds one point stands for) must be a positive finite number; got ${String(v)}.`,
        fix,
      );
    return { kind: 'log-odds', value: v };
  }
  if (unit.kind === 'per-increase') {
    const { column, increase } = unit;
    if (typeof column !== 'string' || column === '')
      throw bad('baseUnit.column', 'must name a numeric column of the model.', fix);
    if (typeof increase !== 'number' || !Number.isFinite(increase) || increase <= 0)
      throw new FulcraError(
        'bad-points-base-unit',
        `The increase of "${column}" that one point stands for must be a positive finite number; ` +
          `got ${String(increase)}.`,
        'Give a round increase, e.g. 5 (years of age).',
      );
    return { kind: 'per-increase', column, increase };
  }
  throw bad('baseUnit.kind', `must be "auto", "per-increase" or "log-odds", got "${String(unit.kind)}".`, fix);
}

function checkNumberLists(field: string, v: unknown): Record<string, number[]> {
  if (!isRecord(v)) throw bad(field, 'must map column names to lists of numbers.', 'e.g. { "age": [40, 50, 60] }.');
  const out: Record<string, number[]> = {};
  for (const [column, list] of Object.entries(v)) {
    if (!Array.isArray(list) || list.some((x) => typeof x !== 'number' || !Number.isFinite(x)))
      throw bad(`${field}.${column}`, 'must be a list of finite numbers.', 'e.g. [40, 50, 60].');
    out[column] = [...(list as number[])];
  }
  return out;
}

/**
 * The points-score options with defaults filled in (`defaultPointsOptions`); an unknown field or a bad value throws
 * FulcraError('bad-points-option' or 'bad-points-base-unit') naming it. Checks that need the model (a column that is
 * not a numeric term, a reference value outside its range) are made when the score is built.
 */
export function resolvePointsOptions(options: Partial<PointsOptions> = {}): PointsOptions {
  const known = Object.keys(defaultPointsOptions);
  for (const k of Object.keys(options))
    if (!known.includes(k)) throw bad(k, `is not an option (options: ${known.join(', ')}).`, 'Remove it.');
  const o = { ...defaultPointsOptions, ...options };
  const whole = (field: string, v: number, lo: number, hi: number) => {
    if (!Number.isInteger(v) || v < lo || v > hi)
      throw bad(field, `must be a whole number from ${lo} to ${hi}, got ${v}.`, `Use a number from ${lo} to ${hi}.`);
  };
  whole('widestTermPoints', o.widestTermPoints, 1, 1000);
  whole('rangesPerTerm', o.rangesPerTerm, 2, 20);
  if (o.base !== 'lowest-risk' && o.base !== 'first')
    throw bad('base', `must be "lowest-risk" or "first", got "${String(o.base)}".`, 'Use "lowest-risk".');
  const cuts = checkNumberLists('cuts', o.cuts);
  for (const [column, c] of Object.entries(cuts)) {
    if (c.length === 0) throw bad(`cuts.${column}`, 'needs at least one cut point.', 'e.g. [40, 50, 60].');
    const k = c.findIndex((x, i) => i > 0 && !(x > c[i - 1]));
    if (k > 0)
      throw bad(`cuts.${column}`, `must increase strictly; ${c[k]} follows ${c[k - 1]}.`, 'Sort the cut points.');
  }
  const referenceValues = checkNumberLists('referenceValues', o.referenceValues);
  for (const [column, r] of Object.entries(referenceValues)) {
    if (!cuts[column])
      throw bad(
        `referenceValues.${column}`,
        'needs the cut points of that column too, so that each reference value has its range.',
        `Give "cuts.${column}" as well.`,
      );
    if (r.length !== cuts[column].length + 1)
      throw bad(
        `referenceValues.${column}`,
        `needs one value per range: ${cuts[column].length} cut points make ${cuts[column].length + 1} ranges, ` +
          `but ${r.length} values were given.`,
        'Give one reference value per range.',
      );
  }
  return { ...o, baseUnit: checkBaseUnit(o.baseUnit), cuts, referenceValues };
}
