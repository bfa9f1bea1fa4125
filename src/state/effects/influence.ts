/** Which rows drive the model: the diagnostics view of the current fit, and the refit without chosen rows. */
import * as I from '../influenceState';
import type { EffectContext } from './context';
import { requestOf, type Fitting } from './fitting';

export interface InfluenceEffects {
  /** Loads the diagnostics view of the shown fit (once per fit). */
  loadInfluence(): Promise<void>;
  /** Refits with every row again (the rows left out are put back; the data were never changed). */
  refitAllRows(): Promise<void>;
}

export function influenceEffects(
  ctx: EffectContext,
  fit: Pick<Fitting, 'fitWith'>,
): InfluenceEffects & { refitWithoutRows(): Promise<void> } {
  const { store, client, s } = ctx;

  async function loadInfluence() {
    const forFit = s().fit;
    if (!forFit || s().influence.forFit === forFit) return;
    const view = await client.latest('influence', (api) => api.diagnostics());
    if (view && s().fit === forFit) store.apply(I.influenceLoaded, { view, forFit });
  }

  async function refitWith(leaveOut: number[]) {
    const built = requestOf(s());
    if ('problem' in built) return;
    if (await fit.fitWith({ ...built.request, leaveOut }, true)) await loadInfluence();
  }

  return {
    loadInfluence,
    /** The effect of the refitWithoutRows intent: the rows already left out and the ticked ones. */
    refitWithoutRows: () => refitWith(I.rowsToLeaveOut(s())),
    async refitAllRows() {
      await refitWith([]);
      store.apply(I.allRowsBack, undefined);
    },
  };
}
