/** Binned predicted risks and the cut-off window of the cut-off view, from the one threshold structure. */
import { firstAtOrAbove, type PreparedThresholds } from '../engine/evaluation';
import type { RiskBins } from './protocol';

/** Cases (weighted) with risk ≥ t: events and non-events. O(log n). */
function atOrAbove(prep: PreparedThresholds, t: number): { events: number; nonEvents: number } {
  const k = firstAtOrAbove(prep.risks, t);
  return k < prep.risks.length
    ? { events: prep.eventsAtOrAbove[k], nonEvents: prep.nonEventsAtOrAbove[k] }
    : { events: 0, nonEvents: 0 };
}

/**
 * `bins` equal bins [edge i, edge i + 1) from `from` to `to`; the last bin also holds risks equal to `to` when
 * `to` is 1. Counts of the cases outside the bins are returned beside them. O(bins · log n), never the risks.
 */
export function riskBins(prep: PreparedThresholds, from: number, to: number, bins: number): RiskBins {
  const edges = Array.from({ length: bins + 1 }, (_, i) => (i === bins ? to : from + ((to - from) * i) / bins));
  const cum = edges.map((e) => atOrAbove(prep, e));
  const top = to >= 1 ? { events: 0, nonEvents: 0 } : cum[bins];
  const events: number[] = [];
  const nonEvents: number[] = [];
  for (let i = 0; i < bins; i++) {
    const upper = i === bins - 1 ? top : cum[i + 1];
    events.push(cum[i].events - upper.events);
    nonEvents.push(cum[i].nonEvents - upper.nonEvents);
  }
  return {
    edges,
    events,
    nonEvents,
    below: { events: prep.events - cum[0].events, nonEvents: prep.nonEvents - cum[0].nonEvents },
    above: top,
  };
}

/** The smallest distinct risk r with at least a share q of the cases at or below it (null without cases). */
export function riskQuantile(prep: PreparedThresholds, q: number): number | null {
  const K = prep.risks.length;
  if (K === 0 || !(prep.total > 0)) return null;
  for (let k = 0; k < K; k++) {
    const above = k + 1 < K ? prep.eventsAtOrAbove[k + 1] + prep.nonEventsAtOrAbove[k + 1] : 0;
    if (prep.total - above >= q * prep.total - 1e-9 * prep.total) return prep.risks[k];
  }
  return prep.risks[K - 1];
}

/** The rule `cutoffWindow` follows, in words for the page. */
export const CUTOFF_WINDOW_RULE =
  'cut-offs from the 1st to the 99th percentile of the predicted risks (where the expected cost changes), ' +
  'with the cost-based and cheapest cut-offs, widened by a tenth on each side';

/**
 * The window of cut-offs where the expected cost changes: from the 1st to the 99th percentile of the risks,
 * stretched to hold `marks` (e.g. the cost-based and cheapest cut-offs), padded by 10 % of its width on each
 * side (at least 0.005), rounded outwards to a tenth of a power of ten of its width and kept within [0, 1].
 */
export function cutoffWindow(prep: PreparedThresholds, marks: (number | null)[]): { from: number; to: number } {
  const lo0 = riskQuantile(prep, 0.01);
  const hi0 = riskQuantile(prep, 0.99);
  if (lo0 === null || hi0 === null) return { from: 0, to: 1 };
  const inside = marks.filter((m): m is number => m !== null && Number.isFinite(m));
  const lo = Math.min(lo0, ...inside);
  const hi = Math.max(hi0, ...inside);
  const pad = Math.max(0.005, 0.1 * (hi - lo));
  const width = hi - lo + 2 * pad;
  const step = 10 ** Math.floor(Math.log10(width / 10));
  const round = (v: number) => Math.round(v * 1e12) / 1e12;
  const from = Math.max(0, round(Math.floor((lo - pad) / step) * step));
  const to = Math.min(1, round(Math.ceil((hi + pad) / step) * step));
  return { from, to };
}
