import { describe, expect, it } from 'vitest';
import type { Dataset } from '../../../src/engine/core/data';
import { forestData, subgroupsOfAnalysis, type SubgroupRow } from '../../../src/engine/subgroups';
import { readJson } from '../eval/readCsv';

// Reference: R 4.2.2, MASS 7.3.58.2 birthwt, pROC 1.18.0 roc(levels = c(0, 1), direction = "<"),
// ci.auc(method = "delong"), var(method = "delong"); glm(y ~ 1, offset = qlogis(p)) and glm(y ~ qlogis(p)) with
// confint.default; exact Poisson O/E by qchisq; prop.test(correct = FALSE) (Wilson). Script and JSON:
// tests/fixtures/reference/subgroups-proc.R / .json (risks from a glm fitted there).
const ref = readJson('reference/subgroups-proc.json');
const N: number = ref.y.length;
const raceLevels = ['white', 'black', 'other'];

// The dataset holds one extra row first (not used by the model, as if its outcome were missing), so the groups must
// follow rowsUsed (1..189), not the data's own row order.
const data: Dataset = {
  nRows: N + 1,
  columns: [
    { kind: 'numeric', name: 'age', values: Float64Array.from([99, ...ref.age]) },
    {
      kind: 'categorical',
      name: 'race',
      levels: raceLevels,
      codes: Int32Array.from([0, ...ref.race.map((r: string) => raceLevels.indexOf(r))]),
    },
  ],
};
const risk = Float64Array.from(ref.risk as number[]);
const scores = {
  y: Float64Array.from(ref.y as number[]),
  risk,
  eta: risk.map((p) => Math.log(p / (1 - p))),
  rowsUsed: Int32Array.from({ length: N }, (_, i) => i + 1),
};
const options = { level: ref.level, threshold: ref.cutoff };

const close = (a: number | null | undefined, b: number, tol: number) => {
  expect(a).not.toBeNull();
  expect(Math.abs((a as number) - b)).toBeLessThan(tol);
};

// eslint-disable-next-line @typescript-eslint/no-explicit-any -- rows of the R fixture
function matches(row: SubgroupRow, r: any, measuresComputed: boolean): void {
  expect(row.label).toBe(r.label);
  expect(row.n).toBe(r.n);
  expect(row.events).toBe(r.events);
  close(row.expected, r.expected, 1e-10); // R sum(fitted)
  close(row.observedExpected.estimate, r.oe, 1e-12); // R O/E
  close(row.observedExpected.lower, r.oeLower, 1e-9); // R qchisq(α/2, 2O)/2/E
  close(row.observedExpected.upper, r.oeUpper, 1e-9); // R qchisq(1 − α/2, 2O + 2)/2/E
  const c = row.atCutoff!;
  expect(c.tp).toBe(r.tp); // R sum(p >= 0.3 & y == 1)
  expect(c.fp).toBe(r.fp);
  for (const k of ['sensitivity', 'specificity', 'fractionFlagged'] as const) {
    const w = r[k === 'fractionFlagged' ? 'flagged' : k];
    close(c[k].estimate, w.estimate, 1e-12); // R x / n
    close(c[k].lower, w.lower, 1e-9); // R prop.test(correct = FALSE)$conf.int
    close(c[k].upper, w.upper, 1e-9);
  }
  if (!measuresComputed) {
    expect(row.auc).toBeNull();
    expect(row.calibrationInTheLarge).toBeNull();
    expect(row.calibrationSlope).toBeNull();
    return;
  }
  close(row.auc!.estimate, r.auc.estimate, 1e-12); // pROC roc()$auc
  close(row.auc!.se, r.auc.se, 1e-12); // pROC sqrt(var(method = "delong"))
  close(row.auc!.lower, r.auc.lower, 1e-12); // pROC ci.auc(method = "delong")
  close(row.auc!.upper, r.auc.upper, 1e-12);
  for (const [mine, theirs] of [
    [row.calibrationInTheLarge, r.citl], // glm(y ~ 1, offset = qlogis(p)), confint.default
    [row.calibrationSlope, r.slope], // glm(y ~ qlogis(p)), confint.default
  ]) {
    close(mine.estimate, theirs.estimate, 1e-10);
    // R's vcov uses the working weights at the start of glm's last IRLS iteration, so SEs agree to ~1e-8 only.
    close(mine.se, theirs.se, 1e-7);
    close(mine.lower, theirs.lower, 1e-7);
    close(mine.upper, theirs.upper, 1e-7);
  }
}

describe('subgroup performance on MASS::birthwt against R (pROC 1.18.0, glm, qchisq, prop.test)', () => {
  const byRace = subgroupsOfAnalysis(data, scores, { column: 'race' }, options);
  const byAge = subgroupsOfAnalysis(data, scores, { column: 'age', cutPoints: ref.cutPoints }, options);

  it('gives each race group in level order with the counts, O/E, AUC, calibration and cut-off measures of R', () => {
    expect(byRace.rows.map((r) => r.label)).toEqual(raceLevels);
    ref.byRace.forEach((r: unknown, k: number) => matches(byRace.rows[k], r, true));
  });

  it('gives the overall row as R does on all 189 births', () => {
    matches(byRace.overall, ref.overall, true);
    matches(byAge.overall, ref.overall, true);
  });

  it('cuts age at 20, 25, 30 into left-closed bands labelled as R cut(right = FALSE) groups them', () => {
    expect(byAge.rows.map((r) => r.label)).toEqual(['< 20', '20 to < 25', '25 to < 30', '≥ 30']);
    ref.byAge.forEach((r: unknown, k: number) => matches(byAge.rows[k], r, k < 3));
  });

  it('computes no AUC or calibration for the age band ≥ 30 (4 events < 10) and says why, naming the group', () => {
    const last = byAge.rows[3];
    expect(last.precision).toBe('counts-only');
    expect(last.notComputed).toMatch(/only 4 events and 23 non-events, fewer than 10/);
    const w = byAge.warnings.find((x) => x.code === 'subgroup-too-small')!;
    expect(w.message).toContain('Subgroup "≥ 30" of column "age"');
    expect(w.message).toContain('common practice');
    expect(w.terms).toEqual(['age']);
  });

  it('marks every group with 10–99 events or non-events imprecise, citing Collins, Ogundimu & Altman 2016', () => {
    // Rule source: Collins, Ogundimu & Altman 2016, Stat Med 35:214 (≥ 100 events and ≥ 100 non-events).
    const imprecise = byRace.warnings.filter((x) => x.code === 'subgroup-imprecise');
    expect(imprecise.map((x) => x.message.match(/"(\w+)"/)![1])).toEqual(raceLevels);
    expect(imprecise[1].message).toContain('11 events and 15 non-events');
    expect(imprecise[0].message).toContain('Collins, Ogundimu & Altman 2016, Stat Med 35:214');
    expect(byRace.rule.impreciseBelow).toBe(100);
    expect(byRace.rule.countsOnlyBelow).toBe(10);
  });

  it('holds the forest-plot rows of the AUC: R estimates and DeLong limits, null for the band left uncomputed', () => {
    const f = forestData(byAge, 'auc');
    expect(f.reference).toBe(0.5);
    expect(f.rows).toHaveLength(4);
    close(f.rows[0].lower, ref.byAge[0].auc.lower, 1e-12); // pROC ci.auc(method = "delong")
    expect(f.rows[3]).toMatchObject({ label: '≥ 30', estimate: null, lower: null, upper: null });
    close(f.overall.estimate, ref.overall.auc.estimate, 1e-12); // pROC roc()$auc
    const oe = forestData(byRace, 'observedExpected');
    expect(oe.scale).toBe('log');
    close(oe.rows[2].upper, ref.byRace[2].oeUpper, 1e-9); // R qchisq
  });

  it('is structured-clone safe', () => {
    expect(structuredClone(byAge)).toEqual(byAge);
  });
});
