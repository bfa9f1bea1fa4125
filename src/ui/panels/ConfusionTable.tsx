import type { ThresholdView } from '../../worker/protocol';
import { count, num, pct } from '../format';

/** Confusion matrix and the rates at the cut-off, with Wilson 95% intervals. */
export function ConfusionTable({ view }: { view: ThresholdView }) {
  const m = view.metrics;
  const prop = (label: string, e: typeof m.sensitivity, testid: string) => (
    <tr><th scope="row">{label}</th><td className="num" data-testid={testid}>{pct(e.estimate)}</td><td className="num">{e.lower === null ? '—' : `${pct(e.lower)} to ${pct(e.upper)}`}</td></tr>
  );
  return (
    <div data-testid="confusion">
      <table className="confusion">
        <caption>At a cut-off of {pct(m.threshold, 1)} ({m.flagRule.toLowerCase()})</caption>
        <thead><tr><td /><th scope="col">Had the event</th><th scope="col">No event</th></tr></thead>
        <tbody>
          <tr><th scope="row">Flagged</th><td className="num" data-testid="tp">{count(m.tp)} caught</td><td className="num" data-testid="fp">{count(m.fp)} false alarms</td></tr>
          <tr><th scope="row">Not flagged</th><td className="num" data-testid="fn">{count(m.fn)} missed</td><td className="num" data-testid="tn">{count(m.tn)} correctly clear</td></tr>
        </tbody>
      </table>
      <table className="rates">
        <thead><tr><th scope="col">Measure</th><th scope="col">Value</th><th scope="col">95% CI (Wilson)</th></tr></thead>
        <tbody>
          {prop('Sensitivity', m.sensitivity, 'sens')}
          {prop('Specificity', m.specificity, 'spec')}
          {prop('PPV (flagged who had the event)', m.ppv, 'ppv')}
          {prop('NPV (clear who stayed clear)', m.npv, 'npv')}
          {prop('Fraction flagged', m.fractionFlagged, 'flagged')}
          <tr><th scope="row">LR+ / LR−</th><td className="num">{num(m.lrPositive, 2)} / {num(m.lrNegative, 2)}</td><td /></tr>
          <tr><th scope="row">Expected cost per 100 cases</th><td className="num" data-testid="cost100">{num(m.expectedCostPer100, 2)}</td><td /></tr>
          <tr><th scope="row">Net benefit at this cut-off</th><td className="num">{num(view.netBenefit, 4)}</td><td /></tr>
        </tbody>
      </table>
    </div>
  );
}
