import { describe, expect, it } from 'vitest';
import type { Dataset, TermSpec } from '../../../src/engine/core';
import {
  commonRows,
  compareModels,
  comparedFromAnalysis,
  comparedFromFit,
  NRI_CAUTION,
  PAIRED_BRIER_METHOD,
  type ComparedModel,
} from '../../../src/engine/comparison';
import { runAnalysis, type AnalysisRequestInput } from '../../../src/engine/workflow';
import { readCsvDataset, readJson } from '../fit/helpers';

// Reference: tests/fixtures/reference/compare-models.json from compare-models.R — R 4.2.2 glm / anova(test = "LRT")
// / AIC / BIC, pROC 1.18.0 roc.test(method = "delong", paired = TRUE) and ci.auc(method = "delong"), and Brier,
// flag tables, NRI, net benefit and cost per 100 computed by hand in base R in the same script; MASS::birthwt.
const ref = readJson('tests/fixtures/reference/compare-models.json');
const birthwt = readCsvDataset('tests/fixtures/data/birthwt.csv', ['race']);

const term = (column: string): TermSpec =>
  column === 'race' ? { type: 'main', column, reference: '1' } : { type: 'main', column };
const request = (columns: string[], extra: Partial<AnalysisRequestInput> = {}): AnalysisRequestInput => ({
  spec: { outcome: 'low', event: '1', terms: columns.map(term) },
  profile: false,
  termTests: false,
  ...extra,
});

async function model(label: string, data: Dataset, columns: string[], extra: Partial<AnalysisRequestInput> = {}) {
  const { record, scores } = await runAnalysis(data, request(columns, extra));
  return comparedFromAnalysis(label, record, scores);
}

const SMALL = ['age', 'lwt', 'race', 'smoke'];
const LARGE = [...SMALL, 'ptl', 'ht', 'ui'];
const OTHER = ['lwt', 'ptl', 'ht', 'ui'];

describe('two nested maximum-likelihood models on MASS::birthwt', async () => {
  const r = ref.nested;
  const a = await model('Model A', birthwt, SMALL);
  const b = await model('Model B', birthwt, LARGE);
  const c = compareModels(a, b, { threshold: r.cutoff, costs: { missedCase: 4, falseAlarm: 1 } });

  it('gives the likelihood-ratio test of R anova(glm1, glm2, test = "LRT")', () => {
    expect(c.nesting.relation).toBe('a-within-b');
    const lr = c.nesting.lrTest!;
    expect(lr.chi2).toBeCloseTo(r.lr_chi2, 8); // R anova: Deviance
    expect(lr.df).toBe(r.lr_df); // R anova: Df
    expect(lr.p).toBeCloseTo(r.lr_p, 10); // R anova: Pr(>Chi)
    expect(lr).toMatchObject({ smaller: 'a', larger: 'b', addedTerms: ['ptl', 'ht', 'ui'] });
    expect(c.nesting.lrTestNote).toBeNull();
    expect(c.nesting.aicDifference).toBeCloseTo(r.aic_b - r.aic_a, 8); // R AIC
    expect(c.nesting.bicDifference).toBeCloseTo(r.bic_b - r.bic_a, 8); // R BIC
    expect(c.a.nonAliasedCoefficients).toBe(6);
    expect(c.b.nonAliasedCoefficients).toBe(9);
  });

  it('gives the AUCs and the paired DeLong test of pROC 1.18.0 roc.test(roc_b, roc_a, paired = TRUE)', () => {
    expect(c.auc.a.auc).toBeCloseTo(r.auc_a, 12); // pROC auc
    expect(c.auc.b.auc).toBeCloseTo(r.auc_b, 12);
    expect(c.auc.a.lower).toBeCloseTo(r.auc_a_lower, 10); // pROC ci.auc(method = "delong")
    expect(c.auc.b.upper).toBeCloseTo(r.auc_b_upper, 10);
    const d = c.auc.difference;
    expect(d.difference).toBeCloseTo(r.auc_difference, 12); // roc.test estimate[1] − estimate[2]
    expect(d.z).toBeCloseTo(r.auc_z, 9); // roc.test statistic Z
    expect(d.p).toBeCloseTo(r.auc_p, 10); // roc.test p.value
    expect(d.lower).toBeCloseTo(r.auc_lower, 10); // roc.test conf.int
    expect(d.upper).toBeCloseTo(r.auc_upper, 10);
    // nested models fitted on these rows: the DeLong test is flagged as the wrong question (Pepe et al. 2013)
    expect(c.warnings.map((w) => w.code)).toContain('compare-auc-test-nested');
  });

  it('gives the Brier scores and the paired difference computed by hand in R', () => {
    expect(c.brier.a.brier).toBeCloseTo(r.brier_a, 12);
    expect(c.brier.b.brier).toBeCloseTo(r.brier_b, 12);
    const d = c.brier.difference;
    expect(d.estimate).toBeCloseTo(r.brier_difference, 12); // mean of (y − p_b)² − (y − p_a)²
    expect(d.se!).toBeCloseTo(r.brier_se, 12); // sd / √n
    expect(d.lower!).toBeCloseTo(r.brier_lower, 12);
    expect(d.upper!).toBeCloseTo(r.brier_upper, 12);
    expect(d.p!).toBeCloseTo(r.brier_p, 10); // 2·pnorm(−|z|)
    expect(d.method).toBe(PAIRED_BRIER_METHOD);
  });

  it('gives calibration-in-the-large 0 and slope 1 on the fitting rows, as R glm(y ~ lp) and offset(lp)', () => {
    for (const [mine, theirs] of [
      [c.calibration.a, r.calibration_a],
      [c.calibration.b, r.calibration_b],
    ]) {
      expect(mine.slope!.estimate).toBeCloseTo(theirs.slope, 8);
      expect(mine.interceptInTheLarge!.estimate).toBeCloseTo(theirs.citl, 8);
    }
  });

  it('gives the flag tables and the net reclassification improvement at the cut-off computed by hand in R', () => {
    const rc = c.reclassification!;
    expect(rc.threshold).toBe(0.3);
    expect(rc.thresholdSource).toBe('given');
    expect(rc.events).toEqual(r.events_table);
    expect(rc.nonEvents).toEqual(r.non_events_table);
    expect(rc.all).toEqual(r.all_table);
    expect(rc.eventNri).toBeCloseTo(r.event_nri, 14);
    expect(rc.nonEventNri).toBeCloseTo(r.non_event_nri, 14);
    expect(rc.nri).toBeCloseTo(r.event_nri + r.non_event_nri, 14);
    expect(rc.caution).toBe(NRI_CAUTION);
    expect(rc.caution).toMatch(/easily misread/);
  });

  it('gives the net benefit of each and the difference, as computed by hand in R', () => {
    const nb = compareModels(a, b, { threshold: 0.3, grid: Float64Array.from(r.nb_thresholds) }).netBenefit;
    for (let k = 0; k < r.nb_thresholds.length; k++) {
      expect(nb.a[k]).toBeCloseTo(r.nb_a[k], 14);
      expect(nb.b[k]).toBeCloseTo(r.nb_b[k], 14);
      expect(nb.difference[k]).toBeCloseTo(r.nb_b[k] - r.nb_a[k], 14);
      // treat all: prevalence − (1 − prevalence)·t/(1 − t), Vickers & Elkin 2006
      const t = r.nb_thresholds[k];
      expect(nb.treatAll[k]).toBeCloseTo(59 / 189 - (130 / 189) * (t / (1 - t)), 14);
    }
    expect(c.netBenefit.thresholds).toHaveLength(99);
  });

  it('takes the decision-theory cut-off of the costs when no cut-off is given, with cost per 100 as in R', () => {
    const byCosts = compareModels(a, b, { costs: { missedCase: 4, falseAlarm: 1 } }).reclassification!;
    expect(byCosts.threshold).toBeCloseTo(r.cost_threshold, 15); // 1/(1 + 4)
    expect(byCosts.thresholdSource).toBe('costs');
    expect(byCosts.costPer100!.a).toBeCloseTo(r.cost100_a, 12);
    expect(byCosts.costPer100!.b).toBeCloseTo(r.cost100_b, 12);
    expect(byCosts.costPer100!.difference).toBeCloseTo(r.cost100_b - r.cost100_a, 12);
  });

  it('shows no tables without a cut-off or costs, and says so in a coded warning', () => {
    const none = compareModels(a, b);
    expect(none.reclassification).toBeNull();
    expect(none.warnings.map((w) => w.code)).toContain('compare-no-cut-off');
  });

  it('is a structured-clone-safe record', () => {
    expect(structuredClone(c)).toEqual(c);
  });

  it('gives the same record from the material rebuilt from the fit on the data', async () => {
    const { record } = await runAnalysis(birthwt, request(LARGE));
    const rebuilt = compareModels(a, comparedFromFit('Model B', record.fit, birthwt), { threshold: 0.3 });
    expect(rebuilt.auc.difference.z).toBeCloseTo(r.auc_z, 9); // pROC roc.test statistic
    expect(rebuilt.nesting.lrTest!.chi2).toBeCloseTo(r.lr_chi2, 8); // R anova Deviance
  });
});

describe('two models that are not nested on MASS::birthwt', async () => {
  const r = ref.not_nested;
  const a = await model('Model A', birthwt, SMALL);
  const b = await model('Model B', birthwt, OTHER);
  const c = compareModels(a, b, { threshold: r.cutoff });

  it('says plainly that they are not nested, gives no LR test and the AIC / BIC of R', () => {
    expect(c.nesting.relation).toBe('not-nested');
    expect(c.nesting.lrTest).toBeNull();
    expect(c.nesting.explanation).toMatch(/not nested/);
    expect(c.nesting.explanation).toMatch(/AIC and BIC/);
    expect(c.a.aic).toBeCloseTo(r.aic_a, 8); // R AIC
    expect(c.b.aic).toBeCloseTo(r.aic_b, 8);
    expect(c.a.bic).toBeCloseTo(r.bic_a, 8); // R BIC
    expect(c.b.bic).toBeCloseTo(r.bic_b, 8);
    expect(c.warnings.map((w) => w.code)).not.toContain('compare-auc-test-nested');
  });

  it('gives the paired DeLong test of pROC 1.18.0 roc.test and the hand-computed Brier difference and NRI', () => {
    expect(c.auc.difference.difference).toBeCloseTo(r.auc_difference, 12); // roc.test estimates
    expect(c.auc.difference.z).toBeCloseTo(r.auc_z, 9); // roc.test statistic
    expect(c.auc.difference.p).toBeCloseTo(r.auc_p, 10); // roc.test p.value
    expect(c.auc.difference.lower).toBeCloseTo(r.auc_lower, 10); // roc.test conf.int
    expect(c.auc.difference.upper).toBeCloseTo(r.auc_upper, 10);
    expect(c.brier.difference.estimate).toBeCloseTo(r.brier_difference, 12); // by hand in R
    expect(c.brier.difference.se!).toBeCloseTo(r.brier_se, 12);
    expect(c.reclassification!.events).toEqual(r.events_table); // by hand in R
    expect(c.reclassification!.nonEvents).toEqual(r.non_events_table);
    expect(c.reclassification!.eventNri).toBeCloseTo(r.event_nri, 14);
    expect(c.reclassification!.nonEventNri).toBeCloseTo(r.non_event_nri, 14);
  });
});

describe('models fitted on different rows', async () => {
  const r = ref.missing_rows;
  // age missing on spreadsheet rows 4, 11 and 26 (data rows 2, 9, 24), as in compare-models.R
  const ageCol = birthwt.columns.find((col) => col.name === 'age')!;
  const age = Float64Array.from(ageCol.kind === 'numeric' ? ageCol.values : []);
  for (const i of [2, 9, 24]) age[i] = NaN;
  const data: Dataset = {
    ...birthwt,
    columns: birthwt.columns.map((col) => (col.name === 'age' ? { ...col, values: age } : col)),
  };
  const a = await model('Model A', data, ['lwt', 'smoke']);
  const b = await model('Model B', data, ['age', 'lwt', 'smoke']);

  it('are refused with how many rows each used, how many are common, which differ, and the fix', () => {
    let caught: unknown;
    try {
      compareModels(a, b, { threshold: 0.3 });
    } catch (e) {
      caught = e;
    }
    const e = caught as { code: string; message: string; suggestion: string };
    expect(e.code).toBe('compare-different-rows');
    expect(e.message).toMatch(/Model A used 189 rows, Model B used 186 rows, and 186 rows are common to both/);
    expect(e.message).toMatch(/3 rows only by Model A \(spreadsheet rows 4, 11, 26\)/);
    expect(e.message).toMatch(/no row is used only by Model B/);
    expect(e.suggestion).toMatch(/Refit both models on the 186 common rows/);
  });

  it('name the common rows and the rows to leave out; so refitted, they compare as R does on them', async () => {
    const common = commonRows(a, b);
    expect(common).toMatchObject({ usedByA: 189, usedByB: 186, common: 186, onlyB: [] });
    expect(common.leaveOut).toEqual(r.age_missing_sheet_rows); // spreadsheet rows where R's age is NA
    expect(common.dataRows).toEqual(b.rowsUsed);
    const a2 = await model('Model A', data, ['lwt', 'smoke'], { leaveOut: common.leaveOut });
    const b2 = await model('Model B', data, ['age', 'lwt', 'smoke'], { leaveOut: common.leaveOut });
    const c = compareModels(a2, b2, { threshold: r.cutoff });
    expect(c.n).toBe(r.n);
    expect(c.nesting.lrTest!.chi2).toBeCloseTo(r.lr_chi2, 8); // R anova(test = "LRT") on the common rows
    expect(c.nesting.lrTest!.df).toBe(r.lr_df);
    expect(c.nesting.lrTest!.p).toBeCloseTo(r.lr_p, 10);
    expect(c.auc.difference.z).toBeCloseTo(r.auc_z, 9); // pROC roc.test statistic
    expect(c.reclassification!.all).toEqual(r.all_table); // by hand in R
  });

  it('lists the rows by the dataset’s own spreadsheet numbering', () => {
    const common = commonRows(a, b, { firstRow: 5 });
    expect(common.leaveOut).toEqual([7, 14, 29]);
  });
});

describe('nesting without a likelihood-ratio test', async () => {
  const small = await model('Model A', birthwt, SMALL);
  const largeFirth = await model('Model B', birthwt, LARGE, { method: 'firth' });

  it("explains why Firth's penalised fits get no LR test", () => {
    const c = compareModels(small, largeFirth, { threshold: 0.3 });
    expect(c.nesting.relation).toBe('a-within-b');
    expect(c.nesting.lrTest).toBeNull();
    expect(c.nesting.lrTestNote).toMatch(/Model B was fitted by Firth's penalised likelihood/);
    expect(c.nesting.lrTestNote).toMatch(/penalty differs between the two models/);
  });

  it('says when the two models have the same terms', () => {
    const c = compareModels(small, { ...small, label: 'Model B' }, { threshold: 0.3 });
    expect(c.nesting.relation).toBe('same-terms');
    expect(c.nesting.lrTest).toBeNull();
    expect(c.auc.difference.warnings.map((w) => w.code)).toContain('auc-difference-zero-variance');
  });

  it('finds a numeric term nested in a spline of the same column, and refuses a different outcome', async () => {
    const spline = await runAnalysis(
      birthwt,
      request([], {
        spec: { outcome: 'low', event: '1', terms: [{ type: 'spline', column: 'lwt', knots: 4 }, term('smoke')] },
      }),
    );
    const linear = await model('Model A', birthwt, ['lwt', 'smoke']);
    const c = compareModels(linear, comparedFromAnalysis('Model B', spline.record, spline.scores), { threshold: 0.3 });
    expect(c.nesting.relation).toBe('a-within-b');
    expect(c.nesting.lrTest!.df).toBe(2); // a 4-knot spline adds 2 columns to the linear term
    const other: ComparedModel = {
      ...linear,
      label: 'Model C',
      fit: { ...linear.fit, recipe: { ...linear.fit.recipe, event: '0' } },
    };
    expect(() => compareModels(linear, other)).toThrow(/different outcomes/);
  });
});

describe('a larger model whose added term is aliased', async () => {
  // lwt2 = 2·lwt: a linear combination of a column the smaller model already has (definition of aliasing)
  const lwt = birthwt.columns.find((col) => col.name === 'lwt')!;
  const lwt2 = Float64Array.from(lwt.kind === 'numeric' ? lwt.values : [], (v) => 2 * v);
  const data: Dataset = {
    ...birthwt,
    columns: [...birthwt.columns, { kind: 'numeric', name: 'lwt2', values: lwt2 }],
  };
  const a = await model('Model A', data, ['lwt', 'smoke']);
  const b = await model('Model B', data, ['lwt', 'smoke', 'lwt2']);

  it('is nested but gets no likelihood-ratio test, with the reason', () => {
    const c = compareModels(a, b, { threshold: 0.3 });
    expect(c.nesting.relation).toBe('a-within-b');
    expect(c.b.nonAliasedCoefficients).toBe(c.a.nonAliasedCoefficients);
    expect(c.nesting.lrTest).toBeNull();
    expect(c.nesting.lrTestNote).toMatch(/no more estimated \(non-aliased\) coefficients/);
  });
});
