/**
 * One plain-language line for each measure the page and the PDF show, written for a reader without statistics
 * training (an infection-prevention nurse, a quality engineer). The page places them beside each measure
 * (src/ui/Explain.tsx); the PDF prints them all as its glossary section (reportSectionGlossary.ts).
 */
export interface GlossaryEntry {
  /** The name as printed (the PDF's glossary entry, the hint's lead). */
  label: string;
  /** One plain, correct line. */
  text: string;
}

export const GLOSSARY = {
  auc: {
    label: 'AUC (c-statistic)',
    text:
      'The chance that a randomly chosen case with the event gets a higher predicted risk than one without; ' +
      '0.5 is a coin toss, 1 is perfect.',
  },
  calibrationSlope: {
    label: 'Calibration slope',
    text:
      'How well the spread of predicted risks matches what happened: 1 is ideal; below 1 the predictions ' +
      'are too extreme (typical of overfitting), above 1 too timid.',
  },
  calibrationInTheLarge: {
    label: 'Calibration-in-the-large',
    text:
      'Whether the risks are right on average: 0 is ideal; above 0 the model predicts too low overall, ' +
      'below 0 too high (on the log-odds scale).',
  },
  ici: {
    label: 'ICI, E50, E90, Emax',
    text:
      'The gap between predicted and observed risk along the smoothed calibration curve: ICI is the average gap, ' +
      'E50 the median, E90 the 90th percentile and Emax the largest; 0 is perfect.',
  },
  brier: {
    label: 'Brier score',
    text:
      'The average squared difference between predicted risk and what happened (1 or 0); lower is better, ' +
      '0 is perfect.',
  },
  scaledBrier: {
    label: 'Scaled Brier score',
    text:
      'The Brier score compared with always predicting the overall event rate: 0 is no better than that, ' +
      '1 is perfect.',
  },
  averagePrecision: {
    label: 'Average precision',
    text:
      'The positive predictive value averaged over all cut-offs, weighted by the cases found; the event rate is ' +
      'what chance gives, 1 is perfect.',
  },
  hosmerLemeshow: {
    label: 'Hosmer\u2013Lemeshow test',
    text:
      'Compares predicted and observed events in groups of similar risk; a small p hints at poor calibration, ' +
      'but the result depends on how the groups are made.',
  },
  netBenefit: {
    label: 'Net benefit',
    text:
      'True positives found per patient, minus false alarms weighted by how much a false alarm counts against ' +
      'a missed case at that cut-off; compare with treating everyone or no one.',
  },
  calibrationCurve: {
    label: 'Calibration curve',
    text:
      'Observed event rate plotted against predicted risk; a model whose risks can be taken at face value ' +
      'follows the diagonal.',
  },
  rocCurve: {
    label: 'ROC curve',
    text: 'Sensitivity against 1 \u2212 specificity over every cut-off; the area under it is the AUC.',
  },
  optimism: {
    label: 'Optimism (bootstrap-corrected)',
    text:
      'How much better a model looks on the data it was built from than on new data; the bootstrap estimates ' +
      'it by refitting on resampled data, and the corrected value subtracts it.',
  },
  apparent: {
    label: 'Apparent performance',
    text: 'Performance measured on the same data the model was fitted to; usually too flattering.',
  },
  oddsRatio: {
    label: 'Odds ratio',
    text:
      'How many times the odds of the event are multiplied per unit increase of a predictor (or versus the ' +
      'reference category); 1 means no association, above 1 higher risk, below 1 lower.',
  },
  coefficient: {
    label: 'Coefficient (log-odds)',
    text: 'The change in the log-odds of the event per unit of the predictor; the odds ratio is exp(coefficient).',
  },
  reference: {
    label: 'Reference category',
    text: 'The category the others are compared with; its odds ratio is 1 by definition.',
  },
  confidenceInterval: {
    label: 'Confidence interval',
    text:
      'The range of values compatible with the data at the stated level (e.g. 95%); a wide interval means the ' +
      'data say little about the value.',
  },
  profileLikelihood: {
    label: 'Profile-likelihood interval',
    text:
      'A confidence interval found by asking how far the value can move before the fit gets clearly worse; ' +
      'more accurate than the Wald interval for small data and need not be symmetric.',
  },
  wald: {
    label: 'Wald interval and test',
    text: 'The quick interval and p-value from the estimate \u00b1 about two standard errors.',
  },
  standardError: {
    label: 'Standard error',
    text: 'How much an estimate would vary from sample to sample; smaller means more precise.',
  },
  pValue: {
    label: 'p-value',
    text:
      'How surprising the data would be if the predictor had no association at all; small values (e.g. below ' +
      '0.05) argue against no association, but say nothing about how large it is.',
  },
  likelihoodRatioTest: {
    label: 'Likelihood-ratio test',
    text:
      'Compares the fit with and without a term (all its parts at once); a small p means the term improves ' +
      'the fit more than chance would.',
  },
  crossEntropy: {
    label: 'Cross-entropy (loss)',
    text:
      'The average penalty for the predicted risks: \u2212log of the risk given to what actually happened; ' +
      'the fitted coefficients are where it is lowest.',
  },
  lossSurface: {
    label: 'Loss surface',
    text: 'The cross-entropy drawn over two coefficients, like a map of a valley; the estimate sits at the bottom.',
  },
  eventsPerParameter: {
    label: 'Events per parameter',
    text:
      'The number of the rarer outcome divided by the number of coefficients estimated; few events per ' +
      'parameter make overfitting likely.',
  },
  sampleSize: {
    label: 'Minimum sample size',
    text:
      'The number of rows needed so the model is not overfitted and its overall risk is estimated precisely ' +
      '(Riley and colleagues\u2019 criteria).',
  },
  sensitivity: {
    label: 'Sensitivity',
    text: 'Of the cases with the event, the share flagged by the cut-off.',
  },
  specificity: {
    label: 'Specificity',
    text: 'Of the cases without the event, the share not flagged.',
  },
  ppv: {
    label: 'PPV (positive predictive value)',
    text: 'Of the cases flagged, the share that have the event; it depends on how common the event is.',
  },
  npv: {
    label: 'NPV (negative predictive value)',
    text: 'Of the cases not flagged, the share without the event; it depends on how common the event is.',
  },
  likelihoodRatios: {
    label: 'LR+ and LR\u2212',
    text:
      'How much a flag multiplies the odds of the event (LR+, higher is better), and how much no flag ' +
      'multiplies them (LR\u2212, lower is better).',
  },
  cutoff: {
    label: 'Cut-off',
    text: 'The predicted risk at or above which a case is flagged.',
  },
  expectedCost: {
    label: 'Expected cost',
    text:
      'Missed cases times their cost plus false alarms times theirs, per case; the cheapest cut-off is where ' +
      'this is lowest.',
  },
  separation: {
    label: 'Separation',
    text:
      'A predictor (or a mix of them) splits the outcome perfectly, so ordinary estimates run off to infinity; ' +
      'Firth\u2019s method or a penalty gives usable estimates.',
  },
  firth: {
    label: 'Firth\u2019s method',
    text:
      'A gently penalised fit that shrinks estimates away from infinity; suited to small data and separation, ' +
      'and still gives confidence intervals.',
  },
  penalised: {
    label: 'Penalised fit (ridge, lasso, elastic net)',
    text:
      'Shrinks coefficients towards 0 to curb overfitting; lasso can drop predictors entirely, ridge keeps all, ' +
      'elastic net mixes both. No valid confidence intervals or p-values.',
  },
  spline: {
    label: 'Spline',
    text: 'A smooth bendable curve that lets risk rise and fall with a numeric predictor instead of a straight line.',
  },
  interaction: {
    label: 'Interaction',
    text: 'The effect of one predictor depends on the value of another.',
  },
  multipleImputation: {
    label: 'Multiple imputation',
    text:
      'Fills in missing values several times with plausible guesses, fits each completed data set, and pools ' +
      'the results so the uncertainty of the guesses is kept.',
  },
  externalValidation: {
    label: 'External validation',
    text:
      'Checking the model on data it has not seen (another period or site); the honest test of whether it ' +
      'travels.',
  },
  recalibration: {
    label: 'Recalibration (new intercept and slope)',
    text:
      'The intercept and slope that would make the risks fit the new data; intercept 0 and slope 1 mean no ' +
      'adjustment is needed.',
  },
  observedExpected: {
    label: 'O/E (observed to expected)',
    text:
      'Events that happened divided by the events the model expected for those cases (the sum of their risks); ' +
      '1 is as expected, 1.5 is half as many again, allowing for case mix.',
  },
  funnelPlot: {
    label: 'Funnel plot',
    text:
      "Each unit's O/E against its expected count, with limits that narrow as the count grows: a unit outside " +
      'the outer (99.8 %) limits is unlikely to differ by chance alone.',
  },
  cusum: {
    label: 'Risk-adjusted CUSUM',
    text:
      'A running score, case by case, that rises when events exceed what the risks predict and signals when it ' +
      'crosses its limit h; it then starts again from zero.',
  },
  arl: {
    label: 'ARL (average run length)',
    text:
      'How many cases a chart runs on average before it signals; the in-control ARL, when nothing has changed, ' +
      'sets the limit h, so a larger one means fewer false alarms and slower detection.',
  },
  cumulativeOMinusE: {
    label: 'Cumulative O − E (VLAD)',
    text:
      'Observed minus expected events added up case by case (a variable life-adjusted display): a rising curve ' +
      'means more events than the case mix predicts.',
  },
} satisfies Record<string, GlossaryEntry>;

export type GlossaryTerm = keyof typeof GLOSSARY;

/** Every term in print order. */
export const GLOSSARY_TERMS = Object.keys(GLOSSARY) as GlossaryTerm[];

/** The entry for a term; unknown names throw, so a typo on the page fails loudly in tests. */
export function glossaryEntry(term: string): GlossaryEntry {
  const entry = (GLOSSARY as Record<string, GlossaryEntry>)[term];
  if (!entry) throw new Error(`No glossary entry "${term}".`);
  return entry;
}
