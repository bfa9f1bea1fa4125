/**
 * The design rules stated in words, once, for the roles view and the model-summary PDF (the engine applies them:
 * reference levels in design/levels.ts and design.ts, knots in design/splines.ts harrellKnots).
 */

/** The default reference level of a categorical predictor. */
export const REFERENCE_RULE =
  'Reference level, unless one was chosen: the absence level of a two-level column such as 0/1, no/yes or ' +
  'FALSE/TRUE (0, no, FALSE), otherwise the most frequent level.';

/** The default knot placement of a restricted cubic spline. */
export const KNOT_RULE =
  "Knots at Harrell's default quantiles (Hmisc rcspline.eval): .10/.50/.90 of the values for 3 knots, " +
  '.05/.35/.65/.95 for 4, .05/.275/.5/.725/.95 for 5; with fewer than 100 values the outer knots are the 5th ' +
  'smallest and 5th largest value, and a column with at most k + 2 distinct values gets its inner distinct values.';
