import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import type { Dataset } from '../../src/engine/core/data';
import type { ModelSpec } from '../../src/engine/core/model';
import { fit } from '../../src/engine/fitting/fit';
import { predict } from '../../src/engine/fitting/predict';
import { createModelFile, modelFileToFitResult, modelFileToJson } from '../../src/io/export/modelFile';
import { readModelFile } from '../../src/io/export/readModelFile';
import { modelToPmml } from '../../src/io/export/pmml';
import { loadBirthwt } from '../report/birthwtRecord';
import { parseXml, pmmlScorer, rowOf } from './pmmlEvaluator';

// R 4.2.2 glm(low ~ age + lwt + race + smoke + smoke:race + age:lwt, binomial) on MASS::birthwt:
// fitted() and predict(newdata, type = "response"), from tests/fixtures/export/export-birthwt.R
const ref = JSON.parse(readFileSync('tests/fixtures/export/export-birthwt.json', 'utf8'));

const spec: ModelSpec = {
  outcome: 'low',
  event: '1',
  terms: [
    { type: 'main', column: 'age' },
    { type: 'main', column: 'lwt' },
    { type: 'main', column: 'race', reference: '1' },
    { type: 'main', column: 'smoke' },
    { type: 'interaction', columns: ['smoke', 'race'] },
    { type: 'interaction', columns: ['age', 'lwt'] },
  ],
};

const data = loadBirthwt();
const newData: Dataset = {
  nRows: ref.newdata.age.length,
  columns: [
    { kind: 'numeric', name: 'age', values: Float64Array.from(ref.newdata.age) },
    { kind: 'numeric', name: 'lwt', values: Float64Array.from(ref.newdata.lwt) },
    {
      kind: 'categorical',
      name: 'race',
      levels: ['1', '2', '3'],
      codes: Int32Array.from(ref.newdata.race as string[], (r) => Number(r) - 1),
    },
    { kind: 'numeric', name: 'smoke', values: Float64Array.from(ref.newdata.smoke) },
  ],
};

const maxAbs = (a: ArrayLike<number>, b: ArrayLike<number>) => {
  expect(a.length).toBe(b.length);
  let m = 0;
  for (let i = 0; i < a.length; i++) m = Math.max(m, Math.abs(a[i] - b[i]));
  return m;
};

describe('scoring with exported models reproduces R glm() risks on birthwt', () => {
  const result = fit(data, spec);
  const reopened = modelFileToFitResult(
    readModelFile(modelFileToJson(createModelFile(result, { fulcraVersion: '0.1.0' }))),
  );
  const scorer = pmmlScorer(parseXml(modelToPmml(result, { fulcraVersion: '0.1.0', created: '2026-12-02T02:00:00Z' })));

  it("a re-opened model file gives R's fitted risks (max error < 1e-9) and R's predict() on new cases", () => {
    expect(maxAbs(predict(reopened, data).risk, ref.fitted)).toBeLessThan(1e-9);
    const p = predict(reopened, newData);
    expect(p.rowsUsed.length).toBe(newData.nRows);
    expect(maxAbs(p.risk, ref.newdata_risk)).toBeLessThan(1e-9);
  });

  it('the PMML evaluator gives R\u2019s predict() risks on new cases (max error < 1e-9)', () => {
    const risks = Array.from({ length: newData.nRows }, (_, r) => scorer.risk(rowOf(newData, r)));
    expect(maxAbs(risks, ref.newdata_risk)).toBeLessThan(1e-9);
  });
});
