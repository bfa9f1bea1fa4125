import { describe, expect, it } from 'vitest';
import { FulcraError } from '../../../src/engine/core/data';
import { delongAuc } from '../../../src/engine/evaluation/delong';
import {
  forestData,
  subgroupPerformance,
  subgroupPrecision,
  type SubgroupAssignment,
} from '../../../src/engine/subgroups';

// Four invented groups, sized to fall on each side of the too-small rule: "big" (≥ 100 events and ≥ 100
// non-events), "mid" (10–99 of a class), "few" (5 events) and "none" (no events).
const sizes: [string, number, (i: number) => number][] = [
  ['big', 400, (i) => (((i * 53) % 100) / 100 < 0.2 + 0.6 * (((i * 37) % 100) / 100) ? 1 : 0)],
  ['mid', 60, (i) => (i % 3 === 0 ? 1 : 0)],
  ['few', 30, (i) => (i % 6 === 0 ? 1 : 0)],
  ['none', 12, () => 0],
];
const yList: number[] = [];
const riskList: number[] = [];
const groupList: number[] = [];
sizes.forEach(([, n, outcome], g) => {
  for (let i = 0; i < n; i++) {
    yList.push(outcome(i));
    riskList.push(0.2 + 0.6 * (((i * 37) % 100) / 100) * (g === 3 ? 0.2 : 1));
    groupList.push(g);
  }
});
// Interleave the groups so that no group sits in one block of rows.
const order = yList.map((_, i) => i).sort((a, b) => ((a * 7919) % yList.length) - ((b * 7919) % yList.length));
const y = Float64Array.from(order.map((i) => yList[i]));
const risk = Float64Array.from(order.map((i) => riskList[i]));
const eta = risk.map((p) => Math.log(p / (1 - p)));
const groupOf = Int32Array.from(order.map((i) => groupList[i]));
const assignment: SubgroupAssignment = {
  column: 'unit',
  kind: 'levels',
  cutPoints: null,
  groups: sizes.map(([label, n]) => ({ label, definition: `unit = "${label}"`, n, missing: false })),
  groupOf,
  emptyGroups: [],
  conventions: [],
};
const subset = (v: Float64Array, g: number) => v.filter((_, i) => groupOf[i] === g);

describe('the too-small rule', () => {
  const res = subgroupPerformance({ y, risk, eta }, assignment, { threshold: 0.5 });
  const [big, mid, few, none] = res.rows;

  it('classifies by the smaller of events and non-events: 100 and 10 are the thresholds', () => {
    // Source: Collins, Ogundimu & Altman 2016, Stat Med 35:214 (100 of each); floor of 10: common practice.
    expect([subgroupPrecision(100, 100), subgroupPrecision(99, 500), subgroupPrecision(10, 10)]).toEqual([
      'adequate',
      'imprecise',
      'imprecise',
    ]);
    expect([subgroupPrecision(9, 500), subgroupPrecision(0, 5), subgroupPrecision(5, 0)]).toEqual([
      'counts-only',
      'one-class',
      'one-class',
    ]);
    expect(big.events).toBeGreaterThanOrEqual(100);
    expect(big.nonEvents).toBeGreaterThanOrEqual(100);
    expect(res.rows.map((r) => r.precision)).toEqual(['adequate', 'imprecise', 'counts-only', 'one-class']);
  });

  it('warns once per small group, naming the group and the column, and not for the adequate group', () => {
    const sized = res.warnings.filter((w) => w.code.startsWith('subgroup-'));
    expect(sized.map((w) => [w.code, w.message.match(/^Subgroup "(\w+)" of column "unit"/)![1]])).toEqual([
      ['subgroup-imprecise', 'mid'],
      ['subgroup-too-small', 'few'],
      ['subgroup-one-class', 'none'],
    ]);
    expect(sized[0].message).toContain('20 events and 40 non-events');
    expect(sized[1].message).toContain('5 events and 25 non-events');
    expect(sized[2].message).toContain('0 events and 12 non-events');
    expect(big.warnings).toEqual([]);
    expect(few.warnings[0]).toEqual(sized[1]);
  });

  it('computes AUC and calibration for adequate and imprecise groups as delongAuc does on their rows', () => {
    // Source: evaluation/delong.ts, itself checked against pROC 1.18.0 in tests/engine/eval/delong.test.ts.
    for (const g of [0, 1]) {
      const ref = delongAuc(subset(y, g), subset(risk, g));
      expect(res.rows[g].auc).toEqual({
        estimate: ref.auc,
        se: ref.se,
        lower: ref.lower,
        upper: ref.upper,
        ciMethod: ref.ciMethod,
      });
      expect(res.rows[g].calibrationSlope).not.toBeNull();
      expect(res.rows[g].notComputed).toBeNull();
    }
    expect(mid.calibrationInTheLarge!.estimate).toBeTypeOf('number');
  });

  it('gives only counts, O/E and the cut-off counts below 10 of a class, saying why', () => {
    expect(few.auc).toBeNull();
    expect(few.calibrationInTheLarge).toBeNull();
    expect(few.calibrationSlope).toBeNull();
    expect(few.notComputed).toMatch(/fewer than 10 of a class \(common practice/);
    expect(few.observedExpected.estimate).toBeCloseTo(5 / few.expected, 14);
    expect(few.atCutoff!.sensitivity.n).toBe(5);
  });

  it('gives a group with no events counts and O/E with the exact Poisson upper limit −ln(α/2)/E', () => {
    // Source: Garwood 1936: for O = 0 the upper limit is χ²(0.975; 2)/2 = −ln(0.025) (closed form of χ² with 2 df).
    expect(none.auc).toBeNull();
    expect(none.calibrationSlope).toBeNull();
    expect(none.notComputed).toMatch(/no events: the AUC compares events with non-events/);
    expect(none.observedExpected.estimate).toBe(0);
    expect(none.observedExpected.lower).toBe(0);
    expect(none.observedExpected.upper).toBeCloseTo(-Math.log(0.025) / none.expected, 10);
    expect(none.atCutoff!.sensitivity.estimate).toBeNull();
    expect(none.atCutoff!.specificity.n).toBe(12);
  });

  it('adds the groups up to the overall row (every used row in one group)', () => {
    // Source: arithmetic: n, events and Σ risk are sums over disjoint groups.
    const sum = (f: (r: (typeof res.rows)[number]) => number) => res.rows.reduce((s, r) => s + f(r), 0);
    expect(sum((r) => r.n)).toBe(res.overall.n);
    expect(sum((r) => r.events)).toBe(res.overall.events);
    expect(sum((r) => r.expected)).toBeCloseTo(res.overall.expected, 10);
    expect(sum((r) => r.atCutoff!.tp + r.atCutoff!.fp)).toBe(res.overall.atCutoff!.fractionFlagged.x);
    expect(res.overall.precision).toBe('adequate');
  });

  it('states the rule and its sources in the record', () => {
    expect(res.rule.text).toContain('Collins, Ogundimu & Altman 2016, Stat Med 35:214');
    expect(res.rule.countsOnlySource).toMatch(/^common practice/);
    expect(res.methods.join(' ')).toMatch(/Garwood 1936.*DeLong/);
  });
});

describe('subgroup performance inputs', () => {
  it('gives the same numbers from the linear predictor alone as from risk and linear predictor', () => {
    // Source: risk = 1/(1 + e^−η), so both routes describe the same predictions.
    const both = subgroupPerformance({ y, risk, eta }, assignment, { threshold: 0.5 });
    const lp = subgroupPerformance({ y, eta }, assignment, { threshold: 0.5 });
    const rk = subgroupPerformance({ y, risk }, assignment, { threshold: 0.5 });
    for (const other of [lp, rk]) {
      other.rows.forEach((r, g) => {
        expect(r.expected).toBeCloseTo(both.rows[g].expected, 10);
        expect(r.auc?.estimate).toBe(both.rows[g].auc?.estimate);
        expect(r.calibrationSlope?.estimate ?? null).toBeCloseTo(both.rows[g].calibrationSlope?.estimate ?? 0, 8);
      });
    }
  });

  it('leaves the cut-off measures out when no cut-off is given', () => {
    const res = subgroupPerformance({ y, risk }, assignment);
    expect(res.threshold).toBeNull();
    expect(res.rows.every((r) => r.atCutoff === null)).toBe(true);
    expect(forestData(res, 'sensitivity').rows.every((r) => r.estimate === null)).toBe(true);
  });

  it('says when risks of exactly 0 or 1 were clipped to build the linear predictor', () => {
    const r2 = risk.slice();
    r2[0] = 0;
    const res = subgroupPerformance({ y, risk: r2 }, assignment);
    expect(res.warnings.map((w) => w.code)).toContain('risk-clipped');
  });

  it('warns when the column puts every row in one group', () => {
    const one: SubgroupAssignment = {
      ...assignment,
      groups: [{ label: 'all', definition: 'unit = "all"', n: y.length, missing: false }],
      groupOf: new Int32Array(y.length),
    };
    const res = subgroupPerformance({ y, risk }, one);
    expect(res.warnings.at(-1)!.code).toBe('subgroup-single-group');
  });

  it('refuses bad arguments with a message naming the problem', () => {
    const err = (f: () => unknown) => {
      try {
        f();
      } catch (e) {
        return e as FulcraError;
      }
      throw new Error('did not throw');
    };
    expect(err(() => subgroupPerformance({ y }, assignment)).code).toBe('no-scores');
    expect(err(() => subgroupPerformance({ y, risk }, assignment, { threshold: 1.5 })).message).toBe(
      'The cut-off must be a risk between 0 and 1, got 1.5.',
    );
    expect(err(() => subgroupPerformance({ y, risk }, assignment, { level: 95 })).code).toBe('bad-level');
    const short = { ...assignment, groupOf: groupOf.slice(1) };
    expect(err(() => subgroupPerformance({ y, risk }, short)).code).toBe('length-mismatch');
    const wrong = { ...assignment, groupOf: Int32Array.from(groupOf, (g, i) => (i === 3 ? 7 : g)) };
    expect(err(() => subgroupPerformance({ y, risk }, wrong)).message).toBe(
      'Used row number 4 has group 7, but there are 4 groups.',
    );
  });
});

describe('forest-plot data', () => {
  const res = subgroupPerformance({ y, risk, eta }, assignment, { threshold: 0.5 });

  it('holds every group (null where not computed) with the reference line and scale of the measure', () => {
    const slope = forestData(res, 'calibrationSlope');
    expect(slope).toMatchObject({ column: 'unit', reference: 1, scale: 'linear', level: 0.95 });
    expect(slope.rows.map((r) => [r.label, r.estimate === null])).toEqual([
      ['big', false],
      ['mid', false],
      ['few', true],
      ['none', true],
    ]);
    expect(slope.rows[0].lower).toBe(res.rows[0].calibrationSlope!.lower);
    expect(forestData(res, 'calibrationInTheLarge').reference).toBe(0);
    const sens = forestData(res, 'sensitivity');
    expect(sens.rows[0].estimate).toBe(res.rows[0].atCutoff!.sensitivity.estimate);
    expect(sens.overall.upper).toBe(res.overall.atCutoff!.sensitivity.upper);
  });

  it('is structured-clone safe', () => {
    expect(structuredClone(res)).toEqual(res);
  });
});
