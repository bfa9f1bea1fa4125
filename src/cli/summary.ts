import type { InternalValidation } from '../engine/validation';
import type { FitMethod } from '../engine/core';
import type { FitRun } from './runFit';
import { fmt, fmtP, pct, table } from './format';
import { monitoringLines } from './monitorSummary';
import { comparisonSummaryLines } from './compareSummary';
import { pointsLines } from './pointsCli';
import { subgroupLines } from './subgroupsCli';

const METHOD: Record<FitMethod, string> = {
  ml: 'maximum likelihood',
  firth: "Firth's penalised likelihood",
  ridge: 'ridge',
  lasso: 'lasso',
  'elastic-net': 'elastic net',
};

/** The method line: name, λ and how it was set, convergence. */
function methodLine(r: FitRun): string {
  const f = r.fit,
    lam = r.lambda;
  let name = METHOD[f.method];
  if (f.method === 'elastic-net' && lam) name += ` (α = ${lam.alpha})`;
  if (lam) {
    const how =
      lam.rule === 'fixed'
        ? 'fixed'
        : `chosen by ${lam.folds}-fold cross-validation (${
            lam.rule === 'cv-1se' ? 'one-standard-error rule' : 'lowest cross-validated deviance'
          })`;
    name += `, λ = ${fmt(lam.chosen, 6)} ${how}`;
  }
  const conv = f.converged ? 'converged' : 'DID NOT CONVERGE';
  const steps = f.method === 'lasso' || f.method === 'elastic-net' ? '' : ` after ${f.iterations} iterations`;
  return `Method: ${name}; ${conv}${steps}`;
}

/** The readable report of `npm run fit` (the JSON record holds everything; this is what a person reads). */
export function summarise(r: FitRun): string {
  const out: string[] = [];
  const f = r.fit;
  const spec = r.request.spec;
  const lay = r.layout;
  const grouped = lay && lay.kind !== 'binary';
  out.push(
    grouped
      ? `Fulcra ${r.fulcra.version} — logistic regression of the events "${spec.outcome}" ` +
          `${lay.kind === 'events-trials' ? 'out of the trials' : 'against the non-events'} "${lay.counts}"`
      : `Fulcra ${r.fulcra.version} — logistic regression of "${spec.outcome}" (event: ${f.recipe.event})`,
  );
  out.push(`Data: ${r.data.file}, ${r.data.rows} rows`);
  if (lay && (grouped || lay.weights)) out.push(lay.convention);
  out.push(methodLine(r));
  if (lay && (grouped || lay.weights))
    out.push(
      `Cases used: ${f.nUsed.toLocaleString('en')} from ${lay.tableRowsUsed.toLocaleString('en')} of ` +
        `${lay.tableRows.toLocaleString('en')} rows`,
    );
  else
    out.push(
      `Rows used: ${f.nUsed} (${f.nDropped} dropped for missing values${
        f.nDropped
          ? ': ' +
            Object.entries(f.droppedByColumn)
              .map(([c, k]) => `${c} ${k}`)
              .join(', ')
          : ''
      })`,
    );
  out.push(
    `Events: ${f.events}, non-events: ${f.nonEvents}; ${f.parameters} parameters; ` +
      `events per parameter ${fmt(f.eventsPerParameter, 1)} (the smaller class)`,
  );
  out.push('');
  if (f.method === 'lasso' || f.method === 'elastic-net') {
    out.push(
      'Penalised estimates are shrunk on purpose; they have no valid classical standard errors, ' +
        'so no CIs or p-values are shown.',
      '',
      table(
        ['Coefficient', 'log-odds', 'odds ratio'],
        f.coefficients.map((c) => [c.name, fmt(c.estimate), c.name === '(Intercept)' ? '' : fmt(c.oddsRatio, 3)]),
      ),
    );
  } else {
    out.push(coefficientTable(f));
    out.push('(Intercept row: CIs on the log-odds scale; other rows: odds-ratio scale.)');
  }
  out.push('');
  if (f.terms.some((t) => t.lrChi2 !== null)) {
    out.push(
      table(
        ['Term', 'df', penalisedTests(f) ? 'penalised LR χ²' : 'LR χ²', 'p'],
        f.terms.map((t) => [t.name, String(t.df), fmt(t.lrChi2, 3), fmtP(t.lrP)]),
      ),
    );
    out.push('');
  }
  out.push(
    f.modelLrChi2 === null
      ? `Deviance ${fmt(f.deviance)} at the shrunken estimates (null ${fmt(f.nullDeviance)}); ` +
          'no LR test, AIC or BIC for a penalised fit'
      : penalisedTests(f)
        ? `Deviance ${fmt(f.deviance)} (null ${fmt(f.nullDeviance)}), both unpenalised; Firth's penalised ` +
          `log-likelihood ${fmt(f.penalisedLogLik ?? null, 3)}; model penalised-likelihood-ratio χ² ` +
          `${fmt(f.modelLrChi2, 3)} on ${f.modelDf} df, p ${fmtP(f.modelLrP)} (not a deviance difference); ` +
          `AIC ${fmt(f.aic, 3)}, BIC ${fmt(f.bic, 3)}`
        : `Deviance ${fmt(f.deviance)} (null ${fmt(f.nullDeviance)}); model LR χ² ${fmt(f.modelLrChi2, 3)} ` +
          `on ${f.modelDf} df, p ${fmtP(f.modelLrP)}; AIC ${fmt(f.aic, 3)}, BIC ${fmt(f.bic, 3)}`,
  );
  if (lay?.deviance)
    out.push(
      `Deviance conventions: per case ${fmt(lay.deviance.perCase)} (as the table written out one row per case; ` +
        `AIC and BIC use it, with n = cases); grouped ${fmt(lay.deviance.grouped)} on ${lay.deviance.groupedDf} ` +
        `df, relative to the saturated model of the table rows (as R glm(cbind(events, non-events) ~ …)). ` +
        'They differ by a constant and give the same likelihood-ratio tests.',
    );
  const gof = lay?.goodnessOfFit;
  if (gof)
    out.push(
      `Goodness of fit by covariate pattern (${gof.patterns} patterns, ${gof.df} df): Pearson χ² ` +
        `${fmt(gof.pearson, 3)}, p ${fmtP(gof.pearsonP)}; deviance χ² ${fmt(gof.deviance, 3)}, p ` +
        `${fmtP(gof.devianceP)}${gof.reliable ? '' : ' (not trustworthy: too many expected counts below 5)'}.`,
    );
  const e = r.evaluation;
  out.push('');
  out.push('Performance on the development data (apparent)');
  out.push(`  AUC ${fmt(e.auc.auc, 3)} (95% CI ${fmt(e.auc.lower, 3)} to ${fmt(e.auc.upper, 3)}, DeLong)`);
  out.push(`  Brier ${fmt(e.brier.brier, 4)}; scaled Brier ${fmt(e.brier.scaledBrier, 3)}`);
  out.push(
    `  Calibration slope ${fmt(e.calibration.slope?.estimate, 3)}; ` +
      `calibration-in-the-large ${fmt(e.calibration.interceptInTheLarge?.estimate, 3)}`,
  );
  if (e.atThreshold) {
    const t = e.atThreshold;
    out.push('');
    out.push(`At a cut-off of ${fmt(t.threshold, 3)} (${t.flagRule})`);
    out.push(`  flagged ${t.tp + t.fp} (true ${t.tp}, false ${t.fp}); not flagged ${t.tn + t.fn} (missed ${t.fn})`);
    out.push(
      `  sensitivity ${pct(t.sensitivity.estimate)}, specificity ${pct(t.specificity.estimate)}, ` +
        `PPV ${pct(t.ppv.estimate)}, NPV ${pct(t.npv.estimate)}`,
    );
    if (t.expectedCostPer100 !== null) out.push(`  expected cost per 100 cases ${fmt(t.expectedCostPer100, 2)}`);
  }
  if (e.costs) {
    out.push(
      `  Cost-based cut-off for calibrated risks ${fmt(e.costs.thresholds.decisionTheory.threshold, 4)}; ` +
        `lowest cost on these data at ${fmt(e.costs.thresholds.empirical.threshold, 4)}`,
    );
  }
  if (r.validation) out.push('', validationText(r.validation));
  if (r.external) {
    const x = r.external.evaluation;
    out.push('', `External validation on ${r.data.test?.file ?? 'the test file'} (${r.external.nUsed} rows used)`);
    out.push(
      `  AUC ${fmt(x.auc.auc, 3)} (95% CI ${fmt(x.auc.lower, 3)} to ${fmt(x.auc.upper, 3)}); ` +
        `calibration slope ${fmt(x.calibration.slope?.estimate, 3)}; ` +
        `calibration-in-the-large ${fmt(x.calibration.interceptInTheLarge?.estimate, 3)}; ` +
        `Brier ${fmt(x.brier.brier, 4)}`,
    );
  }
  if (r.sampleSize) out.push('', 'Sample size (Riley et al. 2020)', ...r.sampleSize.summary.map((s) => `  ${s}`));
  else if (r.sampleSizeNote) out.push('', r.sampleSizeNote);
  if (r.rowDiagnostics && r.diagnostics) out.push('', ...diagnosticsLines(r));
  if (r.monitoring) out.push('', ...monitoringLines(r.monitoring));
  if (r.subgroups) out.push('', ...subgroupLines(r.subgroups));
  if (r.points) out.push('', ...pointsLines(r.points));
  if (r.comparison) out.push('', ...comparisonSummaryLines(r.comparison));
  const warnings = [
    ...r.data.warnings,
    ...r.warnings,
    ...(r.validation?.warnings ?? []),
    ...(r.diagnostics?.warnings ?? []),
    ...(r.monitoring?.warnings ?? []),
    ...(r.subgroups?.warnings ?? []),
    ...(r.points ? [...r.points.score.warnings, ...r.points.evaluation.warnings] : []),
  ];
  if (warnings.length) {
    out.push('', 'Warnings');
    for (const w of warnings) out.push(`  [${w.code}] ${w.message} → ${w.suggestion}`);
  }
  out.push(
    '',
    'Not a medical device. Apparent and internally validated performance are not external validation; ' +
      'follow local governance and licensed clinical judgement.',
  );
  return out.join('\n');
}

/** Firth's LR tests are penalised-likelihood ratios (the record's testLikelihood; older records: by method). */
const penalisedTests = (f: FitRun['fit']) =>
  (f.testLikelihood ?? (f.method === 'firth' ? 'penalised' : 'ordinary')) === 'penalised';

/** The inference table of an ML, Firth or ridge fit. */
function coefficientTable(f: FitRun['fit']): string {
  const level = Math.round(f.level * 100);
  return table(
    ['Coefficient', 'log-odds', 'SE', 'odds ratio', `${level}% CI (profile)`, `${level}% CI (Wald)`, 'p (Wald)'],
    f.coefficients.map((c) => [
      c.name + (c.aliased ? ' (aliased)' : ''),
      fmt(c.estimate),
      fmt(c.se),
      c.name === '(Intercept)' ? '' : fmt(c.oddsRatio, 3),
      profileText(c),
      c.waldLower === null
        ? '—'
        : c.name === '(Intercept)'
          ? `${fmt(c.waldLower, 3)} to ${fmt(c.waldUpper, 3)}`
          : `${fmt(Math.exp(c.waldLower), 3)} to ${fmt(Math.exp(c.waldUpper!), 3)}`,
      fmtP(c.p),
    ]),
  );
}

/**
 * The profile interval: log-odds for the intercept, odds ratios otherwise; a side unbounded under separation reads
 * −∞ / ∞ (log-odds) or 0 / ∞ (odds ratio), a side not computed —.
 */
function profileText(c: FitRun['fit']['coefficients'][number]): string {
  const log = c.name === '(Intercept)';
  const end = (v: number | null, unbounded: boolean | undefined, inf: string, zero: string) =>
    unbounded ? (log ? inf : zero) : v === null ? '—' : fmt(log ? v : Math.exp(v), 3);
  const lo = end(c.profileLower, c.profileLowerUnbounded, '−∞', '0');
  const hi = end(c.profileUpper, c.profileUpperUnbounded, '∞', '∞');
  return lo === '—' && hi === '—' ? '—' : `${lo} to ${hi}`;
}

const METRIC: Record<string, string> = {
  auc: 'AUC',
  calibrationSlope: 'calibration slope',
  calibrationInTheLarge: 'calibration-in-the-large',
  brier: 'Brier score',
};

function validationText(v: InternalValidation): string {
  const head =
    v.method === 'bootstrap'
      ? `Bootstrap optimism correction (${v.planned} resamples, seed ${v.seed})`
      : `Repeated cross-validation (${v.planned} fits, seed ${v.seed})`;
  return (
    head +
    '\n' +
    table(
      ['Measure', 'apparent', 'optimism', 'corrected'],
      v.rows.map((row) => [
        METRIC[row.metric] ?? row.metric,
        fmt(row.apparent, 4),
        fmt(row.optimism, 4),
        fmt(row.corrected, 4),
      ]),
    )
  );
}

/** `--diagnostics`: the most influential rows by spreadsheet row number, and the rules of the reference lines. */
function diagnosticsLines(r: FitRun): string[] {
  const d = r.diagnostics!;
  const out = [`Most influential rows (by ${d.rankedBy === 'cooks' ? "Cook's distance" : '|deviance residual|'})`];
  out.push(
    ...table(
      ['row', 'outcome', 'risk', 'leverage', 'std. dev. resid.', "Cook's D", 'max |DFBETAS|'],
      d.top.map((t) => [
        String(t.sheetRow),
        String(t.outcome),
        fmt(t.risk, 3),
        fmt(t.leverage, 4),
        fmt(t.stdDeviance, 2),
        fmt(t.cooks, 4),
        t.maxAbsDfbetas === null ? '—' : `${fmt(t.maxAbsDfbetas, 2)} (${t.dfbetasCoefficient})`,
      ]),
    )
      .split('\n')
      .map((l) => `  ${l}`),
  );
  for (const a of d.applicability.filter((x) => x.status !== 'exact')) {
    out.push(`  ${a.measure}: ${a.status} — ${a.why}`);
  }
  out.push(`  Reference lines: ${d.thresholds.map((t) => t.rule).join('; ')}.`);
  return out;
}
