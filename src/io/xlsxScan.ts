/** What the sheet XML says that the cell values alone do not: error cells and formulas. */
export interface SheetScan {
  /** Error cells: 1-based sheet row, 0-based column, error text such as "#DIV/0!". */
  errors: { row: number; col: number; value: string }[];
  formulas: number;
  /** Formula cells saved without a result (cell reference such as "B3"). */
  formulasWithoutValue: string[];
}

const ENTITIES: Record<string, string> = { amp: '&', lt: '<', gt: '>', quot: '"', apos: "'" };

export function unescapeXml(s: string): string {
  return s.replace(/&(amp|lt|gt|quot|apos);|&#(\d+);|&#x([0-9a-f]+);/gi, (_, name: string, dec: string, hex: string) =>
    name ? ENTITIES[name.toLowerCase()] : String.fromCodePoint(dec ? Number(dec) : parseInt(hex, 16)),
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

/** Finds error cells (t="e") and formula cells (<f>) in a worksheet's XML. */
export function scanSheet(xml: string): SheetScan {
  const scan: SheetScan = { errors: [], formulas: 0, formulasWithoutValue: [] };
  if (xml.indexOf('t="e"') < 0 && xml.indexOf('<f') < 0) return scan;
  for (const m of xml.matchAll(/<c\b([^>]*?)(?:\/>|>([\s\S]*?)<\/c>)/g)) {
    const attrs = m[1],
      body = m[2] ?? '';
    const hasFormula = /<f\b/.test(body);
    const ref = attr(attrs, 'r') ?? '';
    if (hasFormula) {
      scan.formulas++;
      if (!/<v>/.test(body) && scan.formulasWithoutValue.length < 1000) scan.formulasWithoutValue.push(ref);
    }
    if (attr(attrs, 't') === 'e') {
      const a = cellAddress(ref);
      const v = /<v>([^<]*)<\/v>/.exec(body)?.[1];
      if (a && v) scan.errors.push({ row: a.row, col: a.col, value: unescapeXml(v) });
    }
  }
  return scan;
}
