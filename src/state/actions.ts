/**
 * Named actions: `perform(state, input) → new state`, pure and testable without React or a worker.
 * Effects (worker calls) live in controller.ts and feed their results back through these actions.
 */
import type { MissingReport } from '../engine/imputation';
import type { ColumnType } from '../io/types';
import { countsColumn, type EngineWarning, type ModelSpec } from '../engine/core';
import { modelFitted, restoredModels } from './modelsState';
import type {
  BatchScoreView,
  Costs,
  CostView,
  CutoffHow,
  ImputedView,
  DataSummary,
  ExternalView,
  FitView,
  LossSurfaceView,
  FitMethod,
  ReportText,
  RiskCurveView,
  ScoreView,
  ThresholdView,
  ValidationView,
} from '../worker/protocol';
import { isOddsUnit } from '../report/oddsUnits';
import type { WorkbenchSettings } from './workspace';
import { proposeOutcomeColumn } from '../io/outcome';
import {
  initialState,
  type AppState,
  type ImportSettings,
  type Job,
  type Notice,
  type PredictorRole,
  type ViewId,
} from './appState';

type Perform<I> = (state: AppState, input: I) => AppState;

/** A worker query that brings a derived view up to date after a change; the controller runs it. */
export type Effect = 'query-threshold' | 'refresh-costs' | 'refresh-drop-report' | 'reread' | 'refit-without-rows';

/**
 * A user's change that says what follows it: `perform` is the pure state change, `follows` compares the state
 * before and after and names the effects the change calls for (none when nothing they depend on moved).
 */
export interface Intent<I> {
  perform: Perform<I>;
  follows(before: AppState, after: AppState): Effect[];
}

/** The code of the notice that refuses to export an out-of-date model. */
export const STALE_EXPORT_CODE = 'stale-export';

/**
 * Notices that outlive a new data set: problems of the page itself (storage and the like, which carry a code).
 * Everything else (warnings about the data or the model, remedies, refused exports, notes on a restored or
 * recovered workspace, failed calls on the old data) belongs to the data it came with.
 */
const keptAcrossData = (n: Notice): boolean => n.kind === 'error' && !!n.code && n.code !== STALE_EXPORT_CODE;

export const showView: Perform<ViewId> = (s, view) => ({ ...s, view });

/** Changes how files are read; a new file starts with no per-column type choices. */
export const setImportSettings: Perform<Partial<ImportSettings>> = (s, settings) => ({
  ...s,
  importSettings: { ...s.importSettings, ...settings },
});

/** A demo sets the cautions of its setting; data after a demo go back to the default (the user may set it again). */
function cautionsFor(s: AppState, data: DataSummary): ReportText {
  if (data.cautions) return { ...s.reportText, cautions: data.cautions };
  if (s.data?.source.kind !== 'demo') return s.reportText;
  const rest = { ...s.reportText };
  delete rest.cautions;
  return rest;
}

/**
 * A new data set replaces everything that was computed from the previous one; roles come from the demo spec.
 * Otherwise the outcome is proposed only when exactly one column is a plausible yes/no outcome; with none or
 * several it is left to the user, with a hint naming the candidates.
 */
export const dataLoaded: Perform<DataSummary> = (s, data) => loadSummary(s, data, true);

function loadSummary(s: AppState, data: DataSummary, propose: boolean): AppState {
  const roles: Record<string, PredictorRole> = {};
  for (const c of data.columns) roles[c.name] = { include: false, reference: null, knots: 0 };
  let outcome: string | null = null;
  let event: string | null = null;
  let layout: AppState['layout'] = { kind: 'binary' };
  let weights: string | null = null;
  if (data.suggestedSpec) {
    outcome = data.suggestedSpec.outcome;
    event = data.suggestedSpec.event ?? null;
    layout = data.suggestedSpec.layout ?? layout;
    weights = data.suggestedSpec.weights ?? null;
    for (const t of data.suggestedSpec.terms) {
      if (t.type === 'main') roles[t.column] = { include: true, reference: t.reference ?? null, knots: 0 };
      if (t.type === 'spline') roles[t.column] = { include: true, reference: null, knots: t.knots };
    }
  }
  const reread =
    s.data !== null &&
    data.source.kind !== 'demo' &&
    s.data.source.kind === data.source.kind &&
    s.data.source.name === data.source.name;
  if (reread) {
    const names = new Set(data.columns.map((c) => c.name));
    for (const [name, r] of Object.entries(s.roles)) if (names.has(name)) roles[name] = r;
    if (s.outcome && names.has(s.outcome)) {
      outcome = s.outcome;
      event = s.event;
      const counts = countsColumn(s.layout);
      if (counts === null || names.has(counts)) layout = s.layout;
    }
    if (s.weights && names.has(s.weights)) weights = s.weights;
  }
  const fresh = propose && data.source.kind !== 'demo' && !data.suggestedSpec && !reread;
  const column = fresh ? proposeOutcomeColumn(data.columns) : null;
  let proposal: { hint: string } | null = column;
  if (column?.status === 'proposed') {
    outcome = column.column;
    event = column.event;
  } else if (fresh && data.countLayout) {
    // no yes/no column, but two count columns that read as events and trials (or non-events)
    outcome = data.countLayout.events;
    event = null;
    layout = data.countLayout.layout;
    proposal = { hint: data.countLayout.hint };
  }
  const base: AppState = {
    ...initialState,
    costs: s.costs,
    costsSetByUser: s.costsSetByUser,
    notices: s.notices.filter(keptAcrossData),
    importSettings: s.importSettings,
    reportText: cautionsFor(s, data),
    nextNoticeId: s.nextNoticeId,
    jobs: s.jobs,
    // The opened model file and the monitoring file live apart from the data (the worker keeps them too).
    openedModel: s.openedModel,
    monitor: s.monitor,
    data,
    roles,
    outcome,
    event,
    layout,
    weights,
    interactions: reread ? s.interactions.filter(([a, b]) => roles[a]?.include && roles[b]?.include) : [],
  };
  const hinted = proposal ? notify(base, { kind: 'info', text: proposal.hint, code: 'outcome-proposal' }) : base;
  return withWarnings(hinted, data.warnings);
}

export const chooseOutcome: Perform<{ column: string | null; event?: string | null }> = (s, { column, event }) => {
  if (!s.data || column === null) return { ...s, outcome: null, event: null };
  const col = s.data.columns.find((c) => c.name === column);
  if (!col) return s;
  const ev =
    s.layout.kind !== 'binary'
      ? null
      : (event ?? col.proposedEvent ?? (col.levels.length === 2 ? col.levels[1] : null));
  const roles = { ...s.roles, [column]: { ...s.roles[column], include: false } };
  return { ...s, outcome: column, event: ev, roles };
};

/**
 * The outcome layout chosen: one yes/no column, or a table of counts (events with trials or non-events). The count
 * and weight columns are taken out of the predictors; switching back to yes/no asks for the event again.
 */
export const chooseLayout: Perform<AppState['layout']> = (s, layout) => {
  const roles = { ...s.roles };
  const counts = countsColumn(layout);
  if (counts) roles[counts] = { ...(roles[counts] ?? { reference: null, knots: 0 }), include: false };
  const outcomeCol = s.data?.columns.find((c) => c.name === s.outcome);
  const event =
    layout.kind === 'binary' && outcomeCol
      ? (outcomeCol.proposedEvent ?? (outcomeCol.levels.length === 2 ? outcomeCol.levels[1] : null))
      : null;
  return { ...s, layout, event, roles };
};

/** The frequency-weight column chosen (null: one case per row); it is taken out of the predictors. */
export const chooseWeights: Perform<string | null> = (s, weights) => {
  const roles = { ...s.roles };
  if (weights) roles[weights] = { ...(roles[weights] ?? { reference: null, knots: 0 }), include: false };
  return { ...s, weights, roles };
};

export const chooseEvent: Perform<string | null> = (s, event) => ({ ...s, event });

export const setPredictor: Perform<{ column: string; role: Partial<PredictorRole> }> = (s, { column, role }) => {
  if ((column === s.outcome || column === s.weights || column === countsColumn(s.layout)) && role.include) return s;
  const prev = s.roles[column] ?? { include: false, reference: null, knots: 0 };
  const roles = { ...s.roles, [column]: { ...prev, ...role } };
  const interactions = roles[column].include ? s.interactions : s.interactions.filter((p) => !p.includes(column));
  return { ...s, roles, interactions };
};

export const toggleInteraction: Perform<[string, string]> = (s, pair) => {
  const key = (p: [string, string]) => [...p].sort().join('\u0000');
  const exists = s.interactions.some((p) => key(p) === key(pair));
  const interactions = exists ? s.interactions.filter((p) => key(p) !== key(pair)) : [...s.interactions, pair];
  return { ...s, interactions };
};

export const chooseMethod: Perform<FitMethod> = (s, method) => ({ ...s, method });
export const setAlpha: Perform<number> = (s, alpha) =>
  Number.isFinite(alpha) ? { ...s, alpha: Math.min(1, Math.max(0, alpha)) } : s;
export const setLambdaRule: Perform<'min' | '1se'> = (s, lambdaRule) => ({ ...s, lambdaRule });
export const setLevel: Perform<number> = (s, level) => (level > 0.5 && level < 1 ? { ...s, level } : s);
/** The iteration limit: a whole number from 1 to 10000 (anything else leaves the state as it was). */
export const setMaxIter: Perform<number> = (s, maxIter) =>
  Number.isInteger(maxIter) && maxIter >= 1 && maxIter <= 10_000 ? { ...s, maxIter } : s;

/** A fit replaces every result derived from the previous fit. */
export const fitDone: Perform<FitView> = (s, fit) => {
  const cleared: AppState = {
    ...s,
    fit,
    models: modelFitted(s.models, fit),
    thresholdView: null,
    costView: null,
    imputed: null,
    riskCurve: null,
    lossSurface: null,
    validation: null,
    validationStatus: 'idle',
    score: null,
    batch: null,
    external: null,
    notices: s.notices.filter((n) => n.code !== STALE_EXPORT_CODE && (n.kind === 'error' || !n.code)),
  };
  return withWarnings(cleared, fit.warnings);
};

/** The user's costs: both must be finite and above 0, else the state stays as it was. */
export const setCosts: Perform<Partial<Costs>> = (s, costs) => {
  const next = { ...s.costs, ...costs };
  const ok = (v: number) => Number.isFinite(v) && v > 0;
  if (!ok(next.missedCase) || !ok(next.falseAlarm)) return s;
  if (next.missedCase === s.costs.missedCase && next.falseAlarm === s.costs.falseAlarm) return s;
  return { ...s, costs: next, costsSetByUser: true };
};

/** A cut-off set directly (counts as set by hand); kept within 0.001–0.999. */
export const setThreshold: Perform<number> = (s, t) =>
  Number.isFinite(t) ? { ...s, threshold: Math.min(0.999, Math.max(0.001, t)), cutoffHow: 'hand' } : s;

/** The cut-off and how it was set (kept for the PDF's "how chosen"). */
export const chooseCutoff: Perform<{ threshold: number; how: CutoffHow }> = (s, { threshold, how }) => {
  const next = setThreshold(s, threshold);
  return next === s ? s : { ...next, cutoffHow: how };
};

/** The cut-off a cost view proposes for `how` (null: none, e.g. flagging nobody is cheapest). */
function proposed(view: CostView, how: CutoffHow): number | null {
  if (how === 'cost-based') return view.optimal.decisionTheory.threshold;
  if (how === 'cheapest') return view.optimal.empirical.threshold;
  return null;
}

/** A new cost view; a cut-off set as cost-based or cheapest follows the new costs. */
export const costsDone: Perform<CostView> = (s, costView) => {
  const t = proposed(costView, s.cutoffHow);
  return t === null ? { ...s, costView } : chooseCutoff({ ...s, costView }, { threshold: t, how: s.cutoffHow });
};
export const dropReportDone: Perform<MissingReport | null> = (s, dropReport) => ({ ...s, dropReport });
export const thresholdDone: Perform<ThresholdView> = (s, thresholdView) => ({ ...s, thresholdView });
export const imputedDone: Perform<ImputedView> = (s, imputed) => withWarnings({ ...s, imputed }, imputed.warnings);
export const riskCurveDone: Perform<RiskCurveView> = (s, riskCurve) => ({ ...s, riskCurve });
export const lossSurfaceDone: Perform<LossSurfaceView> = (s, lossSurface) => ({ ...s, lossSurface });
export const scoreDone: Perform<ScoreView> = (s, score) => ({ ...s, score });
export const batchDone: Perform<BatchScoreView> = (s, batch) => withWarnings({ ...s, batch }, batch.warnings);
export const externalDone: Perform<ExternalView> = (s, external) => withWarnings({ ...s, external }, external.warnings);

export const validationStarted: Perform<void> = (s) => ({ ...s, validationStatus: 'running' });
export const validationDone: Perform<ValidationView> = (s, validation) =>
  withWarnings({ ...s, validation, validationStatus: 'done' }, validation.warnings);
export const validationCancelled: Perform<void> = (s) => ({ ...s, validationStatus: 'cancelled' });
export const validationFailed: Perform<void> = (s) => ({ ...s, validationStatus: 'idle' });

export const jobStarted: Perform<Job> = (s, job) => ({ ...s, jobs: [...s.jobs.filter((j) => j.id !== job.id), job] });
export const jobProgress: Perform<{ id: string; done: number; total: number }> = (s, { id, done, total }) => ({
  ...s,
  jobs: s.jobs.map((j) => (j.id === id ? { ...j, done, total } : j)),
});
export const jobEnded: Perform<string> = (s, id) => ({ ...s, jobs: s.jobs.filter((j) => j.id !== id) });

/** Adds a notice; the same text is not shown twice. */
export const notify: Perform<Omit<Notice, 'id'>> = (s, n) => {
  if (s.notices.some((m) => m.text === n.text && m.kind === n.kind)) return s;
  return { ...s, notices: [...s.notices, { ...n, id: s.nextNoticeId }], nextNoticeId: s.nextNoticeId + 1 };
};

export const dismiss: Perform<number> = (s, id) => ({ ...s, notices: s.notices.filter((n) => n.id !== id) });

/** The engine no longer holds the model (restarted, refit stopped): no view may show its results. */
export const fitLost: Perform<void> = (s) => ({
  ...s,
  fit: null,
  thresholdView: null,
  costView: null,
  imputed: null,
  riskCurve: null,
  lossSurface: null,
  validation: null,
  validationStatus: 'idle',
  score: null,
  batch: null,
  external: null,
});

/** The worker stopped: everything held in it is gone. */
export const workerLost: Perform<string> = (s, text) =>
  notify(
    {
      ...initialState,
      notices: s.notices,
      nextNoticeId: s.nextNoticeId,
      costs: s.costs,
      costsSetByUser: s.costsSetByUser,
      reportText: s.reportText,
    },
    { kind: 'error', text, suggestion: 'Open your file or a demo again.', action: 'reload' },
  );

/** The user's words for the model summary. */
export const setReportText: Perform<Partial<ReportText>> = (s, text) => ({
  ...s,
  reportText: { ...s.reportText, ...text },
});

/** Odds ratios of a numeric predictor per `unit` (display only); a unit of 1 or an invalid one clears it. */
export const setOddsUnit: Perform<{ term: string; unit: number }> = (s, { term, unit }) => {
  const oddsUnits = { ...s.oddsUnits };
  if (isOddsUnit(unit) && unit !== 1) oddsUnits[term] = unit;
  else delete oddsUnits[term];
  return { ...s, oddsUnits };
};

/**
 * A saved workspace came back (from this browser or a file): its data summary, then the roles, model options,
 * cut-off, costs and words it was saved with. Columns the data no longer have are ignored.
 */
export const workspaceRestored: Perform<{ summary: DataSummary; settings: WorkbenchSettings }> = (
  s,
  { summary, settings: w },
) => {
  const loaded = loadSummary({ ...s, data: null }, { ...summary, warnings: [] }, false);
  const names = new Set(summary.columns.map((c) => c.name));
  const roles = { ...loaded.roles };
  for (const [name, r] of Object.entries(w.roles)) if (names.has(name)) roles[name] = r;
  const known = (c: string | null) => (c !== null && names.has(c) ? c : null);
  const outcome = known(w.outcome);
  return {
    ...loaded,
    roles,
    outcome,
    event: outcome ? w.event : null,
    layout:
      outcome && w.layout && (countsColumn(w.layout) === null || names.has(countsColumn(w.layout)!))
        ? w.layout
        : { kind: 'binary' },
    weights: known(w.weights ?? null),
    interactions: w.interactions.filter(([a, b]) => names.has(a) && names.has(b)),
    method: w.method,
    alpha: w.alpha,
    lambdaRule: w.lambdaRule,
    level: w.level,
    maxIter: w.maxIter,
    costs: w.costs,
    costsSetByUser:
      w.costsSetByUser ??
      (w.costs.missedCase !== initialState.costs.missedCase || w.costs.falseAlarm !== initialState.costs.falseAlarm),
    threshold: w.threshold,
    cutoffHow: w.cutoffHow ?? 'restored',
    reportText: w.reportText,
    oddsUnits: w.oddsUnits,
    importSettings: w.importSettings,
    view: w.view,
    models: restoredModels(w.keptModels),
  };
};

/** When the work was last kept in this browser; null when the data of this load could not be kept. */
export const autosaved: Perform<string | null> = (s, savedAt) => ({ ...s, savedAt });

/** Forgets the data and every setting; only the notice counter survives. */
export const startAfresh: Perform<void> = (s) => ({ ...initialState, nextNoticeId: s.nextNoticeId });

/** The rows a model drops depend on its outcome, event, predictors and interactions. */
const modelChanged = (b: AppState, a: AppState): Effect[] =>
  a.data &&
  (a.outcome !== b.outcome ||
    a.event !== b.event ||
    a.layout !== b.layout ||
    a.weights !== b.weights ||
    a.roles !== b.roles ||
    a.interactions !== b.interactions)
    ? ['refresh-drop-report']
    : [];

/** Outcome column chosen: the drop report follows. */
export const changeOutcome: Intent<Parameters<typeof chooseOutcome>[1]> = {
  perform: chooseOutcome,
  follows: modelChanged,
};
/** Outcome layout chosen (yes/no, events and trials, events and non-events): the drop report follows. */
export const changeLayout: Intent<AppState['layout']> = { perform: chooseLayout, follows: modelChanged };
/** Frequency-weight column chosen: the drop report follows. */
export const changeWeights: Intent<string | null> = { perform: chooseWeights, follows: modelChanged };
/** Event level chosen: the drop report follows. */
export const changeEvent: Intent<string | null> = { perform: chooseEvent, follows: modelChanged };
/** A predictor's role changed: the drop report follows. */
export const changeRole: Intent<Parameters<typeof setPredictor>[1]> = { perform: setPredictor, follows: modelChanged };
/** An interaction added or removed: the drop report follows. */
export const changeInteraction: Intent<[string, string]> = { perform: toggleInteraction, follows: modelChanged };

const thresholdMoved = (b: AppState, a: AppState): Effect[] =>
  a.fit && a.threshold !== b.threshold ? ['query-threshold'] : [];

/** The cut-off moved by hand (the slider): with a model, the confusion matrix at the new cut-off follows. */
export const moveCutoff: Intent<number> = {
  perform: (s, t) => chooseCutoff(s, { threshold: t, how: 'hand' }),
  follows: thresholdMoved,
};

/** The cost-based cut-off chosen (it then follows the costs); the confusion matrix follows. */
export const useCostBasedCutoff: Intent<void> = {
  perform: (s) => {
    const t = s.costView && proposed(s.costView, 'cost-based');
    return t === null || t === undefined ? s : chooseCutoff(s, { threshold: t, how: 'cost-based' });
  },
  follows: thresholdMoved,
};

/** The cheapest cut-off on these data chosen (it then follows the costs); the confusion matrix follows. */
export const useCheapestCutoff: Intent<void> = {
  perform: (s) => {
    const t = s.costView && proposed(s.costView, 'cheapest');
    return t === null || t === undefined ? s : chooseCutoff(s, { threshold: t, how: 'cheapest' });
  },
  follows: thresholdMoved,
};

/** A cost changed: with a model, the cost curve and the confusion matrix follow (a rejected cost changes nothing). */
export const changeCosts: Intent<Partial<Costs>> = {
  perform: setCosts,
  follows: (b, a) => (a.fit && a.costs !== b.costs ? ['refresh-costs'] : []),
};

/** A column is to be read as another type: a file is read again with the new choice (demos and pastes keep theirs). */
export const readColumnAs: Intent<{ column: string; type: ColumnType }> = {
  perform: (s, { column, type }) =>
    setImportSettings(s, { columnTypes: { ...s.importSettings.columnTypes, [column]: type } }),
  follows: (b, a) =>
    a.data && a.data.source.kind !== 'demo' && a.importSettings.columnTypes !== b.importSettings.columnTypes
      ? ['reread']
      : [],
};

const REMEDY: Record<string, Notice['action']> = {
  'complete-separation': 'use-firth',
  'quasi-separation': 'use-firth',
  'few-events': 'use-ridge',
  'low-events-per-parameter': 'use-ridge',
};

export function withWarnings(s: AppState, warnings: readonly EngineWarning[]): AppState {
  return warnings.reduce<AppState>(
    (acc, w) =>
      notify(acc, {
        kind: 'warning',
        text: w.message,
        suggestion: w.suggestion,
        code: w.code,
        action: REMEDY[w.code],
      }),
    s,
  );
}

/** The message for an outcome column with fewer than two values (no event can be chosen), else null. */
export function outcomeHasOneValue(col: DataSummary['columns'][number]): string | null {
  if (col.distinct >= 2) return null;
  const need =
    'A risk model needs rows with and without the event; choose another outcome column, or check that the file ' +
    'holds both kinds of row.';
  if (col.distinct === 0) return `The outcome "${col.name}" has no values: every cell is missing. ${need}`;
  const value = col.levels[0] ?? (col.min !== null ? String(col.min) : null);
  const which = value !== null ? `: every row with a value is "${value}"` : '';
  return `The outcome "${col.name}" has one value${which}. ${need}`;
}

/** The model as the engine reads it, or the reason it cannot be fitted yet. */
export function buildSpec(s: AppState): { spec: ModelSpec } | { problem: string } {
  if (!s.data) return { problem: 'Open a file or a demo first.' };
  const grouped = s.layout.kind !== 'binary';
  if (!s.outcome) return { problem: grouped ? 'Choose the column of event counts.' : 'Choose the outcome column.' };
  const outcomeCol = s.data.columns.find((c) => c.name === s.outcome);
  const counts = countsColumn(s.layout);
  if (grouped && !counts)
    return {
      problem: `Choose the column of ${s.layout.kind === 'events-trials' ? 'trials' : 'non-events'} per row.`,
    };
  const one = outcomeCol && !grouped ? outcomeHasOneValue(outcomeCol) : null;
  if (one) return { problem: one };
  if (!grouped && !s.event) return { problem: `Choose which value of ${s.outcome} counts as the event.` };
  const roleColumns = new Set([s.outcome, counts, s.weights]);
  const terms: ModelSpec['terms'] = [];
  for (const c of s.data.columns) {
    const r = s.roles[c.name];
    if (!r?.include || roleColumns.has(c.name)) continue;
    if (r.knots > 0 && c.kind === 'numeric')
      terms.push({ type: 'spline', column: c.name, knots: r.knots as 3 | 4 | 5 });
    else
      terms.push(
        r.reference ? { type: 'main', column: c.name, reference: r.reference } : { type: 'main', column: c.name },
      );
  }
  if (terms.length === 0) return { problem: 'Choose at least one predictor.' };
  for (const [a, b] of s.interactions) {
    if (s.roles[a]?.include && s.roles[b]?.include) terms.push({ type: 'interaction', columns: [a, b] });
  }
  const spec: ModelSpec = grouped
    ? { outcome: s.outcome, layout: s.layout, terms }
    : { outcome: s.outcome, event: s.event!, terms };
  if (s.weights) spec.weights = s.weights;
  return { spec };
}
