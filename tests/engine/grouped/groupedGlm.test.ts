import { describe, expect, it } from 'vitest';
import type { Column, Dataset } from '../../../src/engine/core/data';
import type { ModelSpec } from '../../../src/engine/core/model';
import { runAnalysis } from '../../../src/engine/workflow/analyse';
import { maxRelErr, readJson } from '../fit/helpers';

// Reference: tests/fixtures/reference/grouped-glm.json from grouped-glm.R — R 4.2.2 glm(cbind(events, non-events)
// ~ …, binomial), exact profile-likelihood roots (glm.fit with an offset + uniroot, tol 1e-13), drop1(test =
// "LRT"), and pROC 1.18.0 ci.auc(method = "delong") with the Brier score and calibration fits on the same cases
// written out one row per case.
const ref = readJson('tests/fixtures/reference/grouped-glm.json');

/** A dataset from the fixture's columns: strings become categorical (levels in order of first appearance). */
function dataset(columns: Record<string, (string | number)[]>): Dataset {
  const cols: Column[] = Object.entries(columns).map(([name, values]) => {
    if (typeof values[0] === 'number') return { kind: 'numeric', name, values: Float64Array.from(values as number[]) };
    const levels = [...new Set(values as string[])];
    return { kind: 'categorical', name, levels, codes: Int32Array.from(values as string[], (v) => levels.indexOf(v)) };
  });
  return { nRows: (Object.values(columns)[0] as unknown[]).length, columns: cols };
}

const esoph = ref.esoph;
const esData = dataset(esoph.data);
const factor = (c: string) => ({ type: 'main' as const, column: c, reference: esoph.data[c][0] as string });
const esSpec: ModelSpec = {
  outcome: 'ncases',
  layout: { kind: 'events-nonevents', nonEvents: 'ncontrols' },
  terms: [factor('agegp'), factor('tobgp'), factor('alcgp')],
};
const men = ref.menarche;
const menData = dataset(men.data);
const menSpec: ModelSpec = {
  outcome: 'Menarche',
  layout: { kind: 'events-trials', trials: 'Total' },
  terms: [{ type: 'main', column: 'Age' }],
};

for (const [name, data, spec, r] of [
  ['datasets::esoph (events and non-events per pattern, unordered factors)', esData, esSpec, esoph],
  ['MASS::menarche (events and trials by age)', menData, menSpec, men],
] as const) {
  describe(`grouped fit on ${name}`, async () => {
    const { record } = await runAnalysis(data, { spec });
    const f = record.fit;
    const col = (k: 'estimate' | 'se' | 'profileLower' | 'profileUpper') => f.coefficients.map((c) => c[k] as number);

    it('matches glm(cbind(…)) coefficients, SEs and exact profile limits (R 4.2.2 glm.fit + uniroot)', () => {
      expect(maxRelErr(col('estimate'), Object.values(r.coefficients) as number[])).toBeLessThan(1e-6);
      expect(maxRelErr(col('se'), r.se)).toBeLessThan(1e-5);
      expect(maxRelErr(col('profileLower'), r.profileLower)).toBeLessThan(1e-6);
      expect(maxRelErr(col('profileUpper'), r.profileUpper)).toBeLessThan(1e-6);
    });

    it('matches drop1(test = "LRT") for every term (R 4.2.2)', () => {
      for (const t of f.terms) {
        expect(t.lrChi2!).toBeCloseTo(r.termLrChi2[t.name], 6);
        expect(maxRelErr([t.lrP!], [r.termLrP[t.name]])).toBeLessThan(1e-5);
      }
    });

    it('gives both deviance conventions: grouped as glm, per case as the written-out data (R 4.2.2)', () => {
      const lay = record.layout!;
      expect(lay.deviance!.grouped).toBeCloseTo(r.groupedDeviance, 6);
      expect(lay.deviance!.groupedDf).toBe(r.groupedDf);
      expect(lay.deviance!.perCase).toBeCloseTo(r.perCaseDeviance, 6);
      expect(f.deviance).toBeCloseTo(r.perCaseDeviance, 6);
      // the null deviances differ by the same saturated constant
      expect(f.nullDeviance - lay.deviance!.saturated).toBeCloseTo(r.groupedNullDeviance, 6);
      expect(lay.tableRowsUsed).toBe(r.rows);
    });

    it('counts cases, not rows, in events and the sample size', () => {
      expect(f.nUsed).toBe(r.cases);
      expect(f.events).toBe(r.events);
      expect(record.layout!.cases).toBe(r.cases);
      expect(record.evaluation.n).toBe(r.cases);
    });

    it('evaluates per case: AUC with DeLong CI (pROC 1.18.0), Brier, calibration (R glm on the cases)', () => {
      const e = record.evaluation;
      expect(e.auc.auc!).toBeCloseTo(r.auc, 10);
      expect(e.auc.lower!).toBeCloseTo(r.aucLower, 10);
      expect(e.auc.upper!).toBeCloseTo(r.aucUpper, 10);
      expect(e.brier.brier).toBeCloseTo(r.brier, 10);
      expect(e.calibration.interceptInTheLarge!.estimate).toBeCloseTo(r.citl, 6);
      expect(e.calibration.slope!.estimate).toBeCloseTo(r.slope, 6);
    });

    it('gives the Pearson χ² by covariate pattern as glm residuals (R 4.2.2 residuals(type = "pearson"))', () => {
      const g = record.layout!.goodnessOfFit!;
      expect(g.patterns).toBe(r.rows);
      expect(g.pearson).toBeCloseTo(r.pearsonChi2, 6);
      expect(g.deviance).toBeCloseTo(r.groupedDeviance, 6);
      expect(g.df).toBe(r.groupedDf);
    });
  });
}
