import { describe, expect, it } from 'vitest';
import type { Dataset } from '../../../src/engine/core/data';
import type { ModelSpec } from '../../../src/engine/core/model';
import { diagnose, leaveRowsOut, rowDiagnostics, rowInfluence, topIndices } from '../../../src/engine/diagnostics';
import { fit } from '../../../src/engine/fitting/fit';
import { maxRelErr, readCsvDataset, readJson } from '../fit/helpers';

// Reference: tests/fixtures/reference/diagnostics-glm.json from diagnostics-glm.R — R 4.2.2 stats hatvalues,
// rstandard(type = "pearson" / "deviance"), cooks.distance and dfbetas on glm(binomial, epsilon = 1e-15), and
// brglm2 0.9 brglmFit(type = "AS_mean") hatvalues; datasets MASS::birthwt and datasets::mtcars (am ~ wt + hp).
const ref = readJson('tests/fixtures/reference/diagnostics-glm.json');
const birthwt = readCsvDataset('tests/fixtures/data/birthwt.csv', ['race']);
const bwSpec: ModelSpec = {
  outcome: 'low',
  terms: ['age', 'lwt', 'race', 'smoke', 'ptl', 'ht', 'ui'].map((c) =>
    c === 'race' ? { type: 'main', column: c, reference: '1' } : { type: 'main', column: c },
  ),
};
const mtcars: Dataset = {
  nRows: ref.mtcars.data.am.length,
  columns: (['am', 'wt', 'hp'] as const).map((name) => ({
    kind: 'numeric' as const,
    name,
    values: Float64Array.from(ref.mtcars.data[name] as number[]),
  })),
};
const mtSpec: ModelSpec = {
  outcome: 'am',
  event: '1',
  terms: [
    { type: 'main', column: 'wt' },
    { type: 'main', column: 'hp' },
  ],
};

const rowsOf = (flat: Float64Array, p: number) =>
  Array.from({ length: flat.length / p }, (_, i) => Array.from(flat.subarray(i * p, (i + 1) * p)));

describe.each([
  ['MASS::birthwt', birthwt, bwSpec, ref.birthwt],
  ['datasets::mtcars am ~ wt + hp', mtcars, mtSpec, ref.mtcars],
])('diagnostics against R 4.2.2 stats on %s', (_name, data, spec, r) => {
  const f = fit(data as Dataset, spec as ModelSpec, { profile: false });
  const d = rowDiagnostics(f, data as Dataset);
  it('fits the same coefficients', () => {
    expect(
      maxRelErr(
        f.coefficients.map((c) => c.estimate),
        r.coefficients,
      ),
    ).toBeLessThan(1e-8);
  });
  // 1e-6: the fit's covariance is X'WX at the last Newton iterate (relative error on mtcars' smallest hat values)
  it('hatvalues (R stats hatvalues)', () => expect(maxRelErr(d.leverage!, r.hat)).toBeLessThan(1e-6));
  it('rstandard pearson and deviance (R stats rstandard)', () => {
    expect(maxRelErr(d.stdPearson!, r.rstandard_pearson)).toBeLessThan(1e-7);
    expect(maxRelErr(d.stdDeviance!, r.rstandard_deviance)).toBeLessThan(1e-7);
  });
  it("Cook's distance (R stats cooks.distance)", () => expect(maxRelErr(d.cooks!, r.cooks)).toBeLessThan(1e-6));
  it('DFBETAS (R stats dfbetas)', () => {
    const p = f.coefficients.length;
    const ours = rowsOf(d.dfbetas!, p);
    for (let i = 0; i < ours.length; i++) {
      for (let j = 0; j < p; j++) expect(ours[i][j]).toBeCloseTo(r.dfbetas[i][j], 7);
    }
    // each row's largest |DFBETAS| over the slopes is the same number
    const i0 = topIndices(d.maxAbsDfbetas!, 1)[0];
    const slopes = (r.dfbetas[i0] as number[]).slice(1).map(Math.abs);
    expect(d.maxAbsDfbetas![i0]).toBeCloseTo(Math.max(...slopes), 7);
  });
  it('names spreadsheet rows (header row 1, first data row 2)', () => {
    expect(d.sheetRows[0]).toBe(2);
    expect(d.sheetRows[d.sheetRows.length - 1]).toBe((data as Dataset).nRows + 1);
  });
});

describe('Firth fit', () => {
  it('leverage equals brglm2 0.9 hatvalues of brglmFit(type = "AS_mean") on MASS::birthwt', () => {
    const f = fit(birthwt, bwSpec, { method: 'firth', profile: false });
    expect(
      maxRelErr(
        f.coefficients.map((c) => c.estimate),
        ref.birthwt_firth.coefficients,
      ),
    ).toBeLessThan(1e-6);
    const d = rowDiagnostics(f, birthwt);
    expect(maxRelErr(d.leverage!, ref.birthwt_firth.hat)).toBeLessThan(1e-5);
    const { summary } = diagnose(f, birthwt);
    expect(summary.applicability.find((a) => a.measure === "Cook's distance")?.status).toBe('approximate');
    expect(summary.applicability.find((a) => a.measure === 'leverage')?.status).toBe('exact');
  });
});

describe('penalised fit', () => {
  it('keeps the raw residuals only and says why', () => {
    const f = fit(birthwt, bwSpec, { method: 'ridge', lambda: 0.05, profile: false });
    const { rows, summary } = diagnose(f, birthwt);
    expect(rows.leverage).toBeNull();
    expect(rows.cooks).toBeNull();
    expect(rows.pearson.length).toBe(birthwt.nRows);
    expect(summary.rankedBy).toBe('deviance residual');
    const cook = summary.applicability.find((a) => a.measure === "Cook's distance")!;
    expect(cook.status).toBe('not computed');
    expect(cook.why).toMatch(/penalty/);
  });
});

describe('leave rows out and the one-step change', () => {
  it('the one-step Δβ of the top row points the way of the refit without it', () => {
    const f = fit(birthwt, bwSpec, { profile: false });
    const { summary } = diagnose(f, birthwt);
    const topRow = summary.top[0];
    expect(summary.rankedBy).toBe('cooks');
    expect(topRow.cooks).toBeGreaterThanOrEqual(summary.top[1].cooks!);
    const without = leaveRowsOut(birthwt, [topRow.sheetRow]);
    expect(without.nRows).toBe(birthwt.nRows - 1);
    expect(birthwt.nRows).toBe(189); // the original data stay untouched
    const refit = fit(without, bwSpec, { profile: false });
    const inf = rowInfluence(f, birthwt, topRow.dataRow)!;
    // Exact change β̂ − β̂₍₋ᵢ₎ against the one-step approximation (Pregibon 1981): same sign, within 25 %.
    for (let j = 1; j < f.coefficients.length; j++) {
      const exact = f.coefficients[j].estimate - refit.coefficients[j].estimate;
      if (Math.abs(exact) < 0.05 * (f.coefficients[j].se ?? 1)) continue;
      expect(Math.sign(inf.delta[j])).toBe(Math.sign(exact));
      expect(Math.abs(inf.delta[j] - exact)).toBeLessThan(0.25 * Math.abs(exact));
    }
  });
  it('keeps spreadsheet numbers of the remaining rows and refuses unknown rows by number', () => {
    const without = leaveRowsOut(birthwt, [2, 5]);
    expect(without.rowNumbers![0]).toBe(3);
    expect(without.rowNumbers![2]).toBe(6);
    expect(() => leaveRowsOut(birthwt, [999])).toThrow(/999 to leave out is not a data row.*rows 2 to 190/);
  });
  it('topIndices gives the largest first, NaN skipped', () => {
    expect(topIndices([1, NaN, 5, 3, 5.5], 3)).toEqual([4, 2, 3]);
  });
});

// Second reference: tests/fixtures/reference/diagnostics-statsmodels.json from diagnostics-statsmodels.py —
// statsmodels 0.13.5 (Debian python3-statsmodels) GLM(Binomial).fit(tol=1e-15).get_influence(): hat_matrix_diag,
// resid_studentized, cooks_distance, d_params and dfbetas, on the same two datasets.
const sm = readJson('tests/fixtures/reference/diagnostics-statsmodels.json');
describe.each([
  ['MASS::birthwt', birthwt, bwSpec, sm.birthwt],
  ['datasets::mtcars am ~ wt + hp', mtcars, mtSpec, sm.mtcars],
])('diagnostics against statsmodels 0.13.5 GLMInfluence on %s', (_name, data, spec, s) => {
  const f = fit(data as Dataset, spec as ModelSpec, { profile: false });
  const d = rowDiagnostics(f, data as Dataset);
  const p = f.coefficients.length;
  it("leverage, standardised Pearson residual and Cook's distance", () => {
    expect(maxRelErr(d.leverage!, s.hat)).toBeLessThan(1e-6);
    expect(maxRelErr(d.stdPearson!, s.resid_studentized)).toBeLessThan(1e-7);
    expect(maxRelErr(d.cooks!, s.cooks)).toBeLessThan(1e-6);
  });
  it('the one-step change of every coefficient (d_params); DFBETAS differ from it only by the scaling', () => {
    for (let i = 0; i < (data as Dataset).nRows; i++) {
      const inf = rowInfluence(f, data as Dataset, i)!;
      for (let j = 0; j < p; j++) {
        // statsmodels' d_params is β̂ − β̂₍₋ᵢ₎ by the same one-step formula (Pregibon 1981)
        expect(inf.delta[j]).toBeCloseTo(s.d_params[i][j], 9);
        // its dfbetas divide by the full-data standard error; R's (and Fulcra's) also by the leave-one-out σᵢ,
        // so their ratio is one number per row: the same for every coefficient
        const ratio = s.dfbetas[i][j] / inf.dfbetas[j];
        if (j > 0 && Number.isFinite(ratio)) expect(ratio).toBeCloseTo(s.dfbetas[i][0] / inf.dfbetas[0], 6);
      }
    }
  });
});
