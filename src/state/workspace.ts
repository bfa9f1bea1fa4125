/**
 * The workbench state as a saved Workspace (src/io/export/workspaceFile.ts) and back. The Workspace's own
 * fields carry what any reader understands (model spec, cut-off, costs, words); `extra.workbench` carries the
 * rest of the set-up exactly (every column's role, method incl. lasso/elastic net, α, λ rule, reading options).
 */
import type { Dataset } from '../engine/core';
import { cleanOddsUnits } from '../report/oddsUnits';
import type { Workspace } from '../io/export/workspaceFile';
import type { CutoffHow, DataSummary } from '../worker/protocol';
import { buildSpec } from './actions';
import { defaultImportSettings, initialState, type AppState, type PredictorRole } from './appState';

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
  /** A model had been fitted: fit it again on restore so the results reappear. */
  fitted: boolean;
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

const isObject = (v: unknown): v is Record<string, unknown> => typeof v === 'object' && v !== null && !Array.isArray(v);
/** A saved iteration limit if it is one the engine accepts; otherwise (older workspaces: none) the default 50. */
const maxIterOr = (v: unknown, fallback: number): number =>
  Number.isInteger(v) && (v as number) >= 1 && (v as number) <= 10_000 ? (v as number) : fallback;
const cutoffHows: readonly unknown[] = ['cost-based', 'cheapest', 'hand', 'restored'] satisfies CutoffHow[];
/** How the cut-off was set and whether the costs were the user's, each only when saved and valid. */
const originOf = (w: Record<string, unknown>): Pick<WorkbenchSettings, 'cutoffHow' | 'costsSetByUser'> => ({
  ...(cutoffHows.includes(w.cutoffHow) ? { cutoffHow: w.cutoffHow as CutoffHow } : {}),
  ...(typeof w.costsSetByUser === 'boolean' ? { costsSetByUser: w.costsSetByUser } : {}),
});

/**
 * The settings of a saved workspace: taken from `extra.workbench` when Fulcra wrote it, otherwise rebuilt from
 * the spec, fit options, cut-off, costs and words (a workspace written by another tool or version).
 */
export function settingsFromWorkspace(ws: Workspace): WorkbenchSettings {
  const w = ws.extra?.workbench;
  // Neither default is a saved choice: without a valid saved value restoring decides (see workspaceRestored).
  const { cutoffHow: _how, costsSetByUser: _set, ...defaults } = settingsOf(initialState);
  const base: WorkbenchSettings = { ...defaults, importSettings: defaultImportSettings };
  if (isObject(w) && isObject(w.roles) && Array.isArray(w.interactions) && isObject(w.costs)) {
    const { cutoffHow: _savedHow, costsSetByUser: _savedSet, ...saved } = w as unknown as WorkbenchSettings;
    // Workspaces saved before the one method enum call elastic net 'elasticnet'.
    const method = (saved.method as string) === 'elasticnet' ? 'elastic-net' : saved.method;
    const oddsUnits = cleanOddsUnits(saved.oddsUnits);
    return { ...base, ...saved, method, maxIter: maxIterOr(saved.maxIter, base.maxIter), oddsUnits, ...originOf(w) };
  }
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
    roles,
    interactions,
    method: ws.fitOptions.method ?? 'ml',
    level: ws.fitOptions.level ?? base.level,
    maxIter: maxIterOr(ws.fitOptions.maxIter, base.maxIter),
    threshold: ws.threshold ?? base.threshold,
    costs: ws.costs && ws.costs.missedCase > 0 && ws.costs.falseAlarm > 0 ? { ...ws.costs } : base.costs,
    reportText: { ...ws.freeText },
    fitted: ws.spec !== null,
    view: ws.spec !== null ? 'model' : 'data',
  };
}

/** The data summary saved with a workspace (so the importer's types and reasons come back), if any. */
export function summaryFromWorkspace(ws: Workspace): DataSummary | null {
  const s = ws.extra?.summary;
  return isObject(s) && Array.isArray(s.columns) && isObject(s.source) ? (s as unknown as DataSummary) : null;
}

export function dataIdOf(ws: Workspace): string | null {
  const id = ws.extra?.dataId;
  return typeof id === 'string' ? id : null;
}
