import { KNOT_RULE, REFERENCE_RULE } from './rules';
import { isPenalised } from '../engine/core';
import type { FitResult } from '../engine/core';
import { oddsDisplayRows, type OddsUnits } from './oddsUnits';
import { modelEquation, riskFormula } from './equation';
import {
  DASH,
  formatCount,
  formatFixed,
  formatOr,
  formatP,
  formatPercent,
  formatPlain,
  formatSig,
  levelText,
} from './format';
import type { PdfLayout } from './pdfLayout';
import type { ReportInput, SampleSizeSummary } from './reportInput';

// Report sections about the data and the model (TRIPOD items: source, participants, outcome, predictors,
// sample size, missing data, model development and specification).

export function purpose(L: PdfLayout, input: ReportInput): void {
  L.section('Purpose, setting and population');
  const t = input.freeText ?? {};
  const show = (s: string | undefined): string => (s && s.trim().length > 0 ? s.trim() : 'Not stated by the user.');
  L.subheading('Purpose of the model');
  L.paragraph(show(t.purpose));
  L.subheading('Setting');
  L.paragraph(show(t.setting));
  L.subheading('Population');
  L.paragraph(show(t.population));
  if (t.notes && t.notes.trim().length > 0) {
    L.subheading('Notes');
    L.paragraph(t.notes.trim());
  }
}

export function dataSection(L: PdfLayout, input: ReportInput): void {
  const m = input.model;
  L.section('Data and outcome');
  const s = input.source;
  const rows: [string, string][] = [
    ['Data file', s.fileName],
    ['Rows in file', formatCount(s.rows) + (s.columns !== undefined ? ` (${formatCount(s.columns)} columns)` : '')],
  ];
  if (s.dateRange)
    rows.push(['Date range', `${s.dateRange.from} to ${s.dateRange.to} (column "${s.dateRange.column}")`]);
  const lay = input.layout;
  if (lay && (lay.kind !== 'binary' || lay.weights)) rows.push(...layoutRows(lay, m));
  else
    rows.push(
      ['Outcome', `"${m.recipe.outcome}"; the event is "${m.recipe.event}"`],
      [
        'Rows used',
        `${formatCount(m.nUsed)}: ${formatCount(m.events)} ${m.events === 1 ? 'event' : 'events'} ` +
          `(${formatPercent(m.nUsed > 0 ? m.events / m.nUsed : NaN)}) and ${formatCount(m.nonEvents)} non-events`,
      ],
      [
        'Rows left out',
        m.nDropped === 0 ? 'none' : `${formatCount(m.nDropped)} with a missing value in the outcome or a predictor`,
      ],
    );
  const dropped = Object.entries(m.droppedByColumn).filter(([, n]) => n > 0);
  if (dropped.length > 0)
    rows.push(['Missing by column', dropped.map(([c, n]) => `${c}: ${formatCount(n)}`).join('; ')]);
  const imputed = input.imputation
    ? ` As a sensitivity analysis the same model was also fitted on ${input.imputation.m} multiply imputed datasets ` +
      'and pooled by Rubin\u2019s rules (section \u201cMultiple imputation\u201d).'
    : '';
  rows.push([
    'Missing data handling',
    input.missingData ??
      (m.nDropped > 0
        ? 'Complete-case analysis: rows with any missing value in the model\u2019s variables were left out. ' +
          'This is unbiased only if missingness does not depend on the outcome ' +
          `(for example, if data are missing completely at random).${imputed}`
        : 'No missing values in the model\u2019s variables.'),
  ]);
  L.keyValues(rows, 42);
}

export function predictors(L: PdfLayout, m: FitResult): void {
  L.section('Predictors and their handling');
  const rows = m.recipe.terms.map((t) => {
    switch (t.type) {
      case 'numeric':
        return [t.name, 'continuous', 'linear (as recorded)'];
      case 'categorical':
        return [
          t.name,
          `categorical, ${t.levels.length} levels`,
          `indicator coding; reference "${t.reference}"; levels ${t.levels.map((l) => `"${l}"`).join(', ')}`,
        ];
      case 'spline':
        return [
          t.name,
          'continuous',
          `restricted cubic spline, ${t.knots.length} knots at ${t.knots.map((k) => formatPlain(k, 6)).join(', ')}`,
        ];
      case 'interaction':
        return [t.name, 'interaction', `product of ${t.parts[0]} and ${t.parts[1]}`];
    }
  });
  L.table(
    [
      { header: 'Term', width: 42 },
      { header: 'Type', width: 38 },
      { header: 'Handling', width: 94 },
    ],
    rows,
  );
  const notes: string[] = [];
  if (m.recipe.terms.some((t) => t.type === 'categorical')) notes.push(REFERENCE_RULE);
  if (m.recipe.terms.some((t) => t.type === 'spline')) notes.push(KNOT_RULE);
  if (notes.length > 0) L.paragraph(notes.join(' '), { size: 8.5 });
}

export function sampleSize(L: PdfLayout, input: ReportInput): void {
  const m = input.model;
  L.section('Sample size');
  const rows: [string, string][] = [
    ['Parameters estimated', `${m.parameters} (excluding the intercept)`],
    ['Events per parameter', `${formatFixed(m.eventsPerParameter, 1)}`],
  ];
  const s = input.sampleSize;
  if (s) {
    rows.push([
      'Minimum sample size',
      s.requiredN === null
        ? DASH
        : `${formatCount(s.requiredN)} (Riley et al. 2020, BMJ 368:m441)` +
          (s.bindingCriterion ? `; binding criterion: ${s.bindingCriterion}` : ''),
    ]);
    for (const c of s.criteria ?? []) rows.push([`  ${c.label}`, criterionText(c)]);
    if (s.assumedR2 !== undefined && s.assumedR2 !== null)
      rows.push(['Assumed Cox\u2013Snell R\u00b2', formatFixed(s.assumedR2, 3)]);
    if (s.shrinkageTarget !== undefined && s.shrinkageTarget !== null)
      rows.push(['Target shrinkage', `\u2265 ${formatFixed(s.shrinkageTarget, 2)}`]);
    rows.push(['Check', sampleSizeCheck(s, m.nUsed)]);
  } else {
    rows.push(['Minimum sample size', 'Riley criteria not computed for this report.']);
  }
  L.keyValues(rows, 62);
}

type Criterion = NonNullable<SampleSizeSummary['criteria']>[number];

/** A criterion's required n with its own verdict and, when not met, its own consequence. */
function criterionText(c: Criterion): string {
  const n = c.n === null ? DASH : formatCount(c.n);
  if (c.met === undefined || c.met === null) return n;
  return c.met ? `${n}: met` : `${n}: NOT met. ${c.consequence ?? ''}`.trim();
}

/** The overall line: met, or which criteria are not (their consequences are on their own rows). */
function sampleSizeCheck(s: SampleSizeSummary, nUsed: number): string {
  if (s.met === null) return 'could not be assessed';
  if (s.met) return `met: ${formatCount(nUsed)} rows used \u2265 ${formatCount(s.requiredN)} required`;
  const failing = (s.criteria ?? []).filter((c) => c.met === false).map((c) => c.label);
  return (
    `NOT met: ${formatCount(nUsed)} rows used < ${formatCount(s.requiredN)} required` +
    (failing.length ? `; short of ${failing.join(', ')} (see each criterion above)` : '')
  );
}

export function method(L: PdfLayout, input: ReportInput): void {
  const m = input.model;
  L.section('Modelling method');
  let text: string;
  if (m.method === 'ml') {
    text = 'Logistic regression fitted by maximum likelihood (Newton\u2013Raphson).';
  } else if (m.method === 'firth') {
    text =
      'Logistic regression with Firth\u2019s penalised likelihood (Jeffreys prior; Firth 1993, Biometrika 80:27), ' +
      'which reduces small-sample bias and gives finite estimates under separation ' +
      '(Heinze & Schemper 2002, Stat Med 21:2409).';
  } else {
    const kind =
      m.method === 'lasso'
        ? 'Lasso (L1)'
        : m.method === 'elastic-net'
          ? `Elastic-net (\u03b1 = ${formatSig(m.alpha ?? 0.5, 3)}: L1 share)`
          : 'Ridge (L2)';
    text =
      `${kind} penalised logistic regression, \u03bb = ${formatSig(m.lambda, 4)} on the standardised scale ` +
      `(intercept not penalised). \u03bb chosen by: ${input.lambdaChoice ?? 'set by the user'}. ` +
      'Coefficients are shrunk towards zero on purpose; standard errors, p-values and intervals of a penalised fit ' +
      'are not valid and are not reported.';
  }
  const penalised = isPenalised(m.method);
  const deviance = `deviance ${formatFixed(m.deviance, 2)} (null ${formatFixed(m.nullDeviance, 2)})`;
  const rows: [string, string][] = [
    ['Method', text],
    [
      'Convergence',
      m.converged
        ? `converged in ${m.iterations} iterations`
        : `did NOT converge after ${m.iterations} iterations; estimates are unreliable`,
    ],
    [
      'Intervals',
      penalised
        ? 'not reported (no valid intervals after penalised shrinkage)'
        : `${levelText(m.level)} confidence intervals; profile likelihood where available, otherwise Wald`,
    ],
    [
      'Fit',
      penalised
        ? `${deviance}, unpenalised, at the shrunken estimates`
        : penalisedTests(m)
          ? `${deviance}, both unpenalised; penalised-likelihood-ratio \u03c7\u00b2 = ` +
            `${formatFixed(m.modelLrChi2, 2)} on ${m.modelDf} df, p ${pText(m.modelLrP)} (Firth's penalised ` +
            `log-likelihood ${formatFixed(m.penalisedLogLik ?? null, 2)}; not a deviance difference); ` +
            `AIC ${formatFixed(m.aic, 1)}`
          : `${deviance}; likelihood-ratio \u03c7\u00b2 = ${formatFixed(m.modelLrChi2, 2)} on ${m.modelDf} df, ` +
            `p ${pText(m.modelLrP)}; AIC ${formatFixed(m.aic, 1)}`,
    ],
  ];
  L.keyValues(rows, 30);
}

/** Firth's LR tests are penalised-likelihood ratios (the record's testLikelihood; older records: by method). */
function penalisedTests(m: FitResult): boolean {
  return (m.testLikelihood ?? (m.method === 'firth' ? 'penalised' : 'ordinary')) === 'penalised';
}

/** One end of a coefficient's odds-ratio interval: 0 / ∞ when its profile is unbounded there, null when none. */
/** Whether any coefficient row is shown per a unit other than 1. */
const anyUnit = (m: FitResult, units: OddsUnits) =>
  oddsDisplayRows(m.recipe, m.coefficients, units).some((d) => d.kind === 'coefficient' && d.unit !== 1);

function orLimit(c: FitResult['coefficients'][number], side: 'lower' | 'upper', unit = 1): string | null {
  if (side === 'lower' && c.profileLowerUnbounded) return '0';
  if (side === 'upper' && c.profileUpperUnbounded) return '\u221e';
  const v = side === 'lower' ? (c.profileLower ?? c.waldLower) : (c.profileUpper ?? c.waldUpper);
  return v === null ? null : unit === 1 ? formatOr(Math.exp(v), c.estimate) : formatOr(Math.exp(unit * v));
}

function pText(p: number | null): string {
  const s = formatP(p);
  return s.startsWith('<') ? s : `= ${s}`;
}

export function equation(L: PdfLayout, m: FitResult): void {
  L.section('Model equation');
  L.paragraph(
    'The full model, so that it can be re-implemented. ' +
      'Square brackets name a design variable; its coding is given below.',
    { size: 9 },
  );
  const eq = modelEquation(m);
  L.setFont(9.5);
  const lh = L.lineHeight(9.5);
  const first = eq.parts[0];
  const indent = L.doc.getTextWidth('logit(risk) = ');
  L.ensure(lh * 2);
  L.doc.text(first, L.left + 2, L.y + lh * 0.78);
  L.y += lh;
  for (const part of eq.parts.slice(1)) {
    L.ensure(lh);
    L.doc.text(part, L.left + 2 + indent, L.y + lh * 0.78);
    L.y += lh;
  }
  L.y += 1;
  L.paragraph(riskFormula, { size: 9.5, indent: 2, gap: 2.5 });
  if (eq.omitted.length > 0)
    L.paragraph(`Omitted (aliased, estimate fixed at 0): ${eq.omitted.join(', ')}.`, { size: 9 });
  L.subheading('Coding of the design variables');
  for (const line of eq.coding) L.bullet(line, 8.5);
}

export function oddsRatios(L: PdfLayout, m: FitResult, units: OddsUnits = {}): void {
  L.section('Coefficients and odds ratios');
  const lvl = levelText(m.level);
  const anyProfile = m.coefficients.some(
    (c) => (c.profileLower !== null || c.profileLowerUnbounded) && (c.profileUpper !== null || c.profileUpperUnbounded),
  );
  const anyUnbounded = m.coefficients.some((c) => c.profileLowerUnbounded || c.profileUpperUnbounded);
  // Per the page's unit for numeric predictors (OR^unit, limits exp(unit·limit)); a row per reference level.
  const rows = oddsDisplayRows(m.recipe, m.coefficients, units).map((d) => {
    if (d.kind === 'reference') return [`${d.label} (reference)`, DASH, DASH, '1', DASH, DASH];
    const { row: c, unit } = d;
    const lo = orLimit(c, 'lower', unit);
    const hi = orLimit(c, 'upper', unit);
    const isIntercept = c.term === '(Intercept)';
    return [
      d.label + (c.aliased ? ' (aliased)' : ''),
      formatFixed(c.estimate, 4),
      c.se === null ? DASH : formatFixed(c.se, 4),
      isIntercept ? DASH : unit === 1 ? formatOr(c.oddsRatio, c.estimate) : formatOr(Math.exp(unit * c.estimate)),
      isIntercept || lo === null || hi === null ? DASH : `${lo} to ${hi}`,
      formatP(c.p),
    ];
  });
  L.table(
    [
      { header: 'Design variable', width: 52 },
      { header: '\u03b2', width: 20, align: 'right' },
      { header: 'SE', width: 18, align: 'right' },
      { header: 'Odds ratio', width: 22, align: 'right' },
      { header: `${lvl} CI of odds ratio`, width: 38, align: 'right' },
      { header: 'p (Wald)', width: 24, align: 'right' },
    ],
    rows,
  );
  const anyWald = m.coefficients.some((c) => c.waldLower !== null && c.waldUpper !== null);
  const intervals = anyProfile ? 'profile likelihood' : anyWald ? 'Wald' : 'none (not valid for this method)';
  L.paragraph(
    `Odds ratio = exp(\u03b2), per one unit of the design variable` +
      (anyUnit(m, units)
        ? ' unless a row says "per u": then per u units, exp(u\u00b7\u03b2), with its limits likewise' +
          ' (the coefficients themselves stay per one unit)'
        : '') +
      `. Intervals: ${intervals}.` +
      (m.recipe.terms.some((t) => t.type === 'categorical') ? ' A reference level has odds ratio 1.' : '') +
      (anyUnbounded
        ? ' An interval ending at 0 or \u221e is unbounded on that side: the estimate diverges under separation.'
        : ''),
    { size: 8.5 },
  );
  const multi = m.terms.filter((t) => t.df > 1 && t.lrP !== null);
  if (multi.length > 0) {
    L.subheading(
      'Terms with more than one design variable (' +
        (penalisedTests(m)
          ? "penalised-likelihood-ratio test, Firth's penalised likelihood"
          : 'likelihood-ratio test') +
        ' of the whole term)',
    );
    L.table(
      [
        { header: 'Term', width: 70 },
        { header: 'df', width: 20, align: 'right' },
        { header: '\u03c7\u00b2', width: 30, align: 'right' },
        { header: 'p', width: 30, align: 'right' },
      ],
      multi.map((t) => [t.name, String(t.df), formatFixed(t.lrChi2, 2), formatP(t.lrP)]),
    );
  }
}

/** The model pooled over multiple imputations beside the complete-case estimates (only when it was run). */
export function imputation(L: PdfLayout, input: ReportInput): void {
  const imp = input.imputation;
  if (!imp) return;
  const m = input.model;
  L.section('Multiple imputation (sensitivity analysis)');
  const filled = imp.columns
    .map((c) => `${c.column}: ${formatCount(c.cells)} ${c.cells === 1 ? 'cell' : 'cells'} by ${c.method}`)
    .join('; ');
  L.paragraph(
    `The same model fitted on each of ${imp.m} datasets completed by chained-equation imputation ` +
      '(van Buuren & Groothuis-Oudshoorn 2011), pooled by Rubin\u2019s rules ' +
      'with Barnard\u2013Rubin degrees of freedom. ' +
      `${formatCount(imp.nImputedRows)} of ${formatCount(imp.nRows)} rows had a value filled in (${filled}). ` +
      'The model above remains the complete-case fit; large differences between the two columns of \u03b2 below ' +
      'mean the complete-case estimates may be biased by the missing values.',
    { size: 9 },
  );
  const lvl = levelText(imp.level);
  L.table(
    [
      { header: 'Design variable', width: 40 },
      { header: '\u03b2 pooled', width: 20, align: 'right' },
      { header: 'Odds ratio', width: 20, align: 'right' },
      { header: `${lvl} CI of odds ratio`, width: 36, align: 'right' },
      { header: 'p', width: 16, align: 'right' },
      { header: 'FMI', width: 12, align: 'right' },
      { header: '\u03b2 complete cases', width: 30, align: 'right' },
    ],
    imp.rows.map((r, j) => {
      const cc = m.coefficients.find((c) => c.name === r.name);
      const isIntercept = j === 0;
      return [
        r.name,
        formatFixed(r.estimate, 4),
        isIntercept ? DASH : formatOr(r.oddsRatio, r.estimate),
        isIntercept || r.lower === null || r.upper === null
          ? DASH
          : `${formatOr(Math.exp(r.lower), r.estimate)} to ${formatOr(Math.exp(r.upper), r.estimate)}`,
        formatP(r.p),
        r.fmi === null ? DASH : formatFixed(r.fmi, 2),
        cc ? formatFixed(cc.estimate, 4) : DASH,
      ];
    }),
  );
  L.paragraph('FMI: fraction of missing information. Intervals: Wald with Barnard\u2013Rubin degrees of freedom.', {
    size: 8.5,
  });
}

/** The data-and-outcome rows of a table of counts or frequency-weighted rows: what was counted and how. */
function layoutRows(lay: NonNullable<ReportInput['layout']>, m: ReportInput['model']): [string, string][] {
  const out: [string, string][] = [];
  out.push([
    'Outcome',
    lay.kind === 'binary'
      ? `"${m.recipe.outcome}"; the event is "${m.recipe.event}"; each row weighted by "${lay.weights}"`
      : `events "${lay.outcome}" ${lay.kind === 'events-trials' ? 'out of the trials' : 'with the non-events'} ` +
        `"${lay.counts}" per row${lay.weights ? `, each row weighted by "${lay.weights}"` : ''}`,
  ]);
  out.push([
    'Cases used',
    `${formatCount(lay.cases)} from ${formatCount(lay.tableRowsUsed)} of ${formatCount(lay.tableRows)} rows: ` +
      `${formatCount(lay.events)} events (${formatPercent(lay.cases > 0 ? lay.events / lay.cases : NaN)}) and ` +
      `${formatCount(lay.nonEvents)} non-events`,
  ]);
  out.push(['Counting', lay.convention]);
  if (lay.deviance)
    out.push([
      'Deviance',
      `per case ${lay.deviance.perCase.toFixed(2)} (AIC and BIC use it); grouped ${lay.deviance.grouped.toFixed(2)} ` +
        `on ${lay.deviance.groupedDf} df, relative to the saturated model of the table rows; they differ by a ` +
        'constant and give the same likelihood-ratio tests',
    ]);
  const g = lay.goodnessOfFit;
  if (g)
    out.push([
      'Fit by covariate pattern',
      `${formatCount(g.patterns)} patterns, ${g.df} df: Pearson \u03c7\u00b2 ${g.pearson.toFixed(2)}, p ` +
        `${formatP(g.pearsonP)}; deviance \u03c7\u00b2 ${g.deviance.toFixed(2)}, p ${formatP(g.devianceP)}` +
        (g.reliable
          ? ''
          : ` — not trustworthy: ${Math.round(g.smallExpectedShare * 100)} % of the expected counts are below 5`),
    ]);
  return out;
}
