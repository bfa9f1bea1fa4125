import type { ThresholdView } from '../../worker/protocol';
import type { GlossaryTerm } from '../../report/glossary';
import { Explain } from '../Explain';
import { count, num, pct } from '../format';

/** Confusion matrix and the rates at the cut-off, with 95% intervals (Wilson; log method for LR±). */
export function ConfusionTable({ view }: { view: ThresholdView }) {
  const m = view.metrics;
  const prop = (label: string, e: typeof m.sensitivity, testid: string, term: GlossaryTerm) => (
    <tr>
      <th scope="row">
        {label}
        <Explain term={term} />
      </th>
      <td className="num" data-testid={testid}>
        {pct(e.estimate)}
      </td>
      <td className="num">{e.lower === null ? '—' : `${pct(e.lower)} to ${pct(e.upper)}`}</td>
    </tr>
  );
  return (
    <div data-testid="confusion">
      <table className="confusion">
        <caption>
          At a cut-off of {pct(m.threshold, 1)} ({m.flagRule.toLowerCase()})
        </caption>
        <thead>
          <tr>
            <td />
            <th scope="col">Had the event</th>
            <th scope="col">No event</th>
          </tr>
        </thead>
        <tbody>
          <tr>
            <th scope="row">Flagged</th>
            <td className="num" data-testid="tp">
              {count(m.tp)} caught
            </td>
            <td className="num" data-testid="fp">
              {count(m.fp)} false alarms
            </td>
          </tr>
          <tr>
            <th scope="row">Not flagged</th>
            <td className="num" data-testid="fn">
              {count(m.fn)} missed
            </td>
            <td className="num" data-testid="tn">
              {count(m.tn)} correctly clear
            </td>
          </tr>
        </tbody>
      </table>
      <table className="rates">
        <thead>
          <tr>
            <th scope="col">Measure</th>
            <th scope="col">Value</th>
            <th scope="col">95% CI</th>
          </tr>
        </thead>
        <tbody>
          {prop('Sensitivity', m.sensitivity, 'sens', 'sensitivity')}
          {prop('Specificity', m.specificity, 'spec', 'specificity')}
          {prop('PPV (flagged who had the event)', m.ppv, 'ppv', 'ppv')}
          {prop('NPV (clear who stayed clear)', m.npv, 'npv', 'npv')}
          {prop('Fraction flagged', m.fractionFlagged, 'flagged', 'cutoff')}
          <tr>
            <th scope="row">
              Likelihood ratio, flagged (LR+)
              <Explain term="likelihoodRatios" />
            </th>
            <td className="num" data-testid="lr-pos">
              {num(m.lrPositive, 2)}
            </td>
            <td className="num">
              {m.lrPositiveCi ? `${num(m.lrPositiveCi.lower, 2)} to ${num(m.lrPositiveCi.upper, 2)}` : '—'}
            </td>
          </tr>
          <tr>
            <th scope="row">Likelihood ratio, not flagged (LR−)</th>
            <td className="num" data-testid="lr-neg">
              {num(m.lrNegative, 3)}
            </td>
            <td className="num">
              {m.lrNegativeCi ? `${num(m.lrNegativeCi.lower, 3)} to ${num(m.lrNegativeCi.upper, 3)}` : '—'}
            </td>
          </tr>
          <tr>
            <th scope="row">
              Expected cost per 100 cases
              <Explain term="expectedCost" />
            </th>
            <td className="num" data-testid="cost100">
              {num(m.expectedCostPer100, 2)}
            </td>
            <td />
          </tr>
          <tr>
            <th scope="row">
              Net benefit at this cut-off
              <Explain term="netBenefit" />
            </th>
            <td className="num">{num(view.netBenefit, 4)}</td>
            <td />
          </tr>
        </tbody>
      </table>
      <p className="hint">
        Intervals: Wilson for the proportions; log method (Simel 1991) for the likelihood ratios, shown only when none
        of their counts is 0.
      </p>
    </div>
  );
}
