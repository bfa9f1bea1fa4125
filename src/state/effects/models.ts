/** Several models in a session: show a kept model again without refitting, compare two, refit both on common rows. */
import { commonRowsRequest, resolveRequest, type ComparisonOutcome } from '../../engine/workflow';
import * as A from '../actions';
import * as M from '../modelsState';
import type { EffectContext } from './context';
import type { CutoffEffects } from './cutoff';
import { surfacePair, type Fitting } from './fitting';

export interface ModelsEffects {
  /** Shows a kept model: the engine restores its record and scores (no refit); fitted afresh only if it lost them. */
  showModel(id: number): Promise<void>;
  /** Compares the two picked models at the current cut-off and costs. */
  compareModels(): Promise<void>;
  /** The picked models used different rows: refits both without the rows only one of them used, then compares. */
  refitOnCommonRows(): Promise<void>;
}

export function modelsEffects(
  ctx: EffectContext,
  cutoff: CutoffEffects,
  fit: Pick<Fitting, 'fitWith' | 'fitKept' | 'riskCurve' | 'lossSurface'>,
): ModelsEffects & { refitKept(): Promise<void> } {
  const { store, client, s, job } = ctx;
  const kept = (id: number | null) => s().models.kept.find((k) => k.id === id) ?? null;

  // The engine keeps each model's per-row scores: models the page no longer lists are dropped there too.
  let listed = new Set<number>();
  store.subscribe(() => {
    const now = new Set(s().models.kept.flatMap((k) => (k.view?.modelKey !== undefined ? [k.view.modelKey] : [])));
    const gone = [...listed].filter((key) => !now.has(key));
    listed = now;
    if (gone.length) void client.call((api) => api.forgetModels(gone));
  });

  /** What a fit refreshes, for a model shown again: the cost curve and cut-off, the risk curve, the loss surface. */
  async function afterShow() {
    await cutoff.refreshCosts(true);
    const first = s().fit?.fit.recipe.terms.find((t) => t.type !== 'interaction');
    if (first && 'column' in first) await fit.riskCurve(first.column);
    const pair = surfacePair(s().fit?.fit.coefficients ?? []);
    if (pair) await fit.lossSurface(pair[0], pair[1]);
  }

  async function showModel(id: number) {
    const m = kept(id);
    if (!m) return;
    store.apply(M.modelChosen, id);
    const key = m.view?.modelKey;
    if (m.view && key !== undefined && (await client.call((api) => api.showKeptModel(key)))) {
      store.apply(A.fitDone, m.view);
      await afterShow();
      return;
    }
    // The engine no longer holds it (restarted) or it was never fitted here (a restored workspace): its fit is
    // given back as the page holds it, or fitted from its request.
    await fit.fitWith(m.request, true, m.view ?? undefined);
  }

  async function compareModels() {
    const { pick } = s().models;
    const a = kept(pick.a);
    const b = kept(pick.b);
    if (!a || !b) return;
    if (a.id === b.id) {
      store.apply(A.notify, { kind: 'error', text: 'Pick two different models to compare.' });
      return;
    }
    for (const m of [a, b]) if (!m.view) await showModel(m.id); // a restored workspace's model not fitted yet
    const ka = kept(a.id)?.view?.modelKey;
    const kb = kept(b.id)?.view?.modelKey;
    if (ka === undefined || kb === undefined) return;
    const { threshold, costs } = s();
    const outcome = await job('Comparing two models', false, () =>
      // Comlink's Remote splits a union result into a union of promises: named back as one.
      client.call<ComparisonOutcome>(
        (api) =>
          api.compareModels(
            { key: ka, label: a.name },
            { key: kb, label: b.name },
            threshold,
            costs,
          ) as Promise<ComparisonOutcome>,
      ),
    );
    if (outcome) store.apply(M.comparisonDone, { a: a.id, b: b.id, threshold, outcome });
  }

  return {
    showModel,
    compareModels,
    async refitOnCommonRows() {
      const c = s().models.comparison;
      if (!c || c.outcome.status !== 'different-rows') return;
      const rows = c.outcome.rows;
      const a = kept(c.a);
      const b = kept(c.b);
      if (!a || !b) return;
      const ids: number[] = [];
      for (const m of [a, b]) {
        let request;
        try {
          request = commonRowsRequest(resolveRequest(m.request), rows);
        } catch (err) {
          const e = err as { message?: string; suggestion?: string };
          store.apply(A.notify, { kind: 'error', text: e.message ?? String(err), suggestion: e.suggestion });
          return;
        }
        if (!(await fit.fitWith(request, true))) return;
        const shown = s().models.shown;
        if (shown === null) return;
        ids.push(shown);
      }
      store.apply(M.pickForComparison, { slot: 'a', id: ids[0] });
      store.apply(M.pickForComparison, { slot: 'b', id: ids[1] });
      await compareModels();
    },
    /**
     * After a workspace is restored (its shown model refitted): fits every other kept model without showing it (the
     * views never show another model's numbers meanwhile), then makes the shown one the engine's current model again.
     */
    async refitKept() {
      const shown = s().models.shown;
      let fitted = false;
      for (const m of s().models.kept) {
        if (m.view) continue;
        if (!(await fit.fitKept(m.request))) return;
        fitted = true;
      }
      if (fitted && shown !== null) await showModel(shown);
    },
  };
}
