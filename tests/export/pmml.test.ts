import { describe, expect, it } from 'vitest';
import { fit } from '../../src/engine/fitting/fit';
import { predict } from '../../src/engine/fitting/predict';
import { FulcraError, type Dataset } from '../../src/engine/core/data';
import { modelToPmml } from '../../src/io/export/pmml';
import { birthwtRichSpec, birthwtSpec, loadBirthwt } from '../report/birthwtRecord';
import { kid, kids, parseXml, pmmlScorer, rowOf } from './pmmlEvaluator';

const data = loadBirthwt();
const opts = { fulcraVersion: '0.1.0', created: '2026-12-02T01:45:00Z' };

describe('PMML 4.4 export', () => {
  const result = fit(data, birthwtRichSpec);
  const xml = modelToPmml(result, opts);
  const doc = parseXml(xml);

  it('is well-formed PMML 4.4 with the RegressionModel structure the standard asks for', () => {
    expect(doc.tag).toBe('PMML');
    expect(doc.attrs).toMatchObject({ xmlns: 'http://www.dmg.org/PMML-4_4', version: '4.4' });
    expect(doc.children.map((c) => c.tag)).toEqual([
      'Header',
      'DataDictionary',
      'TransformationDictionary',
      'RegressionModel',
    ]);
    expect(kid(kid(doc, 'Header'), 'Application').attrs).toEqual({ name: 'Fulcra', version: '0.1.0' });
    const dd = kid(doc, 'DataDictionary');
    const fields = kids(dd, 'DataField');
    expect(Number(dd.attrs.numberOfFields)).toBe(fields.length);
    expect(fields.map((f) => f.attrs.name).sort()).toEqual(['age', 'low', 'lwt', 'race', 'smoke']);
    expect(fields.find((f) => f.attrs.name === 'race')!.children.map((v) => v.attrs.value)).toEqual(['1', '2', '3']);
    const model = kid(doc, 'RegressionModel');
    expect(model.attrs).toMatchObject({ functionName: 'classification', normalizationMethod: 'logit' });
    expect(model.children.map((c) => c.tag)).toEqual(['MiningSchema', 'Output', 'RegressionTable', 'RegressionTable']);
    const mining = kids(kid(model, 'MiningSchema'), 'MiningField');
    expect(mining.find((f) => f.attrs.usageType === 'target')!.attrs.name).toBe('low');
    expect(new Set(mining.map((f) => f.attrs.name))).toEqual(new Set(fields.map((f) => f.attrs.name)));
    const [t1, t2] = kids(model, 'RegressionTable');
    expect(t1.attrs.targetCategory).toBe('1');
    expect(t2.attrs).toEqual({ intercept: '0', targetCategory: '0' });
    const order = t1.children.map((c) => c.tag);
    expect(order).toEqual(
      [...order].sort(
        (a, b) =>
          ['NumericPredictor', 'CategoricalPredictor', 'PredictorTerm'].indexOf(a) -
          ['NumericPredictor', 'CategoricalPredictor', 'PredictorTerm'].indexOf(b),
      ),
    );
    expect(kids(t1, 'CategoricalPredictor').map((c) => `${c.attrs.name}=${c.attrs.value}`)).toEqual([
      'race=2',
      'race=3',
    ]);
    expect(kids(t1, 'PredictorTerm').map((c) => c.children.map((f) => f.attrs.field).join('*'))).toEqual([
      'smoke*race=2',
      'smoke*race=3',
      'age*lwt',
    ]);
    const derived = kids(kid(doc, 'TransformationDictionary'), 'DerivedField').map((d) => d.attrs.name);
    expect(derived).toEqual(["age'", "age''", 'race=2', 'race=3']);
    // every referenced field is declared
    const declared = new Set([...fields.map((f) => f.attrs.name), ...derived]);
    const refs = [...xml.matchAll(/<(?:FieldRef|NormDiscrete) field="([^"]*)"/g)].map((m) => m[1]);
    expect(refs.length).toBe(14); // 2 spline columns × 3 cubes + 3 products × 2 factors + 2 indicators
    for (const f of refs) expect(declared.has(f), f).toBe(true);
    for (const p of [...kids(t1, 'NumericPredictor'), ...kids(t1, 'CategoricalPredictor')])
      expect(declared.has(p.attrs.name)).toBe(true);
  });

  it('scores birthwt (spline, categorical, interactions) to Fulcra\u2019s risks within 1e-12', () => {
    const { risk } = pmmlScorer(doc);
    const pred = predict(result, data);
    let maxErr = 0;
    pred.rowsUsed.forEach((r, i) => (maxErr = Math.max(maxErr, Math.abs(risk(rowOf(data, r)) - pred.risk[i]))));
    expect(pred.rowsUsed.length).toBe(189);
    expect(maxErr).toBeLessThan(1e-12);
  });

  it('scores the main-effects model (no transformations) to Fulcra\u2019s risks within 1e-12', () => {
    const simple = fit(data, birthwtSpec);
    const sdoc = parseXml(modelToPmml(simple, opts));
    expect(kids(sdoc, 'TransformationDictionary')).toHaveLength(0);
    const { risk } = pmmlScorer(sdoc);
    const pred = predict(simple, data);
    let maxErr = 0;
    pred.rowsUsed.forEach((r, i) => (maxErr = Math.max(maxErr, Math.abs(risk(rowOf(data, r)) - pred.risk[i]))));
    expect(maxErr).toBeLessThan(1e-12);
  });

  it('names the non-event from the outcome\u2019s two levels and escapes XML special characters', () => {
    const d: Dataset = {
      nRows: 8,
      columns: [
        { kind: 'categorical', name: 'infection', levels: ['no', 'yes'], codes: Int32Array.of(0, 1, 0, 1, 0, 0, 1, 1) },
        { kind: 'numeric', name: 'stay <days> & "ward"', values: Float64Array.of(2, 9, 3, 4, 1, 6, 12, 5) },
      ],
    };
    const r = fit(d, { outcome: 'infection', event: 'yes', terms: [{ type: 'main', column: 'stay <days> & "ward"' }] });
    const x = modelToPmml(r, { ...opts, outcomeLevels: ['no', 'yes'] });
    expect(x).toContain('name="stay &lt;days&gt; &amp; &quot;ward&quot;"');
    const sdoc = parseXml(x);
    const tables = kids(kid(sdoc, 'RegressionModel'), 'RegressionTable');
    expect(tables.map((t) => t.attrs.targetCategory)).toEqual(['yes', 'no']);
    const { risk } = pmmlScorer(sdoc);
    const pred = predict(r, d);
    pred.rowsUsed.forEach((row, i) => expect(Math.abs(risk(rowOf(d, row)) - pred.risk[i])).toBeLessThan(1e-12));
  });

  it('refuses, naming the column, a fit whose design does not follow its recipe', () => {
    const bad = {
      ...result,
      coefficients: result.coefficients.map((c) => (c.name === "age''" ? { ...c, name: 'age^2' } : c)),
    };
    expect(() => modelToPmml(bad, opts)).toThrow(FulcraError);
    expect(() => modelToPmml(bad, opts)).toThrow(
      /design column 3 is "age\^2" but the recipe of "age \(spline\)" implies "age''"/,
    );
  });
});
