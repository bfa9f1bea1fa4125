import { FulcraError, type Costs } from '../engine/core';
import type { ModelComparison } from '../engine/comparison';
import { compareAnalyses, scoresOfAnalysis, type ComparisonOutcome } from '../engine/workflow';
import { requireData, requireRecord, type Session } from './session';

/** One kept model: what the session held right after its fit (record, apparent scores, per-row diagnostics). */
type HeldModel = Pick<Session, 'record' | 'y' | 'risk' | 'prepared' | 'diagnostics'>;

/** A kept model as the page names it in a call: the worker's key and the model's name. */
export interface KeptKey {
  key: number;
  label: string;
}

/** Each kept model's typical predictor values (the risk curve's), by key. */
type Typical = Record<string, string | number>;

interface KeptModels {
  /** The data the models were fitted on: other data loaded since make them void. */
  data: Session['data'];
  models: Map<number, HeldModel & { typical: Typical }>;
  next: number;
  /** The last comparison made, for the PDF; null when none (or the data changed). */
  comparison: ModelComparison | null;
}

/** Kept beside the session (one per api): the models of this data, by the key the page was given for each. */
const kept = new WeakMap<Session, KeptModels>();

/** The kept models of the session's data (none once other data were loaded), or null. */
function current(s: Session): KeptModels | null {
  const k = kept.get(s);
  return k && k.data === s.data ? k : null;
}

function keptOf(s: Session): KeptModels {
  let k = current(s);
  if (!k) {
    // Keys start at a random number so that a key from an engine that was restarted names no model of this one.
    const next = kept.get(s)?.next ?? 1 + Math.floor(Math.random() * 2 ** 40);
    k = { data: s.data, models: new Map(), next, comparison: null };
    kept.set(s, k);
  }
  return k;
}

/**
 * Keeps the model the session holds now (right after a fit) and returns its key; the page stores the key with the
 * model so that showing it again restores it without refitting. The session's data must be those of the fit.
 */
export function keepFittedModel(s: Session, typical: Typical): number {
  requireRecord(s);
  const k = keptOf(s);
  const key = k.next++;
  const { record, y, risk, prepared, diagnostics } = s;
  k.models.set(key, { record, y, risk, prepared, diagnostics, typical });
  return key;
}

/**
 * Makes the kept model `key` the session's current one (no refit) and returns its typical predictor values; null
 * when it is not held (the engine was restarted, or other data were loaded).
 */
export function showKeptModel(s: Session, key: number): Typical | null {
  const m = current(s)?.models.get(key);
  if (!m) return null;
  const { typical, ...held } = m;
  Object.assign(s, held, { imputed: null });
  return typical;
}

/** Drops kept models the page no longer lists. */
export function forgetModels(s: Session, keys: number[]): void {
  const k = current(s);
  for (const key of keys) k?.models.delete(key);
}

function held(s: Session, key: number, label: string) {
  const m = current(s)?.models.get(key);
  if (!m?.record)
    throw new FulcraError(
      'model-not-held',
      `${label} is no longer held by the engine (it was restarted).`,
      `Show ${label} once (it is restored from its settings), then compare again.`,
    );
  return m.record;
}

/**
 * Compares two kept models (workflow/compareStep compareAnalyses, the same path as `npm run fit --compare-with`)
 * at the page's cut-off and costs; the comparison made is kept for the PDF.
 */
export function compareKeptModels(
  s: Session,
  a: KeptKey,
  b: KeptKey,
  threshold: number,
  costs: Costs,
): ComparisonOutcome {
  const data = requireData(s);
  const ra = held(s, a.key, a.label);
  const rb = held(s, b.key, b.label);
  const outcome = compareAnalyses(
    data,
    { label: a.label, record: ra, scores: scoresOfAnalysis(data, ra) },
    { label: b.label, record: rb, scores: scoresOfAnalysis(data, rb) },
    { threshold, costs },
  );
  keptOf(s).comparison = outcome.status === 'compared' ? outcome.comparison : null;
  return outcome;
}

/** The last comparison made on the page, for the PDF (undefined when none). */
export function comparisonForReport(s: Session): ModelComparison | undefined {
  return current(s)?.comparison ?? undefined;
}
