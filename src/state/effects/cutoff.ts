/** The cut-off and the costs: the cost curve with its best cut-offs, and the confusion matrix at the cut-off. */
import * as A from '../actions';
import type { EffectContext } from './context';

export interface CutoffEffects {
  /** The confusion matrix and its measures at the current cut-off. */
  queryThreshold(): Promise<void>;
  /** The cost curve for the current costs, then the matrix; `keepThreshold` keeps the cut-off where it is. */
  refreshCosts(keepThreshold?: boolean): Promise<void>;
}

export function cutoffEffects({ store, client, s }: EffectContext): CutoffEffects {
  async function queryThreshold() {
    if (!s().fit) return;
    const { threshold, costs } = s();
    const view = await client.latest('threshold', (api) => api.threshold(threshold, costs));
    if (view) store.apply(A.thresholdDone, view);
  }

  async function refreshCosts(keepThreshold = false) {
    const costs = s().costs;
    if (!s().fit) return;
    const view = await client.latest('costs', (api) => api.costs(costs));
    if (!view) return;
    store.apply(A.costsDone, view);
    if (!s().thresholdView && !keepThreshold)
      store.apply(A.chooseCutoff, { threshold: view.optimal.decisionTheory.threshold, how: 'cost-based' });
    await queryThreshold();
  }

  return { queryThreshold, refreshCosts };
}
