/** JSON for the result records: typed arrays become arrays, non-finite numbers become null. */
export function toJson(value: unknown): string {
  return JSON.stringify(
    value,
    (_key, v) => {
      if (ArrayBuffer.isView(v) && !(v instanceof DataView))
        return Array.from(v as unknown as ArrayLike<number>, finite);
      return typeof v === 'number' ? finite(v) : v;
    },
    2,
  );
}

function finite(x: number): number | null {
  return Number.isFinite(x) ? x : null;
}
