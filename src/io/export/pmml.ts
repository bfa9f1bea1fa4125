import { FulcraError } from '../../engine/core';
import type { DesignRecipe, FitResult } from '../../engine/core';

export interface PmmlOptions {
  fulcraVersion: string;
  /** ISO date-time for the Header timestamp. */
  created: string;
  modelName?: string;
  /**
   * The outcome's levels as they appear in the data. PMML's binary logit needs two target categories: with two
   * levels the other one is the non-event; otherwise (or when omitted) "0"/"1" for a 0/1 outcome, else
   * `not <event>` stands for every non-event level.
   */
  outcomeLevels?: string[];
}

type RecipeTerm = DesignRecipe['terms'][number];

/** One design column as PMML: a raw field, a derived field, or a product of fields. */
interface ColumnExpr {
  name: string;
  kind: 'numeric' | 'categorical' | 'product';
  field?: string;
  value?: string;
  factors?: string[];
}

/**
 * Writes a fitted model as a PMML 4.4 RegressionModel (functionName="classification",
 * normalizationMethod="logit"; Data Mining Group, PMML 4.4 "Regression" and "Transformations" chapters).
 * Numeric terms → NumericPredictor; categorical terms → CategoricalPredictor per non-reference level;
 * restricted cubic spline terms → NumericPredictor on the raw column plus one DerivedField per basis column
 * (an Apply expression of Harrell's basis, splines.ts); interactions → PredictorTerm over FieldRefs (a
 * categorical part enters through a NormDiscrete indicator DerivedField named like the design column).
 * Every DesignRecipe term can be expressed; a fit whose design columns do not follow the recipe's naming
 * (e.g. a model file edited by hand) is refused with FulcraError 'pmml-unsupported'. Aliased columns are left out.
 * P(event) = 1 / (1 + exp(−(intercept + Σ terms))); the second RegressionTable (intercept 0) is the non-event.
 */
export function modelToPmml(fit: FitResult, options: PmmlOptions): string {
  const recipe = fit.recipe;
  const dataFields = new Map<string, { optype: 'continuous' | 'categorical'; values?: string[] }>();
  const derived: string[] = [];
  const derivedNames = new Set<string>();
  const predictors: { expr: ColumnExpr; coefficient: number }[] = [];

  const mainOf = (column: string): RecipeTerm | undefined =>
    recipe.terms.find((t) => t.type !== 'interaction' && t.column === column);
  const addNumericField = (column: string): void => {
    const existing = dataFields.get(column);
    if (existing && existing.optype !== 'continuous')
      unsupported(`column "${column}" is used both as categorical and as numeric`);
    dataFields.set(column, { optype: 'continuous' });
  };
  const addIndicator = (column: string, level: string): string => {
    const name = `${column}=${level}`;
    if (!derivedNames.has(name)) {
      derivedNames.add(name);
      derived.push(
        [
          `    <DerivedField name="${x(name)}" optype="continuous" dataType="double">`,
          `      <NormDiscrete field="${x(column)}" value="${x(level)}"/>`,
          '    </DerivedField>',
        ].join('\n'),
      );
    }
    return name;
  };

  const partColumns = (part: string): { name: string; field: string }[] => {
    const t = mainOf(part);
    if (t && t.type === 'categorical')
      return t.levels
        .filter((l) => l !== t.reference)
        .map((l) => ({ name: `${part}=${l}`, field: addIndicator(part, l) }));
    addNumericField(part);
    return [{ name: part, field: part }];
  };

  for (const t of recipe.terms) {
    const exprs: ColumnExpr[] = [];
    if (t.type === 'numeric') {
      addNumericField(t.column);
      exprs.push({ name: t.column, kind: 'numeric', field: t.column });
    } else if (t.type === 'categorical') {
      dataFields.set(t.column, { optype: 'categorical', values: [...t.levels] });
      for (const level of t.levels)
        if (level !== t.reference)
          exprs.push({ name: `${t.column}=${level}`, kind: 'categorical', field: t.column, value: level });
    } else if (t.type === 'spline') {
      addNumericField(t.column);
      exprs.push({ name: t.column, kind: 'numeric', field: t.column });
      for (let j = 0; j < t.knots.length - 2; j++) {
        const name = t.column + "'".repeat(j + 1);
        if (!derivedNames.has(name)) {
          derivedNames.add(name);
          derived.push(
            [
              `    <DerivedField name="${x(name)}" optype="continuous" dataType="double">`,
              splineExpression(t.column, t.knots, j, 6),
              '    </DerivedField>',
            ].join('\n'),
          );
        }
        exprs.push({ name, kind: 'numeric', field: name });
      }
    } else {
      const a = partColumns(t.parts[0]);
      const b = partColumns(t.parts[1]);
      for (const ca of a)
        for (const cb of b)
          exprs.push({ name: `${ca.name}:${cb.name}`, kind: 'product', factors: [ca.field, cb.field] });
    }
    const row = fit.terms.find((r) => r.name === t.name);
    if (!row) unsupported(`the fit has no term named "${t.name}"`);
    if (row.columns.length !== exprs.length)
      unsupported(`term "${t.name}" has ${row.columns.length} design columns; its recipe implies ${exprs.length}`);
    row.columns.forEach((j, k) => {
      const coef = fit.coefficients[j];
      if (!coef || coef.name !== exprs[k].name)
        unsupported(`design column ${j} is "${coef?.name}" but the recipe of "${t.name}" implies "${exprs[k].name}"`);
      if (!coef.aliased) predictors.push({ expr: exprs[k], coefficient: coef.estimate });
    });
  }
  for (const name of derivedNames)
    if (dataFields.has(name)) unsupported(`the derived field "${name}" has the same name as a data column`);
  for (const p of predictors)
    if (!Number.isFinite(p.coefficient)) unsupported(`the coefficient of "${p.expr.name}" is not finite`);
  const intercept = fit.coefficients[0]?.estimate;
  if (intercept === undefined || !Number.isFinite(intercept)) unsupported('the intercept is missing or not finite');

  const [event, nonEvent] = targetCategories(recipe.event, options.outcomeLevels);
  const fields = [...dataFields.entries()];
  const dd = [
    [
      `    <DataField name="${x(recipe.outcome)}" optype="categorical" dataType="string">`,
      `      <Value value="${x(event)}"/>`,
      `      <Value value="${x(nonEvent)}"/>`,
      '    </DataField>',
    ].join('\n'),
    ...fields.map(([name, f]) =>
      f.optype === 'continuous'
        ? `    <DataField name="${x(name)}" optype="continuous" dataType="double"/>`
        : [
            `    <DataField name="${x(name)}" optype="categorical" dataType="string">`,
            ...f.values!.map((v) => `      <Value value="${x(v)}"/>`),
            '    </DataField>',
          ].join('\n'),
    ),
  ];
  const num = predictors.filter((p) => p.expr.kind === 'numeric');
  const cat = predictors.filter((p) => p.expr.kind === 'categorical');
  const prod = predictors.filter((p) => p.expr.kind === 'product');
  const table = [
    ...num.map(
      (p) => `      <NumericPredictor name="${x(p.expr.field!)}" exponent="1" coefficient="${n(p.coefficient)}"/>`,
    ),
    ...cat.map(
      (p) =>
        `      <CategoricalPredictor name="${x(p.expr.field!)}" value="${x(p.expr.value!)}" ` +
        `coefficient="${n(p.coefficient)}"/>`,
    ),
    ...prod.map((p) =>
      [
        `      <PredictorTerm name="${x(p.expr.name)}" coefficient="${n(p.coefficient)}">`,
        ...p.expr.factors!.map((f) => `        <FieldRef field="${x(f)}"/>`),
        '      </PredictorTerm>',
      ].join('\n'),
    ),
  ];
  const modelName = options.modelName ?? `Risk of ${recipe.outcome} = ${recipe.event}`;
  const description =
    `Logistic regression (${fit.method}); ` + `P(${recipe.outcome} = ${event}) = 1 / (1 + exp(-linear predictor))`;
  return [
    '<?xml version="1.0" encoding="UTF-8"?>',
    '<PMML xmlns="http://www.dmg.org/PMML-4_4" version="4.4">',
    `  <Header description="${x(description)}">`,
    `    <Application name="Fulcra" version="${x(options.fulcraVersion)}"/>`,
    `    <Timestamp>${x(options.created)}</Timestamp>`,
    '  </Header>',
    `  <DataDictionary numberOfFields="${dd.length}">`,
    ...dd,
    '  </DataDictionary>',
    ...(derived.length > 0 ? ['  <TransformationDictionary>', ...derived, '  </TransformationDictionary>'] : []),
    `  <RegressionModel modelName="${x(modelName)}" functionName="classification" ` +
      'algorithmName="logisticRegression" normalizationMethod="logit">',
    '    <MiningSchema>',
    `      <MiningField name="${x(recipe.outcome)}" usageType="target"/>`,
    ...fields.map(([name]) => `      <MiningField name="${x(name)}" usageType="active"/>`),
    '    </MiningSchema>',
    '    <Output>',
    `      <OutputField name="risk" optype="continuous" dataType="double" feature="probability" value="${x(event)}"/>`,
    '    </Output>',
    `    <RegressionTable intercept="${n(intercept)}" targetCategory="${x(event)}"${table.length > 0 ? '>' : '/>'}`,
    ...(table.length > 0 ? [...table, '    </RegressionTable>'] : []),
    `    <RegressionTable intercept="0" targetCategory="${x(nonEvent)}"/>`,
    '  </RegressionModel>',
    '</PMML>',
    '',
  ].join('\n');
}

function unsupported(what: string): never {
  throw new FulcraError(
    'pmml-unsupported',
    `The model cannot be written as PMML: ${what}.`,
    'Refit the model in Fulcra and export again.',
  );
}

function targetCategories(event: string, levels?: string[]): [string, string] {
  if (levels && levels.length === 2 && levels.includes(event)) return [event, levels.find((l) => l !== event)!];
  if (event === '1' && (!levels || levels.every((l) => l === '0' || l === '1'))) return ['1', '0'];
  if (event === '0' && (!levels || levels.every((l) => l === '0' || l === '1'))) return ['0', '1'];
  return [event, `not ${event}`];
}

/** Harrell's restricted cubic spline basis column j (0-based) of `field` as a PMML Apply expression. */
function splineExpression(field: string, knots: number[], j: number, indent: number): string {
  const k = knots.length;
  const tk = knots[k - 1];
  const tk1 = knots[k - 2];
  const tj = knots[j];
  const c = (t: number) =>
    apply('pow', [apply('max', [apply('-', [fieldRef(field), constant(t)]), constant(0)]), constant(3)]);
  const expr = apply('/', [
    apply('+', [
      apply('-', [c(tj), apply('*', [c(tk1), constant((tk - tj) / (tk - tk1))])]),
      apply('*', [c(tk), constant((tk1 - tj) / (tk - tk1))]),
    ]),
    constant((tk - knots[0]) ** 2),
  ]);
  return render(expr, indent);
}

type Node = { tag: string; attrs: Record<string, string>; children: Node[]; text?: string };
const apply = (fn: string, children: Node[]): Node => ({ tag: 'Apply', attrs: { function: fn }, children });
const fieldRef = (f: string): Node => ({ tag: 'FieldRef', attrs: { field: f }, children: [] });
const constant = (v: number): Node => ({ tag: 'Constant', attrs: { dataType: 'double' }, children: [], text: n(v) });

function render(node: Node, indent: number): string {
  const pad = ' '.repeat(indent);
  const attrs = Object.entries(node.attrs)
    .map(([k, v]) => ` ${k}="${x(v)}"`)
    .join('');
  if (node.text !== undefined) return `${pad}<${node.tag}${attrs}>${x(node.text)}</${node.tag}>`;
  if (node.children.length === 0) return `${pad}<${node.tag}${attrs}/>`;
  return [
    `${pad}<${node.tag}${attrs}>`,
    ...node.children.map((ch) => render(ch, indent + 2)),
    `${pad}</${node.tag}>`,
  ].join('\n');
}

/** Shortest round-trip decimal of a double (ECMAScript Number→String). */
function n(v: number): string {
  return String(v);
}

function x(s: string): string {
  return s
    .replace(/&/g, '&amp;')
    .replace(/</g, '&lt;')
    .replace(/>/g, '&gt;')
    .replace(/"/g, '&quot;')
    .replace(/'/g, '&apos;');
}
