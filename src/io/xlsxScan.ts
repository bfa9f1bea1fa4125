const ENTITIES: Record<string, string> = { amp: '&', lt: '<', gt: '>', quot: '"', apos: "'" };

/** A character reference's character; an impossible one (beyond U+10FFFF) becomes U+FFFD. */
const codePoint = (n: number) => (n <= 0x10ffff ? String.fromCodePoint(n) : '\ufffd');

export function unescapeXml(s: string): string {
  return s.replace(/&(amp|lt|gt|quot|apos);|&#(\d+);|&#x([0-9a-f]+);/gi, (_, name: string, dec: string, hex: string) =>
    name ? ENTITIES[name.toLowerCase()] : codePoint(dec ? Number(dec) : parseInt(hex, 16)),
  );
}

function attr(attrs: string, name: string): string | undefined {
  const m = new RegExp(`(?:^|\\s)${name}="([^"]*)"`).exec(attrs);
  return m ? unescapeXml(m[1]) : undefined;
}

/** "B3" → { row: 3, col: 1 } (column 0-based). */
export function cellAddress(ref: string): { row: number; col: number } | null {
  const m = /^([A-Z]+)(\d+)$/.exec(ref);
  if (!m) return null;
  let col = 0;
  for (const ch of m[1]) col = col * 26 + (ch.charCodeAt(0) - 64);
  return { row: Number(m[2]), col: col - 1 };
}

/** Sheet names in workbook order with the path of each sheet's XML part (ECMA-376 Part 1, §18.2.19–20). */
export function workbookSheets(workbookXml: string, relsXml: string): { name: string; path: string }[] {
  const targets = new Map<string, string>();
  for (const m of relsXml.matchAll(/<Relationship\b([^>]*)\/?>/g)) {
    const id = attr(m[1], 'Id'),
      target = attr(m[1], 'Target');
    if (id && target) targets.set(id, target.startsWith('/') ? target.slice(1) : `xl/${target}`);
  }
  const out: { name: string; path: string }[] = [];
  for (const m of workbookXml.matchAll(/<(?:\w+:)?sheet\b([^>]*)\/?>/g)) {
    const name = attr(m[1], 'name');
    const id = attr(m[1], 'r:id') ?? /\s[\w]+:id="([^"]*)"/.exec(m[1])?.[1];
    if (name !== undefined) out.push({ name, path: (id && targets.get(id)) ?? '' });
  }
  return out;
}
