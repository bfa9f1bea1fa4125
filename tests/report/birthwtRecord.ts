// A real Fulcra fit of MASS::birthwt (tests/fixtures/data/birthwt.csv, exported from R's MASS by
// tests/fixtures/reference/fit-birthwt.R; Hosmer & Lemeshow 1989) with every record a report carries:
// fit(), evaluate(), bootstrapValidation() (B = 20 to keep the test short) and riley2020SampleSize().
import { readFileSync } from 'node:fs';
import type { Dataset } from '../../src/engine/core/data';
import type { ModelSpec } from '../../src/engine/core/model';
import { fit } from '../../src/engine/fitting/fit';
import { predict } from '../../src/engine/fitting/predict';
import { evaluate } from '../../src/engine/evaluation/evaluate';
import { bootstrapValidation } from '../../src/engine/validation/bootstrap';
import { riley2020SampleSize } from '../../src/engine/evaluation/sampleSize';
import { datasetChecksum } from '../../src/io/export/checksum';
import { reportInputFromRecords } from '../../src/report/fromEngine';
import type { ReportInput } from '../../src/report/reportInput';
import { FULCRA_VERSION } from '../../src/report/version';

export function loadBirthwt(): Dataset {
  const lines = readFileSync('tests/fixtures/data/birthwt.csv', 'utf8').trim().split(/\r?\n/);
  const header = lines[0].split(',').map((h) => h.replace(/"/g, ''));
  const rows = lines.slice(1).map((l) => l.split(',').map(Number));
  const col = (name: string) => Float64Array.from(rows.map((r) => r[header.indexOf(name)]));
  const num = (name: string) => ({ kind: 'numeric' as const, name, values: col(name) });
  return {
    nRows: rows.length,
    columns: [
      num('low'),
      num('age'),
      num('lwt'),
      { kind: 'categorical', name: 'race', levels: ['1', '2', '3'], codes: Int32Array.from(col('race'), (r) => r - 1) },
      num('smoke'),
      num('ptl'),
      num('ht'),
      num('ui'),
      num('bwt'),
    ],
  };
}

/** Hosmer & Lemeshow's main-effects model for low birth weight. */
export const birthwtSpec: ModelSpec = {
  outcome: 'low',
  event: '1',
  terms: ['age', 'lwt', 'race', 'smoke', 'ptl', 'ht', 'ui'].map((column) =>
    column === 'race' ? { type: 'main', column, reference: '1' } : { type: 'main', column },
  ),
};

/** A model with every kind of term: spline, categorical, numeric, categorical×numeric and numeric×numeric. */
export const birthwtRichSpec: ModelSpec = {
  outcome: 'low',
  event: '1',
  terms: [
    { type: 'spline', column: 'age', knots: 4 },
    { type: 'main', column: 'lwt' },
    { type: 'main', column: 'race', reference: '1' },
    { type: 'main', column: 'smoke' },
    { type: 'interaction', columns: ['smoke', 'race'] },
    { type: 'interaction', columns: ['age', 'lwt'] },
  ],
};

export const COSTS = { missedCase: 5, falseAlarm: 1 };

export async function birthwtReportInput(spec: ModelSpec = birthwtSpec): Promise<ReportInput> {
  const data = loadBirthwt();
  const result = fit(data, spec);
  const pred = predict(result, data);
  const y = Float64Array.from(pred.rowsUsed, (r) => (data.columns[0] as { values: Float64Array }).values[r]);
  const evaluation = evaluate(y, pred.risk, { eta: pred.eta, costs: COSTS });
  const validation = await bootstrapValidation(
    { data, spec, fitOptions: { profile: false }, penalty: null, seed: 20261202 },
    { B: 20, seed: 20261202 },
  );
  const sampleSize = riley2020SampleSize({
    parameters: result.parameters,
    outcomeProportion: result.events / result.nUsed,
    actual: { n: result.nUsed, events: result.events },
  });
  return reportInputFromRecords({
    meta: {
      fulcraVersion: FULCRA_VERSION,
      created: '2026-12-02T01:30:00Z',
      seed: 20261202,
      dataChecksum: datasetChecksum(data),
    },
    source: { fileName: 'birthwt.csv', rows: data.nRows, columns: data.columns.length, dateRange: null },
    freeText: {
      purpose:
        'Flag pregnancies at high risk of a low birth weight (< 2.5 kg) at booking ' +
        'so that extra antenatal review can be offered.',
      setting: 'Baystate Medical Center, Springfield, Massachusetts, 1986 (the MASS::birthwt data).',
      population: 'Mothers delivering at the centre; 189 births.',
    },
    fit: result,
    evaluation,
    validation,
    sampleSize,
    costs: COSTS,
    thresholdRule: 'decision-theory threshold C_FP / (C_FP + C_FN) = 1/6',
  });
}
