import { plural } from '../core/wording';
import { FulcraError } from '../core/data';
import { qnorm } from '../numerics/distributions';
import { warning, type EngineWarning } from '../core/warnings';

/** Cox–Snell R² of a fitted model: 1 − exp(−(D_null − D_model)/n), from its deviance and null deviance. */
export function coxSnellR2(deviance: number, nullDeviance: number, n: number): number {
  if (!(n > 0) || !(deviance >= 0) || !(nullDeviance >= deviance)) {
    throw new FulcraError(
      'bad-deviance',
      `Need n > 0 and 0 ≤ deviance ≤ null deviance; got deviance ${deviance}, null deviance ${nullDeviance}, n ${n}.`,
    );
  }
  return 1 - Math.exp((deviance - nullDeviance) / n);
}

/** Largest Cox–Snell R² possible for a binary outcome with event proportion φ: 1 − (φ^φ (1 − φ)^(1 − φ))². */
export function maxCoxSnellR2(phi: number): number {
  return 1 - Math.exp(2 * (phi * Math.log(phi) + (1 - phi) * Math.log(1 - phi)));
}

export interface SampleSizeInput {
  /** Candidate predictor parameters (design columns besides the intercept). */
  parameters: number;
  /** Anticipated outcome proportion φ. */
  outcomeProportion: number;
  /**
   * Anticipated Cox–Snell R²; when omitted (and no fitted model), 15% of the maximum is used (a conservative
   * default).
   */
  r2cs?: number;
  /** Take R²cs from a fitted model instead: 1 − exp((D_model − D_null)/n). */
  fitted?: { deviance: number; nullDeviance: number; n: number };
  /** Target expected uniform shrinkage factor (criterion i), default 0.9. */
  shrinkage?: number;
  /** Acceptable optimism in Nagelkerke's R² (criterion ii), default 0.05. */
  optimism?: number;
  /** Margin of error for the overall risk (criterion iii), default 0.05, at 95% confidence. */
  margin?: number;
  /** The data at hand, to say whether they are enough. */
  actual?: { n: number; events: number };
}

export interface SampleSizeCriterion {
  id: 'i' | 'ii' | 'iii';
  /** What falling short of it risks: (i) and (ii) over-fitting, (iii) an imprecise overall risk. */
  concerns: 'overfitting' | 'overall-risk';
  /** The cases it requires (and the events and events per parameter they hold). */
  n: number;
  events: number;
  eventsPerParameter: number;
  /** Whether the data at hand have that many cases and events; null when no data were given. */
  met: boolean | null;
  /** What it means for this model when the criterion is not met, in plain words. */
  consequence: string;
  text: string;
}

export interface SampleSizeResult {
  criteria: SampleSizeCriterion[];
  requiredN: number;
  requiredEvents: number;
  requiredEventsPerParameter: number;
  binding: 'i' | 'ii' | 'iii';
  r2cs: number;
  r2csSource: 'given' | 'fitted-model' | 'default-15-percent-of-max';
  maxR2cs: number;
  /** Plain-language summary lines. */
  summary: string[];
  actual: { n: number; events: number; eventsPerParameter: number; enough: boolean } | null;
  warnings: EngineWarning[];
}

const list = (ids: string[], word: 'and' | 'or') =>
  ids.length === 1 ? ids[0] : `${ids.slice(0, -1).join(', ')} ${word} ${ids[ids.length - 1]}`;

const SHRINK_OR_FEWER = 'shrink the coefficients (a penalised fit) or use fewer parameters';

/**
 * The data's verdict over the criteria: which are met and which not, then the consequence of each kind of
 * shortfall (over-fitting for (i)/(ii), an imprecise overall risk for (iii)), so that failing (iii) alone is not
 * read as over-fitting.
 */
function verdict(criteria: SampleSizeCriterion[]): string {
  const ids = (met: boolean) => criteria.filter((c) => c.met === met).map((c) => `(${c.id})`);
  const [yes, no] = [ids(true), ids(false)];
  if (no.length === 0) return 'meet all three criteria.';
  const over = criteria.some((c) => c.concerns === 'overfitting' && c.met === false);
  const risk = criteria.find((c) => c.concerns === 'overall-risk' && c.met === false);
  const guard = over ? '' : ', which guard against over-fitting,';
  const met = yes.length
    ? `meet criteri${yes.length > 1 ? 'a' : 'on'} ${list(yes, 'and')}${guard} but not ${list(no, 'or')}`
    : `meet none of ${list(no, 'or')}`;
  const overText = `expect over-fitting; ${SHRINK_OR_FEWER}.`;
  const riskText = risk ? risk.consequence.charAt(0).toLowerCase() + risk.consequence.slice(1) : '';
  return `${met}: ${over && risk ? `${overText} Also, ${riskText}` : over ? overText : riskText}`;
}

/**
 * Minimum sample size for a binary-outcome prediction model, Riley et al. (2020, BMJ 368:m441), criteria
 * (i) expected shrinkage ≥ S: n = P / ((S − 1)·ln(1 − R²cs/S));
 * (ii) optimism in Nagelkerke R² ≤ δ: the same with S = R²cs / (R²cs + δ·max R²cs);
 * (iii) overall risk within ± margin: n = (z/margin)²·φ(1 − φ).
 * Each n is rounded up; the required n is the largest. With the data at hand, each criterion gets its own
 * verdict (`met`) and consequence: (i) and (ii) guard against over-fitting, (iii) the precision of the overall
 * risk, so falling short of (iii) alone does not mean an over-fitted model.
 */
export function riley2020SampleSize(input: SampleSizeInput): SampleSizeResult {
  const { parameters: P, outcomeProportion: phi } = input;
  const S = input.shrinkage ?? 0.9;
  const delta = input.optimism ?? 0.05;
  const margin = input.margin ?? 0.05;
  if (!(Number.isInteger(P) && P >= 1))
    throw new FulcraError('bad-parameters', `The number of parameters must be a whole number ≥ 1, got ${P}.`);
  if (!(phi > 0 && phi < 1))
    throw new FulcraError('bad-proportion', `The outcome proportion must lie strictly between 0 and 1, got ${phi}.`);
  if (!(S > 0 && S < 1))
    throw new FulcraError('bad-shrinkage', `The target shrinkage must lie strictly between 0 and 1, got ${S}.`);
  if (!(delta > 0)) throw new FulcraError('bad-optimism', `The acceptable optimism must be > 0, got ${delta}.`);
  if (!(margin > 0 && margin < 1))
    throw new FulcraError('bad-margin', `The margin of error must lie strictly between 0 and 1, got ${margin}.`);
  const maxR2 = maxCoxSnellR2(phi);
  const fromFit = input.r2cs === undefined && input.fitted !== undefined;
  const r2 =
    input.r2cs ??
    (input.fitted ? coxSnellR2(input.fitted.deviance, input.fitted.nullDeviance, input.fitted.n) : 0.15 * maxR2);
  const source: SampleSizeResult['r2csSource'] =
    input.r2cs !== undefined ? 'given' : fromFit ? 'fitted-model' : 'default-15-percent-of-max';
  if (!(r2 > 0 && r2 < maxR2))
    throw new FulcraError(
      'bad-r2',
      `The anticipated Cox–Snell R² must lie between 0 and its maximum ${maxR2.toFixed(3)} for an outcome ` +
        `proportion of ${Number(phi.toPrecision(3))}, got ${r2}.`,
    );
  if (!(r2 < S))
    throw new FulcraError('bad-r2', `The anticipated Cox–Snell R² (${r2}) must be below the target shrinkage (${S}).`);
  const warnings: EngineWarning[] = [];
  if (fromFit) {
    warnings.push(
      warning(
        'r2-apparent',
        `The Cox–Snell R² (${r2.toFixed(3)}) was taken from the fitted model; this apparent value is ` +
          `optimistic, so the sample size may be underestimated.`,
        'Prefer an R² reported for this outcome in an independent study, or an optimism-corrected one.',
      ),
    );
  } else if (source === 'default-15-percent-of-max') {
    warnings.push(
      warning(
        'r2-assumed',
        `No anticipated R² was given, so 15% of the largest possible Cox–Snell R² ` +
          `(${(0.15 * maxR2).toFixed(3)}) was assumed.`,
        'Give the R² of a previous model for this outcome, or of the fitted model, for a better estimate.',
      ),
    );
  }
  const nFor = (s: number) => Math.ceil(P / ((s - 1) * Math.log(1 - r2 / s)) - 1e-9);
  const sVh = r2 / (r2 + delta * maxR2);
  const z = qnorm(0.975);
  const n3 = Math.ceil((z / margin) ** 2 * phi * (1 - phi) - 1e-9);
  const { actual: at } = input;
  if (at && !(at.n >= 0 && at.events >= 0 && at.events <= at.n))
    throw new FulcraError(
      'bad-count',
      `The data at hand must have 0 ≤ events ≤ n, got ${at.events} events in ${at.n}.`,
    );
  const mk = (id: 'i' | 'ii' | 'iii', n: number, text: string, consequence: string): SampleSizeCriterion => {
    const events = Math.ceil(n * phi - 1e-9);
    return {
      id,
      concerns: id === 'iii' ? 'overall-risk' : 'overfitting',
      n,
      events,
      eventsPerParameter: (n * phi) / P,
      met: at ? at.n >= n && at.events >= events : null,
      consequence,
      text:
        `${text} you need at least ${n} cases (${events} events, ${((n * phi) / P).toFixed(1)} events ` +
        `per parameter).`,
    };
  };
  const criteria = [
    mk(
      'i',
      nFor(S),
      `(i) For the model's predictions to need shrinking by no more than ${Math.round((1 - S) * 100)}% ` +
        `(expected shrinkage factor ≥ ${S})`,
      `Expect over-fitting: predictions too extreme (expected shrinkage below ${S}); ${SHRINK_OR_FEWER}.`,
    ),
    mk(
      'ii',
      nFor(sVh),
      `(ii) For the apparent Nagelkerke R² to exceed the true one by no more than ${delta}`,
      `Expect over-fitting: the apparent Nagelkerke R² overstates the true one by more than ${delta}; ` +
        `${SHRINK_OR_FEWER}.`,
    ),
    mk(
      'iii',
      n3,
      `(iii) To estimate the overall outcome risk within ±${margin} (95% confidence)`,
      `The overall risk (intercept) is imprecise: the model's average risk may be off by more than ±${margin}.`,
    ),
  ];
  if (at) {
    for (const c of criteria)
      c.text += c.met
        ? ` Met by your ${plural(at.n, 'case')} (${plural(at.events, 'event')}).`
        : ` Not met by your ${plural(at.n, 'case')} (${plural(at.events, 'event')}). ${c.consequence}`;
  }
  const bindingC = criteria.reduce((a, b) => (b.n > a.n ? b : a));
  const r2Source = source === 'given' ? '' : source === 'fitted-model' ? ' (from the fitted model)' : ' (assumed)';
  const summary = [
    `With ${P} candidate parameter${P === 1 ? '' : 's'}, an outcome proportion of ${Number(phi.toPrecision(3))} ` +
      `and a Cox–Snell R² of ` +
      `${r2.toFixed(3)}${r2Source}, the model needs at least ${bindingC.n} cases (${bindingC.events} events, ` +
      `${bindingC.eventsPerParameter.toFixed(1)} events per parameter).`,
    `The binding requirement is criterion (${bindingC.id}).`,
    ...criteria.map((c) => c.text),
  ];
  let actual: SampleSizeResult['actual'] = null;
  if (at) {
    const { n, events } = at;
    const enough = criteria.every((c) => c.met);
    actual = { n, events, eventsPerParameter: events / P, enough };
    summary.push(
      `Your data (${plural(n, 'case')}, ${plural(events, 'event')}, ${(events / P).toFixed(1)} per parameter) ` +
        verdict(criteria),
    );
  }
  return {
    criteria,
    requiredN: bindingC.n,
    requiredEvents: bindingC.events,
    requiredEventsPerParameter: bindingC.eventsPerParameter,
    binding: bindingC.id,
    r2cs: r2,
    r2csSource: source,
    maxR2cs: maxR2,
    summary,
    actual,
    warnings,
  };
}
