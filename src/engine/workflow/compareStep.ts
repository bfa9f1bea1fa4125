import type { Costs } from '../core/costs';
import { FulcraError, type Dataset } from '../core/data';
import type { TermSpec } from '../core/model';
import { commonRows, compareModels, comparedFromAnalysis, type CommonRows, type ModelComparison } from '../comparison';
import type { LongRunHooks } from '../penalised/crossValidation';
import { runAnalysis, type AnalysisRecord, type ApparentScores } from './analyse';
import { resolveRequest, type AnalysisRequest, type AnalysisRequestInput } from './request';

/** One kept analysis as the comparison reads it: its name, its record, and its apparent per-row scores. */
export interface AnalysedModel {
  label: string;
  record: Pick<AnalysisRecord, 'fit' | 'request'>;
  scores: Pick<ApparentScores, 'eta' | 'y' | 'rowsUsed' | 'weights'>;
}

/** The rows two models share, without the per-row index array (printable as JSON). */
export type CommonRowsSummary = Omit<CommonRows, 'dataRows'>;

/**
 * Two analyses compared, or why not. `different-rows`: the refusal of compareModels (message and fix) with the rows
 * each model used and the rows to leave out of both refits (`rows.leaveOut`, spreadsheet row numbers).
 */
export type ComparisonOutcome =
  | { status: 'compared'; comparison: ModelComparison }
  | { status: 'different-rows'; message: string; suggestion: string; rows: CommonRowsSummary };

/** The user's choices that shape a comparison: interval level, cut-off and costs (the page's or the request's). */
export interface ComparisonChoices {
  level?: number;
  threshold?: number | null;
  costs?: Costs | null;
}

function checkUnweighted(m: AnalysedModel): void {
  const spec = m.record.request.spec;
  if (m.scores.weights !== null || spec.weights !== undefined || (spec.layout && spec.layout.kind !== 'binary'))
    throw new FulcraError(
      'compare-grouped',
      `${m.label} was fitted on a table of counts or with frequency weights; comparing two models is available ` +
        'for one yes/no outcome per row only.',
      'Write the table out one row per case (one yes/no outcome per row) to compare models on it.',
    );
}

/**
 * Compares two analyses of the same data (engine/comparison compareModels; every difference is b − a) with the
 * user's cut-off and costs. Models fitted on different rows are not compared: the outcome says why and which rows
 * to leave out of both refits (commonRows). Both must be fitted on `data` as given (row indices of `scores`).
 */
export function compareAnalyses(
  data: Dataset,
  a: AnalysedModel,
  b: AnalysedModel,
  choices: ComparisonChoices = {},
): ComparisonOutcome {
  checkUnweighted(a);
  checkUnweighted(b);
  const ma = comparedFromAnalysis(a.label, a.record, a.scores);
  const mb = comparedFromAnalysis(b.label, b.record, b.scores);
  const rows = { firstRow: data.firstRow, rowNumbers: data.rowNumbers };
  try {
    const comparison = compareModels(ma, mb, {
      level: choices.level ?? a.record.request.level,
      threshold: choices.threshold ?? null,
      costs: choices.costs ?? null,
      rows,
    });
    return { status: 'compared', comparison };
  } catch (err) {
    if (!(err instanceof FulcraError) || err.code !== 'compare-different-rows') throw err;
    const { dataRows: _d, ...common } = commonRows(ma, mb, rows);
    return { status: 'different-rows', message: err.message, suggestion: err.suggestion ?? '', rows: common };
  }
}

/**
 * The request of a model refitted on the rows two models share: its own left-out rows and `rows.leaveOut`
 * (the rows only one of the two models used). The analysis request accepts at most 10 000 left-out rows.
 */
export function commonRowsRequest(request: AnalysisRequest, rows: Pick<CommonRows, 'leaveOut'>): AnalysisRequest {
  const leaveOut = [...new Set([...request.leaveOut, ...rows.leaveOut])].sort((x, y) => x - y);
  if (leaveOut.length > 10_000)
    throw new FulcraError(
      'compare-too-many-rows-left-out',
      `Refitting both models on their common rows would leave out ${leaveOut.length} rows; at most 10000 can be ` +
        'left out of an analysis.',
      'Make a copy of the data without the rows that have missing values in these predictors, and fit both on it.',
    );
  return { ...request, leaveOut };
}

/**
 * The main request with its terms replaced by `predictors`: a predictor that is a term of the main model keeps
 * its coding there (reference level, spline knots), any other enters as a main effect; an interaction of the main
 * model stays when both its columns are among the predictors. No profile limits or term tests (the comparison
 * reads deviances, coefficients and scores) and no internal validation.
 */
export function secondModelRequest(main: AnalysisRequest, predictors: string[]): AnalysisRequestInput {
  if (predictors.length === 0)
    throw new FulcraError('no-predictors', 'The second model needs at least one predictor.', 'Name them: a,b,c.');
  const twice = predictors.find((p, i) => predictors.indexOf(p) !== i);
  if (twice) throw new FulcraError('bad-predictors', `"${twice}" is named twice among the second model's predictors.`);
  if (predictors.includes(main.spec.outcome))
    throw new FulcraError(
      'outcome-as-predictor',
      `"${main.spec.outcome}" is the outcome and cannot also be a predictor of the second model.`,
    );
  const named = new Set(predictors);
  const terms: TermSpec[] = predictors.map(
    (column) =>
      main.spec.terms.find((t) => t.type !== 'interaction' && t.column === column) ?? { type: 'main', column },
  );
  for (const t of main.spec.terms)
    if (t.type === 'interaction' && named.has(t.columns[0]) && named.has(t.columns[1])) terms.push(t);
  return {
    ...main,
    spec: { ...main.spec, terms },
    profile: false,
    termTests: false,
    validation: null,
  };
}

/** What `compareWithPredictors` adds to the record: the second model, the outcome, and any refit on common rows. */
export interface PredictorComparison {
  predictors: string[];
  /** The second model's request as run. */
  request: AnalysisRequest;
  /**
   * When the two models used different rows, both were refitted on the rows they share for this comparison (the
   * main record is still the fit on all its rows): those rows and why; null when the rows were the same.
   */
  refittedOnCommonRows: (CommonRowsSummary & { note: string }) | null;
  outcome: ComparisonOutcome;
}

/**
 * `npm run fit --compare-with a,b,c`: fits a second model with those predictors (secondModelRequest) on the same
 * data and compares the main model ("Model A") with it ("Model B"). When the second model uses other rows
 * (missing values), both are refitted on the rows they share and compared there; the refit is recorded and said in
 * a note.
 */
export async function compareWithPredictors(
  data: Dataset,
  main: { record: AnalysisRecord; scores: AnalysedModel['scores'] },
  predictors: string[],
  hooks?: LongRunHooks,
): Promise<PredictorComparison> {
  const r = main.record.request;
  const choices = { level: r.level, threshold: r.threshold, costs: r.costs };
  const labelA = 'Model A';
  const labelB = 'Model B';
  const a: AnalysedModel = { label: labelA, record: main.record, scores: main.scores };
  checkUnweighted(a);
  const request = resolveRequest(secondModelRequest(r, predictors));
  const second = await runAnalysis(data, request, hooks);
  const first = compareAnalyses(data, a, { label: labelB, record: second.record, scores: second.scores }, choices);
  if (first.status === 'compared') return { predictors, request, refittedOnCommonRows: null, outcome: first };
  const quick = { profile: false, termTests: false, validation: null };
  const refitA = await runAnalysis(data, { ...commonRowsRequest(r, first.rows), ...quick }, hooks);
  const refitB = await runAnalysis(data, commonRowsRequest(request, first.rows), hooks);
  const outcome = compareAnalyses(
    data,
    { label: labelA, record: refitA.record, scores: refitA.scores },
    { label: labelB, record: refitB.record, scores: refitB.scores },
    choices,
  );
  const note =
    `The two models used different rows (${first.rows.usedByA} and ${first.rows.usedByB}), so both were refitted ` +
    `on the ${first.rows.common} rows they share for this comparison; the main record above is the fit on all its ` +
    'rows.';
  return { predictors, request, refittedOnCommonRows: { ...first.rows, note }, outcome };
}
