import { expectFulcraError } from './expectFulcraError';
import { deleteAt, getAt, setAt } from './editJson';
import { describe, expect, it } from 'vitest';
import { fit } from '../../src/engine/fitting/fit';
import { predict } from '../../src/engine/fitting/predict';
import { datasetChecksum } from '../../src/io/export/checksum';
import {
  createModelFile,
  MODEL_FILE_VERSION,
  modelFileToFitResult,
  modelFileToJson,
} from '../../src/io/export/modelFile';
import { readModelFile } from '../../src/io/export/readModelFile';
import { birthwtRichSpec, loadBirthwt } from '../report/birthwtRecord';

const data = loadBirthwt();
const result = fit(data, birthwtRichSpec);
const saved = () =>
  modelFileToJson(
    createModelFile(result, {
      fulcraVersion: '0.1.0',
      created: '2026-12-02T01:40:00Z',
      dataChecksum: datasetChecksum(data),
      fileName: 'birthwt.csv',
      rows: data.nRows,
      performance: { auc: 0.708 },
      threshold: { value: 1 / 6, costMissedCase: 5, costFalseAlarm: 1 },
      notes: { purpose: 'audit' },
    }),
  );

describe('model file', () => {
  it('round-trips birthwt with splines and interactions: the same predictions (bit for bit) and intervals', () => {
    const reopened = modelFileToFitResult(readModelFile(saved()));
    const a = predict(result, data);
    const b = predict(reopened, data);
    expect(b.rowsUsed).toEqual(a.rowsUsed);
    expect(Array.from(b.risk)).toEqual(Array.from(a.risk));
    expect(Array.from(b.lower)).toEqual(Array.from(a.lower));
    expect(Array.from(b.upper)).toEqual(Array.from(a.upper));
  });

  it('keeps the schema fields: version, recipe, coefficients, covariance, training, threshold, checksum', () => {
    const f = JSON.parse(saved());
    expect(f.fulcraModel).toBe(MODEL_FILE_VERSION);
    expect(f.recipe).toEqual(result.recipe);
    expect(f.coefficients.map((c: { estimate: number }) => c.estimate)).toEqual(
      result.coefficients.map((c) => c.estimate),
    );
    expect(f.covariance).toEqual(result.covariance);
    expect(f.fit.nUsed).toBe(189);
    expect(f.fit.events).toBe(59);
    expect(f.training).toEqual({ fileName: 'birthwt.csv', rows: 189, performance: { auc: 0.708 } });
    expect(f.threshold).toEqual({ value: 1 / 6, costMissedCase: 5, costFalseAlarm: 1 });
    expect(f.dataChecksum).toBe(datasetChecksum(data));
    expect(f.created).toBe('2026-12-02T01:40:00Z');
  });

  it('reads a file saved before the one cost vocabulary (costFalseNegative / costFalsePositive)', () => {
    const old = saved()
      .replace('"costMissedCase": 5', '"costFalseNegative": 5')
      .replace('"costFalseAlarm": 1', '"costFalsePositive": 1');
    expect(old).toContain('"costFalsePositive": 1');
    expect(readModelFile(old).threshold).toEqual({ value: 1 / 6, costMissedCase: 5, costFalseAlarm: 1 });
  });

  it('refuses another schema version, and a workspace file, with a clear message', () => {
    const f = JSON.parse(saved());
    f.fulcraModel = 2;
    expectFulcraError(
      () => readModelFile(JSON.stringify(f)),
      'model-file-version',
      /schema version 2; this Fulcra reads version 1/,
    );
    expectFulcraError(
      () => readModelFile('{"fulcraWorkspace":1}'),
      'model-file-version',
      /not a Fulcra model file.*workspace file/,
    );
  });

  it('names the missing or wrong field', () => {
    const cases: [(f: unknown) => void, RegExp][] = [
      [(f) => deleteAt(f, ['recipe']), /"recipe" is missing/],
      [(f) => setAt(f, ['coefficients', 2, 'estimate'], 'x'), /"coefficients\[2\]\.estimate" must be a number/],
      [
        (f) => (getAt(f, ['coefficients']) as unknown[]).pop(),
        /"coefficients" has 10 rows but recipe\.columnNames has 11/,
      ],
      [
        (f) => setAt(f, ['recipe', 'terms', 2, 'reference'], '9'),
        /"recipe\.terms\[2\]\.reference" \("9"\) is not one of the levels/,
      ],
      [(f) => setAt(f, ['covariance'], [1, 2]), /"covariance" must have 121 entries/],
      [
        (f) => setAt(f, ['fit', 'method'], 'boosted'),
        /"fit\.method" must be one of ml, ridge, firth, lasso, elastic-net/,
      ],
    ];
    for (const [edit, message] of cases) {
      const f = JSON.parse(saved());
      edit(f);
      expectFulcraError(() => readModelFile(JSON.stringify(f)), 'model-file-invalid', message);
    }
    expectFulcraError(() => readModelFile('{"fulcraModel": 1, '), 'model-file-invalid', /not valid JSON/);
  });

  it('refuses to save a model with a non-finite coefficient', () => {
    const bad = {
      ...result,
      coefficients: result.coefficients.map((c, j) => (j === 1 ? { ...c, estimate: Infinity } : c)),
    };
    expectFulcraError(() => createModelFile(bad, { fulcraVersion: '0.1.0' }), 'model-not-finite', /"age" is Infinity/);
  });
});
