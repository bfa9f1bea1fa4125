/**
 * Deep walk of a result record: every number (plain or in a typed array) must be finite.
 * `allow(path, value)` names the places where a non-finite value is documented (e.g. NaN for a missing cell; typed
 * array elements have the path `name[]`); null is always allowed.
 * Returns the offending paths (at most `limit`) so a failure names where it happened.
 */
export function nonFinitePaths(
  value: unknown,
  allow: (path: string, value: number) => boolean = () => false,
  limit = 5,
): string[] {
  const bad: string[] = [];
  const seen = new Set<object>();
  const visit = (v: unknown, path: string): void => {
    if (bad.length >= limit) return;
    if (typeof v === 'number') {
      if (!Number.isFinite(v) && !allow(path, v)) bad.push(`${path} = ${v}`);
      return;
    }
    if (v === null || typeof v !== 'object') return;
    if (seen.has(v)) return;
    seen.add(v);
    if (ArrayBuffer.isView(v)) {
      if (v instanceof Float64Array || v instanceof Float32Array) {
        for (let i = 0; i < v.length && bad.length < limit; i++) {
          if (!Number.isFinite(v[i]) && !allow(`${path}[]`, v[i])) bad.push(`${path}[${i}] = ${v[i]}`);
        }
      }
      return;
    }
    if (Array.isArray(v)) {
      v.forEach((x, i) => visit(x, `${path}[${i}]`));
      return;
    }
    if (v instanceof Map) {
      for (const [k, x] of v) visit(x, `${path}.${String(k)}`);
      return;
    }
    for (const [k, x] of Object.entries(v)) visit(x, path ? `${path}.${k}` : k);
  };
  visit(value, '');
  return bad;
}

/** Path with array indices removed ("a[3].b[]" → "a.b"), for matching documented NaN places. */
export function stem(path: string): string {
  return path.replace(/\[\d*\]/g, '');
}
