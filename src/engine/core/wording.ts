/**
 * Small English wording helpers shared by every layer (engine messages, io notices, report, screens), so that
 * counts and ordinals read the same everywhere.
 */

/** "1 row", "2 rows", "1,204 cells are" — the count with its noun, singular only for exactly 1. */
export function plural(n: number, one: string, many = one + 's'): string {
  return `${n.toLocaleString('en-US')} ${n === 1 ? one : many}`;
}

/** English ordinal of an integer: 1st 2nd 3rd 4th 11th 12th 13th 21st 22nd 101st 111th. */
export function ordinal(n: number): string {
  const a = Math.abs(Math.trunc(n));
  const lastTwo = a % 100;
  const suffix =
    lastTwo >= 11 && lastTwo <= 13 ? 'th' : a % 10 === 1 ? 'st' : a % 10 === 2 ? 'nd' : a % 10 === 3 ? 'rd' : 'th';
  return `${Math.trunc(n)}${suffix}`;
}

/** "3.1 GB", "2 GB", "740 MB": binary units, as operating systems show memory; at most one decimal below 10 GB. */
export function formatBytes(b: number): string {
  if (b >= 1024 ** 3) {
    const g = b / 1024 ** 3;
    return `${g < 10 ? +g.toFixed(1) : Math.round(g)} GB`;
  }
  if (b >= 1024 ** 2) return `${Math.max(1, Math.round(b / 1024 ** 2))} MB`;
  return `${Math.max(1, Math.round(b / 1024))} KB`;
}
