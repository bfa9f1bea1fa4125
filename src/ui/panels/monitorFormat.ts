/** Display helpers shared by the monitoring view's parts. */
import { ci, num } from '../format';

type Est = { estimate: number | null; lower: number | null; upper: number | null } | null;

/** "1.50 (1.20 to 1.85)", or a dash when there is no estimate. */
export const est = (e: Est, d: number): string =>
  e && e.estimate !== null ? `${num(e.estimate, d)} (${ci(e.lower, e.upper, d)})` : '—';

/** A level as a percentage: 0.998 → "99.8%". */
export const pctLevel = (l: number): string => `${+(100 * l).toPrecision(4)}%`;
