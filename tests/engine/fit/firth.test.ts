import { describe, expect, it } from 'vitest';
import { fit } from '../../../src/engine/fitting/fit';
import { firthLogistic, firthPenalisedLogLik } from '../../../src/engine/fitting/firth';
import { maxRelErr, readCsvDataset, readJson } from './helpers';

// Reference: tests/fixtures/reference/firth-endometrial.json from firth-endometrial.R — brglm2 0.9 on R 4.2.2,
// glm(method = "brglmFit", type = "AS_mean") on brglm2::endometrial (Heinze & Schemper 2002); profile limits are
// exact uniroot roots of the penalised profile likelihood with constrained maxima from optim(BFGS).
const ref = readJson('tests/fixtures/reference/firth-endometrial.json');
const data = readCsvDataset('tests/fixtures/data/endometrial.csv');
const spec = { outcome: 'HG', terms: ['NV', 'PI', 'EH'].map((c) => ({ type: 'main' as const, column: c })) };

describe('Firth penalised likelihood on brglm2::endometrial', () => {
  const r = fit(data, spec, { method: 'firth' });
  const col = (k: 'estimate' | 'se' | 'profileLower' | 'profileUpper') => r.coefficients.map((c) => c[k] as number);

  it('matches brglm2 (AS_mean) estimates and SEs to 1e-5', () => {
    expect(r.converged).toBe(true);
    expect(maxRelErr(col('estimate'), ref.coef)).toBeLessThan(1e-5);
    expect(maxRelErr(col('se'), ref.se)).toBeLessThan(1e-5);
  });

  it('matches exact penalised profile-likelihood limits to 1e-5', () => {
    expect(maxRelErr(col('profileLower'), ref.profile_lower)).toBeLessThan(1e-5);
    expect(maxRelErr(col('profileUpper'), ref.profile_upper)).toBeLessThan(1e-5);
  });

  it('has no separation warning and a finite NV estimate although ML diverges', () => {
    expect(r.warnings.map((w) => w.code)).not.toContain('quasi-separation');
    expect(Number.isFinite(r.coefficients[1].estimate)).toBe(true);
  });

  it('reports the penalised log-likelihood of the R reference at the optimum', () => {
    const rows = data.nRows;
    const X = new Float64Array(rows * 4).fill(1, 0, rows);
    ['NV', 'PI', 'EH'].forEach((c, j) =>
      X.set((data.columns.find((d) => d.name === c) as { values: Float64Array }).values, (j + 1) * rows),
    );
    const y = (data.columns.find((d) => d.name === 'HG') as { values: Float64Array }).values;
    const problem = { X, n: rows, p: 4, y };
    const nr = firthLogistic(problem);
    expect(firthPenalisedLogLik(nr, problem)).toBeCloseTo(ref.penalised_loglik, 8);
    expect(maxRelErr(nr.beta, ref.coef)).toBeLessThan(1e-6);
  });
});
