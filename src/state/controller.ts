/**
 * Effects: each user intent calls the worker and feeds the answer back through a named action. The parts live in
 * src/state/effects by concern (data in, fitting, cut-off and costs, checks, files out, restore); this composes
 * them. The client is injected (a WorkerClient in the page, a fake or the in-process api in tests).
 */
import type { WorkerClient } from '../bridge/workerClient';
import * as A from './actions';
import type { Notice, ViewId } from './appState';
import type { Store } from './store';
import { checks, type CheckEffects } from './effects/checks';
import { effectContext } from './effects/context';
import { cutoffEffects, type CutoffEffects } from './effects/cutoff';
import { dataLoading, type DataEffects } from './effects/data';
import { filesOut, type ExportEffects } from './effects/exports';
import { fitting, type FittingEffects } from './effects/fitting';
import { influenceEffects, type InfluenceEffects } from './effects/influence';
import { modelsEffects, type ModelsEffects } from './effects/models';
import { subgroupEffects, type SubgroupEffects } from './effects/subgroups';
import { pointsEffects, type PointsEffects } from './effects/points';
import { monitoring, type MonitoringEffects } from './effects/monitoring';
import { engineEmptied } from './monitorActions';
import { restoring, type RestoreEffects } from './effects/restore';

export { savedTime } from './effects/restore';

export interface Controller
  extends
    DataEffects,
    FittingEffects,
    CutoffEffects,
    CheckEffects,
    ExportEffects,
    RestoreEffects,
    MonitoringEffects,
    InfluenceEffects,
    SubgroupEffects,
    PointsEffects,
    ModelsEffects {
  /** Applies a user's change, then runs the effects it says follow (see `Intent` in actions.ts). */
  act<I>(intent: A.Intent<I>, input: I): Promise<void>;
  /** Runs a notice's one-click remedy; `fromNotice` is the notice it came from, which goes away. */
  useRemedy(action: NonNullable<Notice['action']>, fromNotice?: number): Promise<void>;
  show(view: ViewId): void;
  cancel(jobId: string): void;
}

export function createController(store: Store, client: WorkerClient): Controller {
  const ctx = effectContext(store, client);
  const cutoff = cutoffEffects(ctx);
  const { fitWith, fitKept, ...fit } = fitting(ctx, cutoff);
  const { setHeld, ...data } = dataLoading(ctx, fit.fitModel);
  const { refitKept, ...models } = modelsEffects(ctx, cutoff, { fitWith, fitKept, ...fit });
  const restore = restoring(ctx, { ...data, setHeld }, { fitWith }, refitKept);
  const { refitWithoutRows, ...influence } = influenceEffects(ctx, { fitWith });

  const run: Record<A.Effect, () => Promise<void>> = {
    'query-threshold': cutoff.queryThreshold,
    'refresh-costs': () => cutoff.refreshCosts(),
    'refresh-drop-report': data.refreshDropReport,
    reread: data.reread,
    'refit-without-rows': refitWithoutRows,
  };

  return {
    ...data,
    ...fit,
    ...cutoff,
    ...checks(ctx),
    ...filesOut(ctx, data),
    ...monitoring(ctx),
    ...restore,
    // A restarted engine has lost the opened model file and the monitoring file: the page forgets them too.
    recover: (text) => (store.apply(engineEmptied, undefined), restore.recover(text)),
    ...influence,
    ...subgroupEffects(ctx),
    ...pointsEffects(ctx),
    ...models,
    async act(intent, input) {
      const before = store.get();
      store.apply(intent.perform, input);
      for (const effect of intent.follows(before, store.get())) await run[effect]();
    },
    async useRemedy(action, fromNotice) {
      if (fromNotice !== undefined) store.apply(A.dismiss, fromNotice);
      if (action === 'reload') store.apply(A.showView, 'data');
      else if (action === 'start-afresh') data.startAfresh();
      else if (action === 'refit') await fit.fitModel();
      else if (action === 'save-workspace')
        return; // the page downloads the file (src/ui/NoticeArea.tsx)
      else {
        store.apply(A.chooseMethod, action === 'use-firth' ? 'firth' : 'ridge');
        await fit.fitModel();
      }
    },
    show: (view) => store.apply(A.showView, view),
    cancel: (jobId) =>
      ctx.stopsEngine.has(jobId)
        ? void (store.apply(engineEmptied, undefined), restore.cancelByRestart())
        : client.cancel(jobId),
  };
}
