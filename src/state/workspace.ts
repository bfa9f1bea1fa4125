/**
 * The workbench state as a saved Workspace (src/io/export/workspaceFile.ts) and back. The Workspace's own
 * fields carry what any reader understands (model spec, cut-off, costs, words); `extra.workbench` carries the
 * rest of the set-up exactly (every column's role, method incl. lasso/elastic net, α, λ rule, reading options).
 */
import type { Dataset } from '../engine/core';
import { cleanOddsUnits } from '../report/oddsUnits';
import type { Workspace } from '../io/export/workspaceFile';
import type { DataSummary, FitRequest } from '../worker/protocol';
import { buildSpec } from './actions';
import { defaultImportSettings, initialState, type AppState, type PredictorRole } from './appState';
import { checkWorkspace, type CheckedWorkspace } from './workspaceCheck';
import { savedModels, type SavedModel } from './modelsState';

/** The part of the state a workspace keeps (the same fields as AppState), plus whether a model had been fitted. */
export interface WorkbenchSettings extends Pick<
  AppState,
  | 'outcome'
  | 'event'
  | 'roles'
  | 'interactions'
  | 'method'
  | 'alpha'
  | 'lambdaRule'
  | 'level'
  | 'maxIter'
  | 'threshold'
  | 'costs'
  | 'reportText'
  | 'oddsUnits'
  | 'importSettings'
  | 'view'
> {
  /** How the cut-off was set; absent in workspaces saved before it was kept (restoring then says "restored"). */
  cutoffHow?: AppState['cutoffHow'];
  /** The costs were set by the user; absent in workspaces saved before it was kept (then judged from the costs). */
  costsSetByUser?: boolean;
  /** Outcome layout and frequency-weight column; absent in workspaces saved before they existed (yes/no, none). */
  layout?: AppState['layout'];
  weights?: string | null;
  /** A model had been fitted: fit it again on restore so the results reappear. */
  fitted: boolean;
  /**
   * The request the shown result was fitted for (it may differ from the settings when they changed after the fit):
   * restoring refits exactly this, so the page shows the same model and says it is out of date. Absent in
   * workspaces saved before it was kept (then the settings are fitted).
   */
  fittedRequest?: FitRequest | null;
  /**
   * The models kept in the session, each by its name and request (modelsState.ts): restoring refits each of them
   * (the shown one first, as `fittedRequest`). Absent in workspaces saved before models were kept.
   */
  keptModels?: SavedModel[];
}

/** The data the page keeps (fetched back from the worker after each load), with an id per load. */
export interface HeldData {
  id: string;
  data: Dataset;
  summary: DataSummary;
}

export function settingsOf(s: AppState): WorkbenchSettings {
  return {
    outcome: s.outcome,
    event: s.event,
    layout: s.layout,
    weights: s.weights,
    roles: s.roles,
    interactions: s.interactions,
    method: s.method,
    alpha: s.alpha,
    lambdaRule: s.lambdaRule,
    level: s.level,
    maxIter: s.maxIter,
    threshold: s.threshold,
    costs: s.costs,
    costsSetByUser: s.costsSetByUser,
    cutoffHow: s.cutoffHow,
    reportText: s.reportText,
    oddsUnits: s.oddsUnits,
    importSettings: s.importSettings,
    view: s.view,
    fitted: s.fit !== null,
    fittedRequest: s.fit?.request ?? null,
    keptModels: savedModels(s.models),
  };
}

/** The workspace record of the current state; `data` is null when only the settings are saved. */
export function toWorkspace(s: AppState, held: HeldData | null, withData: boolean): Workspace {
  const built = buildSpec(s);
  const m = s.method;
  return {
    fileName: held?.summary.source.name ?? null,
    data: withData && held ? held.data : null,
    spec: 'spec' in built ? built.spec : null,
    fitOptions: {
      ...(m === 'ml' || m === 'ridge' || m === 'firth' ? { method: m } : {}),
      level: s.level,
      maxIter: s.maxIter,
    },
    seed: null,
    threshold: s.threshold,
    costs: { ...s.costs },
    freeText: { ...s.reportText },
    extra: {
      workbench: JSON.parse(JSON.stringify(settingsOf(s))),
      summary: held ? JSON.parse(JSON.stringify(held.summary)) : null,
      dataId: held?.id ?? null,
    },
  };
}

/**
 * The settings of a saved workspace: taken from `extra.workbench` when Fulcra wrote it, otherwise rebuilt from
 * the spec, fit options, cut-off, costs and words (a workspace written by another tool or version). Refuses a bad
 * workspace (FulcraError naming the field, see workspaceCheck.ts); `checked` is its result when already at hand.
 */
export function settingsFromWorkspace(
  ws: Workspace,
  checked: CheckedWorkspace = checkWorkspace(ws),
): WorkbenchSettings {
  // Neither default is a saved choice: without a saved value restoring decides (see workspaceRestored).
  const { cutoffHow: _how, costsSetByUser: _set, ...defaults } = settingsOf(initialState);
  const base: WorkbenchSettings = { ...defaults, importSettings: defaultImportSettings };
  if (checked.workbench)
    return { ...base, ...checked.workbench, oddsUnits: cleanOddsUnits(checked.workbench.oddsUnits) };
  const roles: Record<string, PredictorRole> = {};
  const interactions: [string, string][] = [];
  for (const t of ws.spec?.terms ?? []) {
    if (t.type === 'main') roles[t.column] = { include: true, reference: t.reference ?? null, knots: 0 };
    else if (t.type === 'spline') roles[t.column] = { include: true, reference: null, knots: t.knots };
    else interactions.push(t.columns);
  }
  return {
    ...base,
    outcome: ws.spec?.outcome ?? null,
    event: ws.spec?.event ?? null,
    layout: ws.spec?.layout ?? { kind: 'binary' },
    weights: ws.spec?.weights ?? null,
    roles,
    interactions,
    method: ws.fitOptions.method ?? 'ml',
    level: ws.fitOptions.level ?? base.level,
    maxIter: ws.fitOptions.maxIter ?? base.maxIter,
    threshold: ws.threshold ?? base.threshold,
    costs: ws.costs && ws.costs.missedCase > 0 && ws.costs.falseAlarm > 0 ? { ...ws.costs } : base.costs,
    reportText: { ...ws.freeText },
    fitted: ws.spec !== null,
    view: ws.spec !== null ? 'model' : 'data',
  };
}

/** The id of the data a stored workspace record was saved with (settings and data are kept apart). */
export function dataIdOf(ws: Workspace): string | null {
  const id = ws.extra?.dataId;
  return typeof id === 'string' ? id : null;
}
