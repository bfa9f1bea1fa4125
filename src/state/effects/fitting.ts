/** Fitting: the model from the current roles and options, then the views every fit refreshes. */
import type { FitRequest, FitView, LossSurfaceChoice } from '../../worker/protocol';
import * as A from '../actions';
import * as M from '../modelsState';
import type { AppState } from '../appState';
import type { EffectContext } from './context';
import type { CutoffEffects } from './cutoff';

export interface FittingEffects {
  fitModel(): Promise<void>;
  /** Refits the current model with multiple imputation of its missing values. */
  fitImputed(): Promise<void>;
  riskCurve(predictor: string): Promise<void>;
  lossSurface(a: number, b: number, choice?: LossSurfaceChoice): Promise<void>;
}

export interface Fitting extends FittingEffects {
  /**
   * Fits `request`; `keep` (a restore or a restart) keeps the user's view and cut-off instead of moving to the
   * model. `held` (a restarted engine): the fit the page shows for this request, given back instead of refitted.
   * False when the fit did not finish.
   */
  fitWith(request: FitRequest, keep: boolean, held?: FitView): Promise<boolean>;
  /**
   * Fits a kept model that is not the one shown (a restored workspace's other models): it goes into the list of
   * kept models only, and the views go on showing the model they show. The engine's current model is then this
   * one: the caller shows the shown model again (showModel). False when the fit did not finish.
   */
  fitKept(request: FitRequest): Promise<boolean>;
}

/** What the worker is asked to fit for `s`, or the reason it cannot be fitted yet. */
export function requestOf(s: AppState): { request: FitRequest } | { problem: string } {
  const built = A.buildSpec(s);
  if ('problem' in built) return built;
  const { method, level, alpha, lambdaRule, maxIter } = s;
  const profile = method === 'ml' || method === 'firth';
  const lambda = lambdaRule === 'min' ? 'cv-min' : 'cv-1se';
  // Rows left out of the shown fit stay out of the next one (the warning and the diagnostics view say so).
  const leaveOut = s.fit?.request.leaveOut ?? [];
  return {
    request: {
      spec: built.spec,
      ...{ method, level, alpha, lambda, profile, maxIter },
      ...(leaveOut.length ? { leaveOut } : {}),
    },
  };
}

/** The first two coefficients after the intercept that are not aliased (an aliased one has no estimate to vary). */
export function surfacePair(coefficients: readonly { aliased: boolean }[]): [number, number] | null {
  const free = coefficients.flatMap((c, k) => (k > 0 && !c.aliased ? [k] : []));
  return free.length >= 2 ? [free[0], free[1]] : null;
}

export function fitting(ctx: EffectContext, cutoff: CutoffEffects): Fitting {
  const { store, client, s, job } = ctx;

  async function riskCurve(predictor: string) {
    const view = await client.latest('risk', (api) => api.riskCurve(predictor));
    if (view) store.apply(A.riskCurveDone, view);
  }

  async function lossSurface(a: number, b: number, choice?: LossSurfaceChoice) {
    if (!s().fit || a === b) return;
    const view = await client.latest('loss', (api) => api.lossSurface(a, b, choice));
    if (view) store.apply(A.lossSurfaceDone, view);
  }

  /** The cost curve and cut-off, the risk curve of the first predictor, the loss surface of the first two. */
  async function afterFit(keepThreshold: boolean) {
    await cutoff.refreshCosts(keepThreshold);
    const first = s().fit?.fit.recipe.terms.find((t) => t.type !== 'interaction');
    if (first && 'column' in first) await riskCurve(first.column);
    const pair = surfacePair(s().fit?.fit.coefficients ?? []);
    if (pair) await lossSurface(pair[0], pair[1]);
  }

  async function fitWith(request: FitRequest, keep: boolean, held?: FitView): Promise<boolean> {
    const fitted = held ? { fit: held.fit, lambda: held.lambda, warnings: held.warnings } : undefined;
    // Every fit can be cancelled: penalised fits with λ by cross-validation see the cancel between folds; the
    // others run in one go in the engine, which is then stopped and started afresh (cancelByRestart).
    const yields = request.method !== 'ml' && request.method !== 'firth' && typeof request.lambda !== 'number';
    const view = await job(held ? 'Restoring the model' : 'Fitting the model', true, (id, onProgress) => {
      if (!yields) ctx.stopsEngine.add(id);
      return client
        .call((api) => api.fitModel(request, id, onProgress, fitted))
        .finally(() => ctx.stopsEngine.delete(id));
    });
    if (!view) return false;
    store.apply(A.fitDone, view);
    if (!keep && s().view === 'data') store.apply(A.showView, 'model');
    await afterFit(keep);
    return true;
  }

  return {
    fitWith,
    async fitKept(request) {
      const yields = request.method !== 'ml' && request.method !== 'firth' && typeof request.lambda !== 'number';
      const view = await job('Fitting a kept model', true, (id, onProgress) => {
        if (!yields) ctx.stopsEngine.add(id);
        return client.call((api) => api.fitModel(request, id, onProgress)).finally(() => ctx.stopsEngine.delete(id));
      });
      if (!view) return false;
      store.apply(M.keptModelFitted, view);
      return true;
    },
    async fitModel() {
      const built = requestOf(s());
      if ('problem' in built) store.apply(A.notify, { kind: 'error', text: built.problem });
      else await fitWith(built.request, false);
    },
    async fitImputed() {
      const f = s().fit;
      if (!f) return;
      const view = await job('Multiple imputation (10 datasets)', true, (id, onProgress) =>
        client.call((api) => api.fitImputed(f.request, id, onProgress)),
      );
      if (view) store.apply(A.imputedDone, view);
    },
    riskCurve,
    lossSurface,
  };
}
