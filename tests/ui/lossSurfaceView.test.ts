import { describe, expect, it } from 'vitest';
import { generateDemo } from '../../src/engine/demo';
import { loadDemo } from '../../src/worker/dataOps';
import { fitModel } from '../../src/worker/modelOps';
import { createSession } from '../../src/worker/session';
import { lossSurface } from '../../src/worker/validateOps';

describe('the loss surface view (seal demo: predictors on very different scales)', () => {
  it('shows per-SD coefficients in a ±4 SE window around the estimate by default, per unit on request', async () => {
    const s = createSession();
    loadDemo(s, 'seals');
    const demo = generateDemo('seals');
    const view = await fitModel(s, { spec: demo.spec, method: 'ml', level: 0.95, alpha: 0.5, profile: false }, {});
    const [temp, dwell] = [view.rows[1], view.rows[2]];
    const sd = (name: string) => {
      const col = demo.dataset.columns.find((c) => c.name === name)! as { values: Float64Array };
      const v = col.values,
        m = v.reduce((a, b) => a + b, 0) / v.length;
      return Math.sqrt(v.reduce((a, b) => a + (b - m) ** 2, 0) / v.length);
    };
    const std = lossSurface(s, 1, 2);
    expect([std.scale, std.window, std.span, std.seBased]).toEqual(['standardised', 'estimate', 4, true]);
    const G = std.xs.length;
    expect(std.optimum[0]).toBeCloseTo(temp.estimate * sd('seal_temp_c'), 8);
    expect((std.xs[0] + std.xs[G - 1]) / 2).toBeCloseTo(std.optimum[0], 10);
    expect(std.xs[G - 1] - std.optimum[0]).toBeCloseTo(4 * temp.se! * sd('seal_temp_c'), 8);
    expect(std.ys[G - 1] - std.optimum[1]).toBeCloseTo(4 * dwell.se! * sd('dwell_s'), 8);

    const raw = lossSurface(s, 1, 2, { scale: 'original', window: 'path' });
    expect([raw.scale, raw.window]).toEqual(['original', 'path']);
    expect(raw.optimum).toEqual([temp.estimate, dwell.estimate]);
    expect(raw.xs[0]).toBeLessThanOrEqual(Math.min(...raw.path.map((p) => p[0])));
  });
});
