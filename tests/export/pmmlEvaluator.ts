// Test helpers: a small XML parser and a tiny PMML 4.4 RegressionModel evaluator (classification with logit
// normalisation: P(first target category) = 1 / (1 + exp(-(intercept + sum of predictor contributions)))),
// written from the PMML 4.4 specification's Regression and Transformations chapters (dmg.org).
import { expect } from 'vitest';
import type { Dataset } from '../../src/engine/core/data';

// ---- a small XML parser (elements, attributes, text, the five predefined entities) ----
export interface El {
  tag: string;
  attrs: Record<string, string>;
  children: El[];
  text: string;
}

function unescape(s: string): string {
  return s.replace(
    /&(lt|gt|quot|apos|amp);/g,
    (_, e) => ({ lt: '<', gt: '>', quot: '"', apos: "'", amp: '&' })[e as 'lt'],
  );
}

export function parseXml(xml: string): El {
  const body = xml.replace(/^<\?xml[^?]*\?>\s*/, '');
  const root: El = { tag: '#root', attrs: {}, children: [], text: '' };
  const stack: El[] = [root];
  const re = /<\/([\w:-]+)\s*>|<([\w:-]+)((?:\s+[\w:-]+="[^"]*")*)\s*(\/?)>|([^<]+)/g;
  let m: RegExpExecArray | null;
  let pos = 0;
  while ((m = re.exec(body))) {
    if (m.index !== pos) throw new Error(`not well-formed near offset ${pos}`);
    pos = re.lastIndex;
    if (m[1]) {
      const top = stack.pop()!;
      if (top.tag !== m[1]) throw new Error(`</${m[1]}> closes <${top.tag}>`);
    } else if (m[2]) {
      const attrs: Record<string, string> = {};
      for (const a of m[3].matchAll(/([\w:-]+)="([^"]*)"/g)) {
        if (a[1] in attrs) throw new Error(`duplicate attribute ${a[1]}`);
        attrs[a[1]] = unescape(a[2]);
      }
      const el: El = { tag: m[2], attrs, children: [], text: '' };
      stack[stack.length - 1].children.push(el);
      if (!m[4]) stack.push(el);
    } else if (m[5]) {
      if (/[<&](?!(lt|gt|quot|apos|amp);)/.test(m[5])) throw new Error('unescaped character data');
      stack[stack.length - 1].text += unescape(m[5]);
    }
  }
  if (pos !== body.length || stack.length !== 1) throw new Error('not well-formed: unclosed elements or trailing text');
  expect(root.children).toHaveLength(1);
  return root.children[0];
}

export const kids = (e: El, tag: string) => e.children.filter((c) => c.tag === tag);
export const kid = (e: El, tag: string) => {
  const k = kids(e, tag);
  expect(k, `<${e.tag}> should have one <${tag}>`).toHaveLength(1);
  return k[0];
};

// ---- a tiny PMML 4.4 RegressionModel evaluator (classification, logit normalisation) ----
export type Row = Record<string, number | string>;

export function pmmlScorer(doc: El): { risk: (row: Row) => number; fields: El[] } {
  const fields = kids(kid(doc, 'DataDictionary'), 'DataField');
  const derived = new Map<string, El>();
  for (const td of kids(doc, 'TransformationDictionary'))
    for (const d of kids(td, 'DerivedField')) derived.set(d.attrs.name, d.children[0]);
  const model = kid(doc, 'RegressionModel');
  const tables = kids(model, 'RegressionTable');
  const value = (name: string, row: Row): number | string => {
    const d = derived.get(name);
    if (d) return expr(d, row);
    if (!(name in row)) throw new Error(`no field ${name}`);
    return row[name];
  };
  const expr = (e: El, row: Row): number => {
    switch (e.tag) {
      case 'Constant':
        return Number(e.text);
      case 'FieldRef':
        return Number(value(e.attrs.field, row));
      case 'NormDiscrete':
        return String(value(e.attrs.field, row)) === e.attrs.value ? 1 : 0;
      case 'Apply': {
        const a = e.children.map((c) => expr(c, row));
        switch (e.attrs.function) {
          case '+':
            return a[0] + a[1];
          case '-':
            return a[0] - a[1];
          case '*':
            return a[0] * a[1];
          case '/':
            return a[0] / a[1];
          case 'max':
            return Math.max(...a);
          case 'pow':
            return a[0] ** a[1];
        }
      }
    }
    throw new Error(`unknown expression ${e.tag} ${e.attrs.function ?? ''}`);
  };
  const first = tables[0];
  const risk = (row: Row): number => {
    let y = Number(first.attrs.intercept);
    for (const p of first.children) {
      const c = Number(p.attrs.coefficient);
      if (p.tag === 'NumericPredictor') y += c * Number(value(p.attrs.name, row)) ** Number(p.attrs.exponent ?? 1);
      else if (p.tag === 'CategoricalPredictor') y += String(value(p.attrs.name, row)) === p.attrs.value ? c : 0;
      else if (p.tag === 'PredictorTerm')
        y += c * p.children.map((f) => Number(value(f.attrs.field, row))).reduce((s, v) => s * v, 1);
      else throw new Error(`unknown predictor ${p.tag}`);
    }
    return 1 / (1 + Math.exp(-y));
  };
  return { risk, fields };
}

export function rowOf(data: Dataset, r: number): Row {
  const row: Row = {};
  for (const c of data.columns) row[c.name] = c.kind === 'numeric' ? c.values[r] : c.levels[c.codes[r]];
  return row;
}
