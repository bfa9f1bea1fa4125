/** Derived: whether the shown results belong to settings that have changed since the fit. */
import type { AppState } from './appState';
import { requestOf } from './effects/fitting';

/** Deep equality of plain records (key order ignored). */
function same(a: unknown, b: unknown): boolean {
  if (a === b) return true;
  if (typeof a !== 'object' || typeof b !== 'object' || a === null || b === null) return false;
  if (Array.isArray(a) !== Array.isArray(b)) return false;
  const ka = Object.keys(a).filter((k) => (a as Record<string, unknown>)[k] !== undefined);
  const kb = Object.keys(b).filter((k) => (b as Record<string, unknown>)[k] !== undefined);
  if (ka.length !== kb.length) return false;
  return ka.every((k) => same((a as Record<string, unknown>)[k], (b as Record<string, unknown>)[k]));
}

/**
 * True when a model is shown but the current settings (roles, outcome, event, reference levels, splines,
 * interactions, method, level, α, λ rule, iteration limit) would ask for a different fit than the one it came from:
 * the fit carries the request it ran, and every field the page sets is compared with it.
 */
export function isStale(s: AppState): boolean {
  if (!s.fit) return false;
  const now = requestOf(s);
  if ('problem' in now) return true;
  const ran = s.fit.request as unknown as Record<string, unknown>;
  return Object.entries(now.request).some(([k, v]) => v !== undefined && !same(v, ran[k]));
}
