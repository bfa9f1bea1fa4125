import { describe, expect, it } from 'vitest';
import { parseFitArgs } from '../../src/cli/args';
import { toJson } from '../../src/cli/json';
import { runFit } from '../../src/cli/runFit';
import { summarise } from '../../src/cli/summary';
import { FulcraError } from '../../src/engine/core/data';
import { readJson } from '../engine/fit/helpers';

// Reference: tests/fixtures/reference/compare-models.json (compare-models.R: R 4.2.2 anova(glm_small, glm_large,
// test = "LRT") and pROC 1.18.0 roc.test(paired = TRUE, method = "delong") on MASS::birthwt).
const ref = readJson('tests/fixtures/reference/compare-models.json');

describe('npm run fit --compare-with', () => {
  it('parses the predictors and refuses an empty list', () => {
    const a = parseFitArgs(['d.csv', '--outcome', 'y', '--compare-with', 'age, asa ,sex']);
    expect(a.compareWith).toEqual(['age', 'asa', 'sex']);
    expect(() => parseFitArgs(['d.csv', '--outcome', 'y', '--compare-with', ','])).toThrow(FulcraError);
    expect(() => parseFitArgs(['d.csv', '--outcome', 'y', '--compare-with', ','])).toThrow(/needs predictor columns/);
  });

  it('compares the main model with the second: R anova LR test and pROC paired DeLong in the record', async () => {
    const argv = [
      'tests/fixtures/data/birthwt.csv',
      '--outcome',
      'low',
      '--predictors',
      'age,lwt,race,smoke,ptl,ht,ui',
      '--categorical',
      'race',
      '--reference',
      'race=1',
      '--no-profile',
      '--no-term-tests',
      '--threshold',
      String(ref.nested.cutoff),
      '--compare-with',
      'age,lwt,race,smoke',
    ];
    const run = await runFit(parseFitArgs(argv), argv, 'test');
    const c = run.comparison!;
    expect(c.predictors).toEqual(['age', 'lwt', 'race', 'smoke']);
    expect(c.refittedOnCommonRows).toBeNull();
    expect(c.outcome.status).toBe('compared');
    if (c.outcome.status !== 'compared') return;
    const cmp = c.outcome.comparison;
    expect(cmp.nesting.relation).toBe('b-within-a');
    expect(cmp.nesting.lrTest!.chi2).toBeCloseTo(ref.nested.lr_chi2, 8); // R anova: Deviance
    expect(cmp.nesting.lrTest!.p).toBeCloseTo(ref.nested.lr_p, 10); // R anova: Pr(>Chi)
    // The main model is a (the larger one here): pROC's difference of large − small is a − b.
    expect(cmp.auc.a.auc).toBeCloseTo(ref.nested.auc_b, 12); // pROC auc of the larger model
    expect(cmp.auc.b.auc).toBeCloseTo(ref.nested.auc_a, 12); // pROC auc of the smaller model
    expect(cmp.reclassification!.threshold).toBe(ref.nested.cutoff);

    const json = JSON.parse(toJson(run));
    expect(json.comparison.outcome.comparison.nesting.lrTest.df).toBe(ref.nested.lr_df);
    const text = summarise(run);
    expect(text).toContain('Model B has the predictors age, lwt, race, smoke');
    expect(text).toMatch(/Likelihood-ratio test of Model B within Model A \(adds ptl, ht, ui\): χ² = 13\.15 on 3 df/);
    expect(text).toMatch(/paired DeLong test p = /);
  }, 60_000);
});
