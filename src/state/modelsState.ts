/**
 * Several models in a session (issue 16), as named actions: every fit the user makes is kept as a named model
 * (its request and the view the page shows for it), the user can rename it, remove it, show it again without
 * refitting (the worker keeps each model's record and scores under `view.modelKey`), and compare two of them
 * (workflow/compareStep through the worker). A saved workspace keeps each model's name and request; restoring
 * refits them.
 */
import type { ComparisonOutcome } from '../engine/workflow';
import type { FitRequest, FitView } from '../worker/protocol';
import type { AppState, PredictorRole } from './appState';

export interface KeptModel {
  /** The page's number for the model (the automatic name uses it). */
  id: number;
  name: string;
  /** True once the user named it (an automatic name is not kept in step with anything else). */
  named: boolean;
  /** The request as run (defaults filled in): what a restored workspace refits. */
  request: FitRequest;
  /** The fit the page shows for it; null until it is fitted in this session (a restored workspace refits it). */
  view: FitView | null;
}

/** The comparison shown: which two models, at which cut-off and costs, and the engine's outcome. */
export interface ShownComparison {
  a: number;
  b: number;
  threshold: number;
  outcome: ComparisonOutcome;
}

export interface ModelsState {
  kept: KeptModel[];
  /** The model whose fit is shown (null: none of the kept ones). */
  shown: number | null;
  nextId: number;
  /** The two models chosen for the comparison. */
  pick: { a: number | null; b: number | null };
  comparison: ShownComparison | null;
}

export const initialModels: ModelsState = {
  kept: [],
  shown: null,
  nextId: 1,
  pick: { a: null, b: null },
  comparison: null,
};

/** At most this many models are kept (each holds its per-row scores in the engine); the oldest goes first. */
export const MAX_KEPT_MODELS = 12;

type Perform<I> = (state: AppState, input: I) => AppState;

const withModels = (s: AppState, m: Partial<ModelsState>): AppState => ({ ...s, models: { ...s.models, ...m } });

/** JSON with sorted keys: two requests are the same model when their canonical texts are equal. */
function canonical(v: unknown): string {
  if (Array.isArray(v)) return `[${v.map(canonical).join(',')}]`;
  if (v && typeof v === 'object')
    return `{${Object.keys(v)
      .filter((k) => (v as Record<string, unknown>)[k] !== undefined)
      .sort()
      .map((k) => `${JSON.stringify(k)}:${canonical((v as Record<string, unknown>)[k])}`)
      .join(',')}}`;
  return JSON.stringify(v);
}

export const sameRequest = (a: FitRequest, b: FitRequest): boolean => canonical(a) === canonical(b);

/** "Model 3: age, asa, wound class" (with the method when not maximum likelihood, and any rows left out). */
export function autoName(id: number, request: FitRequest): string {
  const terms = request.spec.terms.map((t) => (t.type === 'interaction' ? t.columns.join(' × ') : t.column));
  let list = terms.join(', ');
  if (list.length > 60) list = `${list.slice(0, 57).replace(/,?\s*[^,]*$/, '')}, …`;
  const method = request.method && request.method !== 'ml' ? ` (${request.method})` : '';
  const out = request.leaveOut?.length ?? 0;
  const left = out > 0 ? `, ${out} row${out === 1 ? '' : 's'} left out` : '';
  return `Model ${id}: ${list}${method}${left}`;
}

/**
 * A fit arrived (fitDone): the kept model with the same request gets it (a refit, a restore, a switch), otherwise
 * it is kept as a new model with an automatic name. Beyond MAX_KEPT_MODELS the oldest other model is dropped.
 */
export function modelFitted(m: ModelsState, view: FitView): ModelsState {
  if (view.modelKey === undefined) return m;
  const same = m.kept.find((k) => sameRequest(k.request, view.request));
  if (same) return { ...m, kept: m.kept.map((k) => (k === same ? { ...k, view } : k)), shown: same.id };
  const id = m.nextId;
  const added: KeptModel = { id, name: autoName(id, view.request), named: false, request: view.request, view };
  let kept = [...m.kept, added];
  if (kept.length > MAX_KEPT_MODELS) kept = kept.slice(kept.length - MAX_KEPT_MODELS);
  return dropMissing({ ...m, kept, shown: id, nextId: id + 1 });
}

/**
 * A kept model that is not shown was fitted (fitKept: a restored workspace's other models): the kept model with the
 * same request gets the fit; the shown model and every view stay as they are.
 */
export const keptModelFitted: Perform<FitView> = (s, view) => {
  const fitted = modelFitted(s.models, view);
  const shown = s.models.shown !== null && fitted.kept.some((k) => k.id === s.models.shown) ? s.models.shown : null;
  return { ...s, models: { ...fitted, shown } };
};

/** Picks and the comparison that name a model no longer kept are cleared. */
function dropMissing(m: ModelsState): ModelsState {
  const has = (id: number | null) => id !== null && m.kept.some((k) => k.id === id);
  const pick = { a: has(m.pick.a) ? m.pick.a : null, b: has(m.pick.b) ? m.pick.b : null };
  const comparison = m.comparison && has(m.comparison.a) && has(m.comparison.b) ? m.comparison : null;
  return { ...m, pick, comparison, shown: has(m.shown) ? m.shown : null };
}

/** The user names a model (an empty name brings the automatic one back). */
export const renameModel: Perform<{ id: number; name: string }> = (s, { id, name }) => {
  const text = name.trim().slice(0, 120);
  return withModels(s, {
    kept: s.models.kept.map((k) =>
      k.id === id ? { ...k, name: text || autoName(k.id, k.request), named: text !== '' } : k,
    ),
  });
};

/** The user removes a kept model from the list (the shown fit stays on the page until another is shown). */
export const removeModel: Perform<number> = (s, id) => ({
  ...s,
  models: dropMissing({ ...s.models, kept: s.models.kept.filter((k) => k.id !== id) }),
});

/** The user picks the first or second model of the comparison. */
export const pickForComparison: Perform<{ slot: 'a' | 'b'; id: number | null }> = (s, { slot, id }) =>
  withModels(s, { pick: { ...s.models.pick, [slot]: id } });

export const comparisonDone: Perform<ShownComparison> = (s, comparison) => withModels(s, { comparison });

/** What a saved workspace keeps of each model: its name and its request (restoring refits it). */
export interface SavedModel {
  name: string;
  named: boolean;
  request: FitRequest;
}

const savedOf = new WeakMap<KeptModel[], SavedModel[]>();

/**
 * The kept models as a workspace saves them; the same array for the same list (the autosave compares what it saves
 * by reference, so a fresh array on every call would save on every change of the page).
 */
export function savedModels(m: ModelsState): SavedModel[] {
  let saved = savedOf.get(m.kept);
  if (!saved) {
    saved = m.kept.map(({ name, named, request }) => ({ name, named, request }));
    savedOf.set(m.kept, saved);
  }
  return saved;
}

/**
 * The kept models of a restored workspace, before they are refitted (each gets its fit as it arrives, by its
 * request); the first two are picked for the comparison.
 */
export function restoredModels(saved: SavedModel[] | undefined): ModelsState {
  const kept = (saved ?? []).map((k, i) => ({ ...k, id: i + 1, view: null }));
  return {
    kept,
    shown: null,
    nextId: kept.length + 1,
    pick: { a: kept[0]?.id ?? null, b: kept[1]?.id ?? null },
    comparison: null,
  };
}

/**
 * The settings that ask for `request` (roles, interactions, method, level, α, λ rule, iteration limit), so that
 * a model shown again is the one the settings describe (the outcome, layout and weights stay as they are).
 */
export function settingsOfRequest(s: AppState, request: FitRequest): Partial<AppState> {
  const roles: Record<string, PredictorRole> = {};
  for (const [name, r] of Object.entries(s.roles)) roles[name] = { ...r, include: false };
  const interactions: [string, string][] = [];
  for (const t of request.spec.terms) {
    if (t.type === 'interaction') interactions.push(t.columns);
    else if (t.type === 'spline') roles[t.column] = { include: true, reference: null, knots: t.knots };
    else roles[t.column] = { include: true, reference: t.reference ?? null, knots: 0 };
  }
  const lambda = request.lambda;
  return {
    roles,
    interactions,
    method: request.method ?? s.method,
    level: request.level ?? s.level,
    alpha: request.alpha ?? s.alpha,
    maxIter: request.maxIter ?? s.maxIter,
    lambdaRule: lambda === 'cv-min' ? 'min' : lambda === 'cv-1se' ? '1se' : s.lambdaRule,
  };
}

/** The model chosen from the list becomes the settings' model (its fit is shown by the effect, without refit). */
export const modelChosen: Perform<number> = (s, id) => {
  const k = s.models.kept.find((m) => m.id === id);
  return k ? { ...s, ...settingsOfRequest(s, k.request) } : s;
};
