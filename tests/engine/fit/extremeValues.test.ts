import { describe, expect, it } from 'vitest';
import { FulcraError } from '../../../src/engine/core/data';
import { fit } from '../../../src/engine/fitting/fit';
import { importText } from '../../../src/io/index';
import { createApi } from '../../../src/worker/api';

/** 40 invented rows: y, x1, x2 (seeded by the row index); `x1` gives row i's x1 as text. */
function csv(x1: (i: number, base: number) => string): string {
  const rows = ['y,x1,x2'];
  for (let i = 0; i < 40; i++) rows.push(`${i % 3 === 0 ? 1 : 0},${x1(i, ((i * 7) % 13) + 1)},${(i * 5) % 11}`);
  return rows.join('\n');
}
const spec = {
  outcome: 'y',
  event: '1',
  terms: [
    { type: 'main' as const, column: 'x1' },
    { type: 'main' as const, column: 'x2' },
  ],
};

describe('extreme values in a predictor', () => {
  it('refuses ±1e308 in x1 (spreadsheet rows 5 and 9), naming the column, the rows and the values', async () => {
    const data = (await importText(csv((i, b) => (i === 3 ? '1e308' : i === 7 ? '-1e308' : String(b))))).dataset;
    let e: FulcraError | null = null;
    try {
      fit(data, spec, { profile: false });
    } catch (x) {
      e = x as FulcraError;
    }
    expect(e).toBeInstanceOf(FulcraError);
    expect(e!.code).toBe('extreme-values');
    expect(e!.message).toBe(
      '"x1" has values so far beyond its others that double precision cannot fit them together: 1e+308 in row 5 ' +
        'and -1e+308 in row 9, while half of its values are at most 7 in size. Next to them every other value of ' +
        '"x1" is lost (a ratio beyond 2^52, about 4.5e15), so no coefficient for "x1" can be estimated.',
    );
    expect(e!.suggestion).toMatch(/Check those cells/);
  });

  it('fits a column scaled by 1e307 and draws its risk curve without a contradiction', async () => {
    const api = createApi();
    await api.importText(
      csv((_, b) => String(b * 1e307)),
      {},
      'j',
    );
    const view = await api.fitModel({ spec, method: 'ml', level: 0.95, alpha: 0.5, profile: true }, 'f');
    expect(view.rows.length).toBe(3);
    const curve = await api.riskCurve('x1');
    expect(curve.points).toHaveLength(61);
    for (const p of curve.points) {
      expect(Number.isFinite(p.x)).toBe(true);
      expect(p.label).not.toMatch(/Infinity/);
    }
  });
});
