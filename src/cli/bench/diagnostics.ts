import { rowDiagnostics } from '../../engine/diagnostics';
import { fit } from '../../engine/fitting';
import type { ModelSpec } from '../../engine/core';
import { synthDataset, type Measurement } from './extras';
import { ensureSynth } from './synth';

const seconds = (t0: bigint): number => Number(process.hrtime.bigint() - t0) / 1e9;

/**
 * The cost of the per-row diagnostics (leverage, standardised residuals, Cook's distance, DFBETAS) after an ML fit
 * at n×p: one pass over the rows in blocks, one product with the fit's (X'WX)⁻¹ per block, no refits. Reported
 * beside the fit's own time, as the fraction the diagnostics add.
 */
export function diagnosticsCost(dir: string, n: number, p: number, seed: number): Measurement {
  const data = synthDataset(ensureSynth(dir, n, p, seed));
  const spec: ModelSpec = {
    outcome: 'y',
    event: '1',
    terms: Array.from({ length: p }, (_, j) => ({ type: 'main' as const, column: `x${j + 1}` })),
  };
  let t0 = process.hrtime.bigint();
  const f = fit(data, spec, { profile: false, termTests: false });
  const fitS = seconds(t0);
  const c0 = process.cpuUsage();
  t0 = process.hrtime.bigint();
  const d = rowDiagnostics(f, data);
  const s = seconds(t0);
  const c = process.cpuUsage(c0);
  let maxCook = 0;
  for (const v of d.cooks ?? []) if (v > maxCook) maxCook = v;
  return {
    name: `per-row diagnostics at ${n}×${p}`,
    value: s,
    unit: 's',
    cpuSeconds: (c.user + c.system) / 1e6,
    detail:
      `rowDiagnostics after a fit of ${fitS.toFixed(2)} s (+${((100 * s) / fitS).toFixed(0)}% of the fit): one ` +
      `pass in blocks of 32 768 rows, X_b·(X'WX)⁻¹ per block, no refits; DFBETAS kept as each row's largest ` +
      `${d.dfbetas ? 'and in full' : '(full matrix above 2·10⁶ cells not kept)'}; ` +
      `max Cook's D ${maxCook.toPrecision(3)}`,
  };
}
