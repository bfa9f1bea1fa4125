import { describe, expect, it } from 'vitest';
import { buildDesign } from '../../../src/engine/design';
import { generateSsiMonitoring, generateSsiRegistry, ssiTruth } from '../../../src/engine/demo';
import { monitorStep, type MonitoringModel } from '../../../src/engine/workflow';

/** The registry's true model as a scoring model: its recipe, with the generator's known coefficients. */
function trueModel(): MonitoringModel {
  const reg = generateSsiRegistry();
  const { recipe } = buildDesign(reg.dataset, reg.spec);
  const coefficients = recipe.columnNames.map((name) => {
    const t = ssiTruth.find((c) =>
      c.column === null
        ? name === '(Intercept)'
        : name === (c.level === undefined ? c.column : `${c.column}=${c.level}`),
    );
    if (!t) throw new Error(`no true coefficient for ${name}`);
    return { name, estimate: t.value };
  });
  return { recipe, coefficients, source: 'current-fit', name: 'true model' };
}

function isoDays(demo: ReturnType<typeof generateSsiMonitoring>): Float64Array {
  const col = demo.dataset.columns.find((c) => c.name === demo.dateColumn)!;
  if (col.kind !== 'categorical') throw new Error('dates are text');
  return Float64Array.from(col.codes, (c) => Date.parse(col.levels[c]) / 86_400_000);
}

describe('the invented monitoring year (built-in deterioration on ward Cedar from 2025-07-01)', () => {
  const demo = generateSsiMonitoring();
  const record = monitorStep(trueModel(), demo.dataset, isoDays(demo), null, {
    dateColumn: demo.dateColumn,
    unitColumn: demo.unitColumn,
  });

  it('is labelled as invented and is reproducible from its seed', () => {
    expect(demo.notice).toMatch(/^Invented data/);
    expect(demo.title).toMatch(/fictional/);
    expect(generateSsiMonitoring().dataset).toEqual(demo.dataset);
  });

  it('signals deterioration on Cedar after the known month, on Cedar’s own chart', () => {
    const cedar = record.cusum.deteriorate.byUnit!.find((u) => u.unit === demo.change.ward)!;
    expect(cedar.signals.length).toBeGreaterThan(0);
    expect(cedar.signals[0].date).toBeGreaterThanOrEqual(demo.change.from);
    expect(cedar.signals.every((s) => s.unit === 'Cedar' && s.date >= demo.change.from)).toBe(true);
  });

  it('puts Cedar above the outer funnel limit and no other ward outside the limits', () => {
    const units = record.funnel!.units;
    expect(units.find((u) => u.unit === 'Cedar')!.flag).toBe('above-outer');
    for (const u of units.filter((x) => x.unit !== 'Cedar')) expect(u.flag).not.toMatch(/outer/);
  });

  it('shows the drift: O/E of the second half-year above that of the first', () => {
    const half = (from: string, to: string) => {
      const ps = record.periods.filter((p) => p.label >= from && p.label <= to);
      return ps.reduce((s, p) => s + p.observed, 0) / ps.reduce((s, p) => s + p.expected, 0);
    };
    expect(record.periods.map((p) => p.label)).toHaveLength(12);
    expect(half('2025-07', '2025-12')).toBeGreaterThan(half('2025-01', '2025-06') + 0.1);
  });

  it('lists the rows with a missing BMI as unscored, by spreadsheet row', () => {
    const bmi = demo.dataset.columns.find((c) => c.name === 'bmi')!;
    const missing = bmi.kind === 'numeric' ? [...bmi.values].flatMap((v, i) => (Number.isNaN(v) ? [i + 2] : [])) : [];
    expect(record.nUnscored).toBe(missing.length);
    expect(record.unscored.map((u) => u.row)).toEqual(missing);
    expect(record.unscored.every((u) => u.reason === 'missing-value' && u.column === 'bmi')).toBe(true);
  });
});
