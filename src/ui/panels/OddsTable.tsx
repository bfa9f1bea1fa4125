import type { FitView } from '../../worker/protocol';
import { ci, num, pValue } from '../format';

/** Odds ratios with Wald and profile-likelihood intervals; the true values for invented data. */
export function OddsTable({ view }: { view: FitView }) {
  const truth = view.rows.some((r) => r.truth !== null);
  const level = Math.round(view.fit.level * 100);
  const penalised = view.rows.every((r) => r.se === null);
  return (
    <table className="odds" data-testid="odds-table">
      <caption>
        {penalised
          ? 'Penalised estimates (no valid confidence intervals or p-values for penalised fits).'
          : `Odds ratios with ${level}% confidence intervals.`}
      </caption>
      <thead>
        <tr>
          <th scope="col">Term</th>
          <th scope="col">Coefficient (log-odds)</th>
          <th scope="col">Odds ratio</th>
          {!penalised && <th scope="col">{level}% CI (profile likelihood)</th>}
          {!penalised && <th scope="col">{level}% CI (Wald)</th>}
          {!penalised && <th scope="col">Std. error</th>}
          {!penalised && <th scope="col">p (Wald)</th>}
          {truth && <th scope="col">True log-odds (invented)</th>}
        </tr>
      </thead>
      <tbody>
        {view.rows.map((r) => (
          <tr key={r.name} className={r.aliased ? 'aliased' : ''} data-name={r.name}>
            <th scope="row">
              {r.name}
              {r.aliased ? ' (aliased: dropped)' : ''}
            </th>
            <td className="num" data-col="estimate">
              {num(r.estimate, 4)}
            </td>
            <td className="num" data-col="or">
              {r.term === '(Intercept)' ? '—' : num(r.oddsRatio, 3)}
            </td>
            {!penalised && (
              <td className="num">
                {r.term === '(Intercept)' ? '—' : ci(exp(r.profileLower), exp(r.profileUpper), 3)}
              </td>
            )}
            {!penalised && (
              <td className="num">{r.term === '(Intercept)' ? '—' : ci(exp(r.waldLower), exp(r.waldUpper), 3)}</td>
            )}
            {!penalised && <td className="num">{num(r.se, 4)}</td>}
            {!penalised && <td className="num">{pValue(r.p)}</td>}
            {truth && <td className="num">{num(r.truth, 3)}</td>}
          </tr>
        ))}
      </tbody>
    </table>
  );
}

const exp = (x: number | null) => (x === null ? null : Math.exp(x));
