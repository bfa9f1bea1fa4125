import { FulcraError } from '../core/data';
import { checkLevel, checkOutcomeAndPredictor, checkSameLength } from '../core/vectors';
import { warning, type EngineWarning } from '../core/warnings';
import { calibrationRegression, riskToLinearPredictor } from '../evaluation/calibration';
import { delongFromPrepared } from '../evaluation/delong';
import { atThreshold, checkScoredOutcome, FLAG_RULE, prepareThresholds } from '../evaluation/threshold';
import { observedExpectedRatio } from '../monitoring/poisson';
import { sigmoid } from '../numerics/loss';
import { notComputedReason, subgroupPrecision, subgroupSizeRule, subgroupSizeWarning } from './sizeRule';
import type { SubgroupAssignment, SubgroupAtCutoff, SubgroupPerformance, SubgroupRow } from './types';

/** The model's predictions on its used rows (order of rowsUsed). At least one of risk and eta. */
export interface SubgroupScores {
  /** Outcome, 0/1. */
  y: Float64Array;
  /** Predicted risk; from the linear predictor when absent. Used for O/E, AUC and the cut-off. */
  risk?: Float64Array;
  /** Linear predictor (logit of the risk); from the risk when absent. Used for calibration. */
  eta?: Float64Array;
}

export interface SubgroupOptions {
  /** Confidence level of every interval. Default 0.95. */
  level?: number;
  /** The current cut-off (flag rule: risk ≥ cut-off); null or absent: no cut-off measures. */
  threshold?: number | null;
}

const METHODS = [
  'O/E: observed events ÷ expected events (the sum of the predicted risks), with the exact Poisson interval of ' +
    'the observed count (Garwood 1936, Biometrika 28:437) divided by the expected count.',
  'AUC: the area under the ROC curve with the DeLong, DeLong & Clarke-Pearson (1988, Biometrics 44:837) standard ' +
    'error and interval AUC ± z·SE clamped to [0, 1], as pROC ci.auc(method = "delong").',
  'Calibration-in-the-large: α in logit P(y) = α + LP (LP as offset); calibration slope: β in logit P(y) = a + β·LP ' +
    '(Cox 1958, Biometrika 45:562); maximum likelihood within the group, Wald intervals.',
  `Sensitivity, specificity and the fraction flagged at the cut-off, with Wilson (1927) intervals. ${FLAG_RULE}`,
];

function checkInputs(scores: SubgroupScores, groups: SubgroupAssignment): void {
  const { y, risk, eta } = scores;
  if (!risk && !eta)
    throw new FulcraError(
      'no-scores',
      'Subgroup performance needs the predicted risk or the linear predictor of every used row.',
    );
  if (risk) checkScoredOutcome(y, risk);
  if (eta) checkOutcomeAndPredictor(y, eta);
  checkSameLength(y, groups.groupOf, 'group vector');
  const G = groups.groups.length;
  for (let i = 0; i < groups.groupOf.length; i++) {
    const g = groups.groupOf[i];
    if (!(g >= 0 && g < G))
      throw new FulcraError(
        'bad-group',
        `Used row number ${i + 1} has group ${g}, but there are ${G} groups.`,
        'Pass the assignment made by subgroupsFromColumn for these same rows.',
      );
  }
}

function checkThreshold(t: number | null | undefined): number | null {
  if (t === null || t === undefined) return null;
  if (!(t >= 0 && t <= 1))
    throw new FulcraError('bad-threshold', `The cut-off must be a risk between 0 and 1, got ${t}.`);
  return t;
}

function pick(v: Float64Array, idx: Int32Array): Float64Array {
  const out = new Float64Array(idx.length);
  for (let i = 0; i < idx.length; i++) out[i] = v[idx[i]];
  return out;
}

const ABOUT_CLASSES = new Set(['one-class-only', 'class-too-small']);

/** The measures of one set of rows (a group, or every row). `who` prefixes the messages of inner warnings. */
function rowFor(
  head: Pick<SubgroupRow, 'label' | 'definition' | 'missing'>,
  y: Float64Array,
  risk: Float64Array,
  eta: Float64Array,
  level: number,
  threshold: number | null,
  who: string,
): SubgroupRow {
  const n = y.length;
  let events = 0;
  let expected = 0;
  for (let i = 0; i < n; i++) {
    events += y[i];
    expected += risk[i];
  }
  const nonEvents = n - events;
  const precision = subgroupPrecision(events, nonEvents);
  const warnings: EngineWarning[] = [];
  const inner = (ws: EngineWarning[]) => {
    for (const w of ws) if (!ABOUT_CLASSES.has(w.code)) warnings.push({ ...w, message: `${who}: ${w.message}` });
  };
  let auc: SubgroupRow['auc'] = null;
  let citl: SubgroupRow['calibrationInTheLarge'] = null;
  let slope: SubgroupRow['calibrationSlope'] = null;
  const prep = n > 0 ? prepareThresholds(y, risk) : null;
  if (prep && (precision === 'adequate' || precision === 'imprecise')) {
    const a = delongFromPrepared(prep, { level });
    inner(a.warnings);
    if (a.auc !== null) auc = { estimate: a.auc, se: a.se, lower: a.lower, upper: a.upper, ciMethod: a.ciMethod };
    const c = calibrationRegression(y, eta, { level });
    inner(c.warnings);
    citl = c.interceptInTheLarge;
    slope = c.slope;
  }
  let atCutoff: SubgroupAtCutoff | null = null;
  if (threshold !== null && prep) {
    const m = atThreshold(prep, threshold, { level });
    atCutoff = {
      threshold,
      tp: m.tp,
      fp: m.fp,
      fn: m.fn,
      tn: m.tn,
      sensitivity: m.sensitivity,
      specificity: m.specificity,
      fractionFlagged: m.fractionFlagged,
    };
  }
  return {
    ...head,
    n,
    events,
    nonEvents,
    observedRate: n > 0 ? events / n : null,
    expected,
    observedExpected: observedExpectedRatio(events, expected, level),
    auc,
    calibrationInTheLarge: citl,
    calibrationSlope: slope,
    atCutoff,
    precision,
    notComputed: notComputedReason(precision, events, nonEvents),
    warnings,
  };
}

/**
 * Performance of the model within each subgroup and overall, from the predictions on the used rows and the
 * group of each (`subgroupsFromColumn`): n, events, O/E with its exact Poisson interval (Garwood 1936), AUC with
 * the DeLong interval (DeLong et al. 1988), calibration-in-the-large and slope with Wald intervals, and
 * sensitivity, specificity and the fraction flagged at the cut-off (risk ≥ cut-off) with Wilson intervals.
 * The too-small rule (`subgroupSizeRule`) decides per group what is computed and warns, naming the group:
 * fewer than 100 events or non-events — imprecise (Collins, Ogundimu & Altman 2016, Stat Med 35:214); fewer than
 * 10 — no AUC or calibration (common practice); one class — counts, O/E and the cut-off counts only.
 */
export function subgroupPerformance(
  scores: SubgroupScores,
  groups: SubgroupAssignment,
  options: SubgroupOptions = {},
): SubgroupPerformance {
  const level = checkLevel(options.level);
  const threshold = checkThreshold(options.threshold);
  checkInputs(scores, groups);
  const { y } = scores;
  const record: EngineWarning[] = [];
  const risk = scores.risk ?? scores.eta!.map(sigmoid);
  let eta = scores.eta;
  if (!eta) {
    const lp = riskToLinearPredictor(risk);
    eta = lp.eta;
    record.push(...lp.warnings);
  }
  const G = groups.groups.length;
  const counts = new Int32Array(G);
  for (let i = 0; i < groups.groupOf.length; i++) counts[groups.groupOf[i]]++;
  const members = Array.from(counts, (c) => new Int32Array(c));
  const filled = new Int32Array(G);
  for (let i = 0; i < groups.groupOf.length; i++) {
    const g = groups.groupOf[i];
    members[g][filled[g]++] = i;
  }
  const column = groups.column;
  const rows = groups.groups.map((g, k) => {
    const idx = members[k];
    const row = rowFor(
      { label: g.label, definition: g.definition, missing: g.missing },
      pick(y, idx),
      pick(risk, idx),
      pick(eta!, idx),
      level,
      threshold,
      `Subgroup "${g.label}" of column "${column}"`,
    );
    const w = subgroupSizeWarning(column, g.label, row.precision, row.events, row.nonEvents);
    if (w) row.warnings.unshift(w);
    return row;
  });
  const overall = rowFor(
    { label: 'all rows', definition: 'every row used by the model', missing: false },
    y,
    risk,
    eta,
    level,
    threshold,
    'All rows',
  );
  if (G === 1)
    record.push(
      warning(
        'subgroup-single-group',
        `Column "${column}" puts every used row in one group ("${groups.groups[0].label}"), so the subgroup ` +
          `results repeat the overall ones.`,
        'Choose a column (or cut points) that splits the rows into two or more groups.',
        [column],
      ),
    );
  return {
    column,
    level,
    threshold,
    rows,
    overall,
    rule: subgroupSizeRule(),
    methods: [...METHODS],
    emptyGroups: groups.emptyGroups,
    conventions: groups.conventions,
    warnings: [...rows.flatMap((r) => r.warnings), ...overall.warnings, ...record],
  };
}
