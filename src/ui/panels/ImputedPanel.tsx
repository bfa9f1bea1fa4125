import type { FitView } from '../../worker/protocol';
import { useApp, useEnv } from '../context';
import { ci, count, num, plural, pValue } from '../format';

/** Complete-case fit beside the same model pooled over multiple imputations (Rubin's rules). */
export function ImputedPanel({ view }: { view: FitView }) {
  const { ctl } = useEnv();
  const imp = useApp((s) => s.imputed);
  const busy = useApp((s) => s.jobs.length > 0);
  if (view.fit.nDropped === 0) return null;
  const penalised = !['ml', 'firth'].includes(view.request.method);
  const level = Math.round(view.fit.level * 100);
  return (
    <section className="imputed" aria-label="Missing values">
      <h3>Missing values</h3>
      <p>
        This fit left out {plural(view.fit.nDropped, 'row')} with a missing value (complete-case analysis). That is
        unbiased only under conditions on why values are missing; multiple imputation uses the other columns to fill
        them in ten times and pools the ten fits.
      </p>
      <button type="button" disabled={busy || penalised} onClick={() => void ctl.fitImputed()}>
        Fit again with multiple imputation
      </button>
      {penalised && <span className="hint"> Available for standard and Firth fits.</span>}
      {imp && (
        <table className="odds" data-testid="imputed-table">
          <caption>
            Pooled over {imp.m} imputations (Rubin’s rules): {count(imp.nImputedRows)} of {count(imp.nRows)} rows had a
            value filled in ({imp.imputedColumns.map((c) => `${c.column}: ${count(c.cells)} by ${c.method}`).join('; ')}
            ). The model-summary PDF includes this table as a sensitivity analysis; the model itself stays the
            complete-case fit.
          </caption>
          <thead>
            <tr>
              <th scope="col">Term</th>
              <th scope="col">Coefficient</th>
              <th scope="col">Odds ratio</th>
              <th scope="col">{level}% CI</th>
              <th scope="col">p</th>
              <th scope="col">Fraction of missing information</th>
              <th scope="col">Complete-case coefficient</th>
            </tr>
          </thead>
          <tbody>
            {imp.rows.map((r) => (
              <tr key={r.name}>
                <th scope="row">{r.name}</th>
                <td className="num">{num(r.estimate, 4)}</td>
                <td className="num">{r.name === '(Intercept)' ? '—' : num(r.oddsRatio, 3)}</td>
                <td className="num">
                  {r.name === '(Intercept)'
                    ? '—'
                    : ci(r.lower === null ? null : Math.exp(r.lower), r.upper === null ? null : Math.exp(r.upper), 3)}
                </td>
                <td className="num">{pValue(r.p)}</td>
                <td className="num">{num(r.fmi, 3)}</td>
                <td className="num">{num(view.rows.find((c) => c.name === r.name)?.estimate, 4)}</td>
              </tr>
            ))}
          </tbody>
        </table>
      )}
    </section>
  );
}
