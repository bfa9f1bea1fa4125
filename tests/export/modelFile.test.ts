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
import { readCsvDataset } from '../engine/fit/helpers';

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

  describe('endometrial (NV separates HG)', () => {
    const endo = readCsvDataset('tests/fixtures/data/endometrial.csv');
    const spec = { outcome: 'HG', terms: ['NV', 'PI', 'EH'].map((c) => ({ type: 'main' as const, column: c })) };
    const reopen = (r: ReturnType<typeof fit>) =>
      modelFileToFitResult(readModelFile(modelFileToJson(createModelFile(r, { fulcraVersion: '0.1.0' }))));
    const flags = (r: ReturnType<typeof fit>) =>
      r.coefficients.map((c) => [c.profileLowerUnbounded, c.profileUpperUnbounded]);

    it("round-trips a Firth fit's penalised log-likelihood, test likelihood and profile-limit flags", () => {
      const firth = fit(endo, spec, { method: 'firth' });
      expect(firth.testLikelihood).toBe('penalised');
      expect(typeof firth.penalisedLogLik).toBe('number');
      const reopened = reopen(firth);
      expect(reopened.penalisedLogLik).toBe(firth.penalisedLogLik);
      expect(reopened.testLikelihood).toBe('penalised');
      // Firth's limits for NV are finite (brglm2: 0.61 to 7.85), so every flag is false.
      expect(flags(reopened)).toEqual(flags(firth));
      expect(
        flags(reopened)
          .flat()
          .every((x) => x === false),
      ).toBe(true);
    });

    it("round-trips NV's unbounded upper profile limit (ML, where NV diverges)", () => {
      const ml = fit(endo, spec, { method: 'ml' });
      const nv = ml.coefficients.findIndex((c) => c.name === 'NV');
      expect(ml.coefficients[nv].profileUpperUnbounded).toBe(true);
      const reopened = reopen(ml);
      expect(reopened.coefficients[nv].profileUpperUnbounded).toBe(true);
      expect(reopened.coefficients[nv].profileUpper).toBeNull();
      expect(flags(reopened)).toEqual(flags(ml));
      expect(reopened.testLikelihood).toBe('ordinary');
      expect(reopened.penalisedLogLik).toBeNull();
    });
  });

  it('reads a file saved before penalisedLogLik, testLikelihood and the unbounded-limit flags', () => {
    const f = JSON.parse(saved());
    deleteAt(f, ['fit', 'penalisedLogLik']);
    deleteAt(f, ['fit', 'testLikelihood']);
    for (const k of f.coefficients) {
      delete k.profileLowerUnbounded;
      delete k.profileUpperUnbounded;
    }
    const text = JSON.stringify(f);
    expect(text).not.toMatch(/penalisedLogLik|testLikelihood|Unbounded/);
    const reopened = modelFileToFitResult(readModelFile(text));
    expect(reopened.penalisedLogLik).toBeUndefined();
    expect(reopened.testLikelihood).toBeUndefined();
    expect(reopened.coefficients.every((c) => c.profileUpperUnbounded === undefined)).toBe(true);
    expect(reopened.coefficients.map((c) => c.estimate)).toEqual(result.coefficients.map((c) => c.estimate));
  });

  it('names a new optional field of the wrong type', () => {
    const cases: [(f: unknown) => void, RegExp][] = [
      [(f) => setAt(f, ['fit', 'penalisedLogLik'], 'x'), /"fit\.penalisedLogLik" must be a number/],
      [(f) => setAt(f, ['fit', 'testLikelihood'], 'firth'), /"fit\.testLikelihood" must be one of ordinary, penalised/],
      [
        (f) => setAt(f, ['coefficients', 1, 'profileUpperUnbounded'], 1),
        /"coefficients\[1\]\.profileUpperUnbounded" must be true or false/,
      ],
    ];
    for (const [edit, message] of cases) {
      const f = JSON.parse(saved());
      edit(f);
      expectFulcraError(() => readModelFile(JSON.stringify(f)), 'model-file-invalid', message);
    }
  });

  it('refuses to save a model with a non-finite coefficient', () => {
    const bad = {
      ...result,
      coefficients: result.coefficients.map((c, j) => (j === 1 ? { ...c, estimate: Infinity } : c)),
    };
    expectFulcraError(() => createModelFile(bad, { fulcraVersion: '0.1.0' }), 'model-not-finite', /"age" is Infinity/);
  });
});
