import { bootstrapValidation } from '../engine/validation';
import { FulcraError } from '../engine/core';
import { externalValidation } from '../engine/validation';
import { lossSurface as engineLossSurface } from '../engine/fitting';
import type { ImportResult } from '../io/types';
import { toPipeline } from './modelOps';
import { toView } from './performance';
import type { ExternalView, LossSurfaceView, ValidationView } from './protocol';
import { requireData, requireFit, tick, type Session } from './session';

type Hooks = { onProgress?: (d: number, t: number) => void; signal?: { aborted: boolean } };

const NAMES = { auc: 'auc', calibrationSlope: 'slope', calibrationInTheLarge: 'intercept', brier: 'brier' } as const;

/** Bootstrap optimism correction of the whole fitting procedure (the engine repeats λ selection when penalised). */
export async function validate(s: Session, replicates: number, hooks: Hooks): Promise<ValidationView> {
  const data = requireData(s);
  requireFit(s);
  if (!s.request) throw new FulcraError('no-model', 'No model has been fitted yet.', 'Fit a model first.');
  const res = await bootstrapValidation(toPipeline(data, s.request), { B: replicates, seed: 1 }, { ...hooks, tick });
  s.validation = res;
  const nan = (x: number | null) => (x === null ? NaN : x);
  return {
    replicates: res.planned - res.failed,
    metrics: res.rows.map((r) => ({
      name: NAMES[r.metric],
      apparent: nan(r.apparent),
      optimism: nan(r.optimism),
      corrected: nan(r.corrected),
      spread: nan(r.sd),
    })),
    warnings: res.warnings,
  };
}

/**
 * The engine's objective surface over two coefficients with the Newton path. Lasso and elastic-net fits are
 * shown on the plain cross-entropy (their L1 part is not drawn).
 */
export function lossSurface(s: Session, a: number, b: number): LossSurfaceView {
  const f = requireFit(s);
  const ridgeOnly = s.request?.method === 'ridge' || s.request?.method === 'ml' || s.request?.method === 'firth';
  const r = engineLossSurface(ridgeOnly ? f : { ...f, method: 'ml' }, requireData(s), {
    i: a,
    j: b,
    grid: 41,
    span: 3,
  });
  return {
    names: [r.nameX, r.nameY],
    xs: r.x,
    ys: r.y,
    values: r.z,
    path: r.path.x.map((x, k) => [x, r.path.y[k]] as [number, number]),
    optimum: r.estimate,
    penalised: r.objective === 'cross-entropy+ridge',
  };
}

/** The fitted model applied unchanged to a new file with known outcomes; logistic recalibration for that setting. */
export function externalValidate(s: Session, imported: ImportResult): ExternalView {
  const f = requireFit(s);
  const ext = externalValidation(f, imported.dataset, { level: f.level, rocPoints: 400 });
  const rs = ext.recalibration.interceptSlope;
  return {
    n: ext.nUsed,
    performance: toView(ext.evaluation),
    recalibration: rs && rs.slope ? { intercept: rs.intercept.estimate, slope: rs.slope.estimate } : null,
    warnings: [...imported.warnings, ...ext.warnings],
  };
}
