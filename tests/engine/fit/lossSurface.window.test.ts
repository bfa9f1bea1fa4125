import { describe, expect, it } from 'vitest';
import type { Dataset } from '../../../src/engine/core/data';
import type { ModelSpec } from '../../../src/engine/core/model';
import { fit } from '../../../src/engine/fitting/fit';
import { lossSurface } from '../../../src/engine/fitting/lossSurface';
import { caseLoss } from '../../../src/engine/numerics/loss';
import { createRng } from '../../../src/engine/numerics/rng';

// Two predictors on very different scales, as a temperature in °C (~190) and a dwell time in seconds (~1.2).
const n = 400;
const rng = createRng(17);
const temp = new Float64Array(n),
  dwell = new Float64Array(n),
  y = new Float64Array(n);
for (let r = 0; r < n; r++) {
  temp[r] = 190 + 6 * rng.normal();
  dwell[r] = 1.2 + 0.15 * rng.normal();
  const eta = -2 - 0.12 * (temp[r] - 190) - 4 * (dwell[r] - 1.2);
  y[r] = rng.next() < 1 / (1 + Math.exp(-eta)) ? 1 : 0;
}
const data: Dataset = {
  nRows: n,
  columns: [
    { kind: 'numeric', name: 'temp', values: temp },
    { kind: 'numeric', name: 'dwell', values: dwell },
    { kind: 'numeric', name: 'y', values: y },
  ],
};
const spec: ModelSpec = {
  outcome: 'y',
  event: '1',
  terms: [
    { type: 'main', column: 'temp' },
    { type: 'main', column: 'dwell' },
  ],
};
const res = fit(data, spec, { profile: false, termTests: false });
const beta = res.coefficients.map((c) => c.estimate);
const se = res.coefficients.map((c) => c.se!);
const mean = (v: Float64Array) => v.reduce((s, x) => s + x, 0) / v.length;
const popSd = (v: Float64Array) => Math.sqrt(v.reduce((s, x) => s + (x - mean(v)) ** 2, 0) / v.length);
const centre = [0, mean(temp), mean(dwell)];
const sd = [1, popSd(temp), popSd(dwell)];

/** Mean cross-entropy at raw coefficients b, summed directly over the rows. */
function meanLoss(b: number[]): number {
  let s = 0;
  for (let r = 0; r < n; r++) s += caseLoss(b[0] + b[1] * temp[r] + b[2] * dwell[r], y[r]);
  return s / n;
}

describe('lossSurface window and scale', () => {
  it('centres the "estimate" window on the estimate, ±4 SE wide, on the original scale', () => {
    const s = lossSurface(res, data, { i: 1, j: 2, grid: 21, span: 4, window: 'estimate' });
    const G = s.x.length;
    expect((s.x[0] + s.x[G - 1]) / 2).toBeCloseTo(beta[1], 12);
    expect((s.y[0] + s.y[G - 1]) / 2).toBeCloseTo(beta[2], 12);
    expect(s.x[G - 1] - beta[1]).toBeCloseTo(4 * se[1], 12);
    expect(s.y[G - 1] - beta[2]).toBeCloseTo(4 * se[2], 12);
    expect(s.halfWidth).toEqual([4 * se[1], 4 * se[2]]);
    expect(s.seBased).toBe(true);
    expect(s.z[10 * G + 10]).toBeCloseTo(s.minimum, 14);
  });

  it('puts per-SD coefficients on the standardised axes, with SEs per SD', () => {
    const s = lossSurface(res, data, { i: 1, j: 2, grid: 21, span: 4, window: 'estimate', scale: 'standardised' });
    expect(s.scale).toBe('standardised');
    expect(s.estimate[0]).toBeCloseTo(beta[1] * sd[1], 10);
    expect(s.estimate[1]).toBeCloseTo(beta[2] * sd[2], 10);
    expect(s.halfWidth[0]).toBeCloseTo(4 * se[1] * sd[1], 10);
    expect(s.halfWidth[1]).toBeCloseTo(4 * se[2] * sd[2], 10);
    expect(s.path.x[s.path.x.length - 1]).toBeCloseTo(s.estimate[0], 8);
    expect(s.path.y[s.path.y.length - 1]).toBeCloseTo(s.estimate[1], 8);
  });

  it('equals the raw-scale loss at the mapped coefficients on the standardised scale', () => {
    const s = lossSurface(res, data, { i: 1, j: 2, grid: 9, span: 4, window: 'estimate', scale: 'standardised' });
    const G = s.x.length;
    for (const [a, b] of [
      [0, 0],
      [2, 7],
      [8, 3],
      [4, 4],
    ]) {
      // per-SD coefficients u held elsewhere at the estimate: raw b_k = u_k / s_k, intercept keeps η at the means
      const u1 = s.x[b],
        u2 = s.y[a];
      const b1 = u1 / sd[1],
        b2 = u2 / sd[2];
      const b0 = beta[0] - (b1 - beta[1]) * centre[1] - (b2 - beta[2]) * centre[2];
      expect(s.z[a * G + b]).toBeCloseTo(meanLoss([b0, b1, b2]), 12);
    }
  });

  it('takes the standardised intercept and its SE at the means (as a fit on centred columns)', () => {
    const centred: Dataset = {
      nRows: n,
      columns: [
        { kind: 'numeric', name: 'temp', values: temp.map((v) => v - centre[1]) },
        { kind: 'numeric', name: 'dwell', values: dwell.map((v) => v - centre[2]) },
        { kind: 'numeric', name: 'y', values: y },
      ],
    };
    const rc = fit(centred, spec, { profile: false, termTests: false });
    const s = lossSurface(res, data, { i: 0, j: 2, grid: 11, span: 4, window: 'estimate', scale: 'standardised' });
    expect(s.estimate[0]).toBeCloseTo(rc.coefficients[0].estimate, 8);
    expect(s.halfWidth[0]).toBeCloseTo(4 * rc.coefficients[0].se!, 8);
    const G = s.x.length;
    const b2 = s.y[1] / sd[2];
    const b0 = s.x[9] - beta[1] * centre[1] - b2 * centre[2];
    expect(s.z[1 * G + 9]).toBeCloseTo(meanLoss([b0, beta[1], b2]), 12);
  });

  it('keeps the default window: ±3 SE widened to hold the whole optimiser path', () => {
    const s = lossSurface(res, data, { i: 1, j: 2, grid: 11 });
    expect(s.window).toBe('path');
    expect(s.scale).toBe('original');
    expect(Math.min(...s.path.x)).toBeGreaterThanOrEqual(s.x[0]);
    expect(Math.max(...s.path.x)).toBeLessThanOrEqual(s.x[10]);
    expect(s.x[0]).toBeLessThan(beta[1] - 3 * se[1]);
  });

  it('falls back to max(½|β|, ½ per SD) as the "SE" of a penalised fit', () => {
    const rr = fit(data, spec, { method: 'ridge', lambda: 0.05 });
    const s = lossSurface(rr, data, { i: 1, j: 2, grid: 11, span: 4, window: 'estimate', scale: 'standardised' });
    expect(s.seBased).toBe(false);
    const u = [rr.coefficients[1].estimate * sd[1], rr.coefficients[2].estimate * sd[2]];
    expect(s.halfWidth[0]).toBeCloseTo(4 * Math.max(0.5 * Math.abs(u[0]), 0.5), 10);
    expect(s.halfWidth[1]).toBeCloseTo(4 * Math.max(0.5 * Math.abs(u[1]), 0.5), 10);
    expect(Math.min(...s.z)).toBeGreaterThanOrEqual(s.minimum - 1e-12);
  });
});
