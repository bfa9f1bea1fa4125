import { describe, expect, it } from 'vitest';
import { generateDemo } from '../../src/engine/demo';
import { buildDesign } from '../../src/engine/design';
import { readModelFile } from '../../src/io/export/readModelFile';
import { loadDemo } from '../../src/worker/dataOps';
import { readPasted } from '../../src/worker/ioOps';
import { fitModel } from '../../src/worker/modelOps';
import { modelFileText } from '../../src/worker/reportOps';
import { scoreImported, scoreOne } from '../../src/worker/scoreOps';
import { createSession } from '../../src/worker/session';

const demo = generateDemo('ssi');

async function fitted() {
  const s = createSession();
  loadDemo(s, 'ssi');
  const view = await fitModel(s, { spec: demo.spec, profile: false }, {});
  return { s, view };
}

/** [min, max] of a numeric column over the complete rows of the demo model, by brute force. */
function bruteRange(column: string): [number, number] {
  const d = buildDesign(demo.dataset, demo.spec);
  const col = demo.dataset.columns.find((c) => c.name === column)!;
  if (col.kind !== 'numeric') throw new Error('numeric column expected');
  const v = Array.from(d.rowsUsed, (r) => col.values[r]);
  return [Math.min(...v), Math.max(...v)];
}

const HEADER = 'age\tbmi\tdiabetes\tasa_class\twound_class\tduration_min\tprophylaxis\tsmoker\n';

describe('scoring outside the data the model was fitted on', () => {
  it('the fit keeps [min, max] of each numeric predictor over the rows used, and the model file keeps it', async () => {
    const { s, view } = await fitted();
    const ranges = view.fit.recipe.ranges!;
    expect(Object.keys(ranges).sort()).toEqual(['age', 'bmi', 'duration_min']);
    expect(ranges.age).toEqual(bruteRange('age'));
    expect(ranges.bmi).toEqual(bruteRange('bmi'));
    const text = modelFileText(s, { missedCase: 10, falseAlarm: 1 }, 0.1, '2026-01-01T00:00:00Z');
    expect(readModelFile(text).recipe.ranges).toEqual(ranges);
    // A file saved before ranges existed still reads.
    const old = JSON.parse(text) as { recipe: { ranges?: unknown } };
    delete old.recipe.ranges;
    expect(readModelFile(JSON.stringify(old)).recipe.ranges).toBeUndefined();
  });

  it('one case: Age = 500 and Age = −5 are named as outside the fitted range; the typical case is not', async () => {
    const { s, view } = await fitted();
    const [lo, hi] = view.fit.recipe.ranges!.age;
    expect(scoreOne(s, view.typical, 0.1).outside).toEqual([]);
    expect(scoreOne(s, { ...view.typical, age: 500 }, 0.1).outside).toEqual([
      { column: 'age', value: 500, min: lo, max: hi },
    ]);
    const both = scoreOne(s, { ...view.typical, age: -5, bmi: 400 }, 0.1).outside;
    expect(both.map((o) => [o.column, o.value])).toEqual([
      ['age', -5],
      ['bmi', 400],
    ]);
  });

  it('a file: rows outside are counted and named, the CSV names them; an unknown category skips its row', async () => {
    const { s } = await fitted();
    const text =
      HEADER +
      '70\t31\tyes\tIII\tdirty\t200\tnone\tyes\n' + // row 2: inside
      '500\t31\tno\tI\tclean\t90\ton time\tno\n' + // row 3: age outside
      '60\t28\tno\tII\tfilthy\t90\ton time\tno\n' + // row 4: unknown wound class
      '-5\t400\tno\tII\tclean\t90\ton time\tno\n' + // row 5: age and bmi outside
      '55\t\tno\tI\tclean\t90\ton time\tno\n'; // row 6: missing bmi
    const batch = scoreImported(s, await readPasted(text, {}, {}), 0.2);
    expect(batch).toMatchObject({ n: 5, scored: 3, skipped: 2, outsideRows: 2, unknownRows: 1 });
    expect(batch.preview.map((p) => p.row)).toEqual([2, 3, 5]);
    expect(batch.outsideFirst).toEqual([
      { row: 3, columns: ['age'] },
      { row: 5, columns: ['age', 'bmi'] },
    ]);
    expect(batch.unknownFirst).toEqual([{ row: 4, column: 'wound_class', value: 'filthy' }]);
    const unknown = batch.warnings.find((w) => w.code === 'rows-unknown-category')!;
    expect(unknown.message).toContain('row 4, wound_class = "filthy"');
    expect(batch.warnings.find((w) => w.code === 'values-outside-data')?.message).toContain('rows 3, 5');
    const lines = batch.csvParts.join('').trim().split('\r\n');
    const head = lines[0].split(',');
    const at = head.indexOf('outside_data');
    expect(at).toBe(head.length - 1);
    expect(lines.slice(1).map((l) => l.split(',').at(-1))).toEqual(['', 'age', '', 'age; bmi', '']);
    // The risk of a scored row does not depend on the skipped one.
    const alone = scoreImported(s, await readPasted(HEADER + '500\t31\tno\tI\tclean\t90\ton time\tno\n', {}, {}), 0.2);
    expect(batch.preview[1].risk).toBe(alone.preview[0].risk);
  });
});
