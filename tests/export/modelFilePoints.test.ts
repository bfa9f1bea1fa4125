import { describe, expect, it } from 'vitest';
import { generateDemo } from '../../src/engine/demo';
import { casePoints } from '../../src/engine/points';
import { pointsStep, runAnalysis } from '../../src/engine/workflow';
import { createModelFile, modelFileToJson } from '../../src/io/export/modelFile';
import { readModelFile } from '../../src/io/export/readModelFile';
import { expectFulcraError } from './expectFulcraError';

const ssi = generateDemo('ssi');

async function saved() {
  const { record } = await runAnalysis(ssi.dataset, { spec: ssi.spec, profile: false, termTests: false });
  const points = pointsStep(record, ssi.dataset, { baseUnit: { kind: 'per-increase', column: 'age', increase: 10 } });
  const info = { fulcraVersion: 'test', created: '2026-12-04T18:00:00Z' };
  return {
    points,
    withPoints: modelFileToJson(createModelFile(record.fit, { ...info, points: points.score })),
    without: modelFileToJson(createModelFile(record.fit, info)),
  };
}

describe('the points score in the model file', () => {
  it('round-trips: the score read back equals the one built, and scores a case the same', async () => {
    const { points, withPoints } = await saved();
    const back = readModelFile(withPoints);
    expect(back.points).toEqual(points.score);
    const values = { age: 71, bmi: 33, diabetes: 'yes', asa_class: 'III', wound_class: 'dirty', duration_min: 200 };
    const all = { ...values, prophylaxis: 'none', smoker: 'yes' };
    expect(casePoints(back.points!, all)).toEqual(casePoints(points.score, all));
  });

  it('keeps files without a points score readable (older files, or none built)', async () => {
    const { without } = await saved();
    expect(JSON.parse(without).points).toBeUndefined();
    expect(readModelFile(without).points).toBeUndefined();
  });

  it('names a damaged points table and a score that belongs to another model', async () => {
    const { withPoints } = await saved();
    const f = JSON.parse(withPoints);
    f.points.table[2].risk = 0.5;
    expectFulcraError(() => readModelFile(JSON.stringify(f)), 'model-file-invalid', /points\.table\[2\]\.risk/);
    const g = JSON.parse(withPoints);
    g.points.terms[0].term = 'height';
    g.points.terms[0].column = 'height';
    expectFulcraError(() => readModelFile(JSON.stringify(g)), 'model-file-invalid', /points\.terms\[0\]/);
    const h = JSON.parse(withPoints);
    h.points.event = 'no';
    expectFulcraError(() => readModelFile(JSON.stringify(h)), 'model-file-invalid', /points\.outcome/);
  });
});
