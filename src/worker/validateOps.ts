import { lossSurface as engineLossSurface } from '../engine/fitting';
import { analysedRows, externalValidationStep, internalValidation, type AnalysisRequest } from '../engine/workflow';
import type { ImportResult } from '../io/types';
import { SAME_CASES_CODE } from '../engine/validation';
import { toView } from './performance';
import type { ExternalView, LossSurfaceChoice, LossSurfaceView, ValidationView } from './protocol';
import { requireData, requireFit, requireRecord, tick, type Session } from './session';

type Hooks = { onProgress?: (d: number, t: number) => void; signal?: { aborted: boolean } };

const NAMES = { auc: 'auc', calibrationSlope: 'slope', calibrationInTheLarge: 'intercept', brier: 'brier' } as const;

/**
 * Bootstrap optimism correction of the current analysis's whole procedure (the engine repeats λ selection when
 * penalised), seeded with the request's seed; the record then holds it as `npm run fit --bootstrap B` would.
 */
export async function validate(s: Session, replicates: number, hooks: Hooks): Promise<ValidationView> {
  const data = requireData(s);
  const current = requireRecord(s);
  const request: AnalysisRequest = {
    ...current.request,
    validation: { method: 'bootstrap', replicates, seed: current.request.seed },
  };
  const res = await internalValidation(data, request, { ...hooks, tick });
  if (s.record === current) s.record = { ...current, request, validation: res };
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
export function lossSurface(
  s: Session,
  a: number,
  b: number,
  choice: LossSurfaceChoice = { scale: 'standardised', window: 'estimate' },
): LossSurfaceView {
  const f = requireFit(s);
  const method = requireRecord(s).request.method;
  const ridgeOnly = method === 'ridge' || method === 'ml' || method === 'firth';
  const span = choice.window === 'estimate' ? 4 : 3;
  // on the rows the model was fitted on: a table of counts as its weighted case rows
  const fitted = analysedRows(requireData(s), requireRecord(s).request).data;
  const r = engineLossSurface(ridgeOnly ? f : { ...f, method: 'ml' }, fitted, {
    i: a,
    j: b,
    grid: 41,
    span,
    scale: choice.scale,
    window: choice.window,
  });
  return {
    names: [r.nameX, r.nameY],
    xs: r.x,
    ys: r.y,
    values: r.z,
    path: r.path.x.map((x, k) => [x, r.path.y[k]] as [number, number]),
    optimum: r.estimate,
    penalised: r.objective === 'cross-entropy+ridge',
    scale: r.scale,
    window: r.window,
    span,
    seBased: r.seBased,
  };
}

/**
 * The fitted model applied unchanged to a new file with known outcomes; logistic recalibration for that setting.
 * A file that holds the development cases (all or some) says so in a warning kept in the record (and the PDF).
 */
export function externalValidate(s: Session, imported: ImportResult): ExternalView {
  const current = requireRecord(s);
  const ext = externalValidationStep(current, imported.dataset, requireData(s));
  const overlap = {
    same: ext.warnings.some((w) => w.code === SAME_CASES_CODE),
    shared: ext.developmentCasesShared ?? 0,
  };
  s.record = { ...current, external: ext };
  const rs = ext.recalibration.interceptSlope;
  return {
    n: ext.nUsed,
    performance: toView(ext.evaluation),
    recalibration: rs && rs.slope ? { intercept: rs.intercept.estimate, slope: rs.slope.estimate } : null,
    sharedCases: overlap.shared,
    sameCases: overlap.same,
    warnings: [...imported.warnings, ...ext.warnings],
  };
}
