import { numericTerms, oddsDisplayRows, orPerUnit } from '../../report/oddsUnits';
import { setOddsUnit } from '../../state/actions';
import type { FitView, OddsRow } from '../../worker/protocol';
import { useApp, useEnv } from '../context';
import { Explain } from '../Explain';
import { ci, num, pValue } from '../format';
import { NumberField } from '../NumberField';

/**
 * Odds ratios with Wald and profile-likelihood intervals, per a unit the user chooses for each numeric predictor
 * (display only: OR^unit, limits exp(unit·limit)), with a row for the reference level of each categorical
 * predictor; the true values for invented data.
 */
export function OddsTable({ view }: { view: FitView }) {
  const units = useApp((s) => s.oddsUnits);
  const truth = view.rows.some((r) => r.truth !== null);
  const level = Math.round(view.fit.level * 100);
  // No inference columns for ridge / lasso / elastic net, or when no row has any interval. Under complete
  // separation an ML fit has no SEs at all but keeps its profile limits (some unbounded).
  const penalised =
    ['ridge', 'lasso', 'elastic-net'].includes(view.fit.method) ||
    view.fit.coefficients.every((c) => c.se === null && profileCi(view, c, 1) === '—');
  const rows = oddsDisplayRows(view.fit.recipe, view.rows, units);
  const width = 3 + (penalised ? 0 : 4) + (truth ? 1 : 0);
  return (
    <>
      <UnitChooser view={view} />
      <table className="odds" data-testid="odds-table">
        <caption>
          {penalised
            ? 'Penalised estimates (no valid confidence intervals or p-values for penalised fits).'
            : `Odds ratios with ${level}% confidence intervals.`}
        </caption>
        <thead>
          <tr>
            <th scope="col">Term</th>
            <th scope="col">
              Coefficient (log-odds)
              <Explain term="coefficient" tip />
            </th>
            <th scope="col">
              Odds ratio
              <Explain term="oddsRatio" tip />
            </th>
            {!penalised && (
              <th scope="col">
                {level}% CI (profile likelihood)
                <Explain term="profileLikelihood" tip />
              </th>
            )}
            {!penalised && (
              <th scope="col">
                {level}% CI (Wald)
                <Explain term="wald" tip />
              </th>
            )}
            {!penalised && (
              <th scope="col">
                Std. error
                <Explain term="standardError" tip />
              </th>
            )}
            {!penalised && (
              <th scope="col">
                p (Wald)
                <Explain term="pValue" tip />
              </th>
            )}
            {truth && <th scope="col">True log-odds (invented)</th>}
          </tr>
        </thead>
        <tbody>
          {rows.map((d) =>
            d.kind === 'reference' ? (
              <tr key={`ref:${d.term}`} className="reference" data-name={d.label} data-reference="true">
                <th scope="row">{d.label}</th>
                <td className="num">—</td>
                <td className="num" data-col="or">
                  1 (reference)
                </td>
                <td className="hint" colSpan={width - 3}>
                  the level the others are compared with
                </td>
              </tr>
            ) : (
              <CoefficientRow key={d.row.name} view={view} r={d.row} unit={d.unit} label={d.label} {...{ penalised }} />
            ),
          )}
        </tbody>
      </table>
      <ul className="explain-list hint">
        <li>
          <Explain term="oddsRatio" label />
        </li>
        <li>
          <Explain term="confidenceInterval" label />
        </li>
      </ul>
    </>
  );
}

function CoefficientRow(p: { view: FitView; r: OddsRow; unit: number; label: string; penalised: boolean }) {
  const { view, r, unit, penalised } = p;
  const intercept = r.term === '(Intercept)';
  const truth = view.rows.some((k) => k.truth !== null);
  return (
    <tr className={r.aliased ? 'aliased' : ''} data-name={r.name} data-unit={unit}>
      <th scope="row">
        {p.label}
        {r.aliased ? ' (aliased: dropped)' : ''}
      </th>
      <td className="num" data-col="estimate">
        {num(r.estimate, 4)}
      </td>
      <td className="num" data-col="or">
        {intercept ? '—' : num(unit === 1 ? r.oddsRatio : orPerUnit(r.estimate, unit), 3)}
      </td>
      {!penalised && <td className="num">{intercept ? '—' : profileCi(view, r, unit)}</td>}
      {!penalised && (
        <td className="num">{intercept ? '—' : ci(orPerUnit(r.waldLower, unit), orPerUnit(r.waldUpper, unit), 3)}</td>
      )}
      {!penalised && <td className="num">{num(r.se, 4)}</td>}
      {!penalised && <td className="num">{pValue(r.p)}</td>}
      {truth && <td className="num">{num(r.truth, 3)}</td>}
    </tr>
  );
}

/** One "odds ratio per …" field per numeric predictor; the setting is kept with the workspace. */
function UnitChooser({ view }: { view: FitView }) {
  const { store } = useEnv();
  const units = useApp((s) => s.oddsUnits);
  const terms = numericTerms(view.fit.recipe);
  if (terms.length === 0) return null;
  return (
    <fieldset className="odds-units" data-testid="odds-units">
      <legend>Show odds ratios per</legend>
      {terms.map((t) => (
        <NumberField
          key={t}
          label={`${t}: per`}
          value={units[t] ?? 1}
          min={0}
          valid={(v) => Number.isFinite(v) && v > 0}
          onChange={(unit) => store.apply(setOddsUnit, { term: t, unit })}
        />
      ))}
      <span className="hint">
        e.g. 10 for “per 10 years”. Only the display changes: OR per u units = exp(u·coefficient), and likewise for the
        interval limits.
      </span>
    </fieldset>
  );
}

/** The coefficient row of the fit record behind an odds row (for the unbounded-limit flags). */
const recordRow = (view: FitView, name: string) => view.fit.coefficients.find((c) => c.name === name);

/**
 * The profile interval on the odds-ratio scale per `unit`; a side that is unbounded (a coefficient diverging under
 * separation) reads 0 (lower) or ∞ (upper), a side not computed "—".
 */
function profileCi(
  view: FitView,
  r: { name: string; profileLower: number | null; profileUpper: number | null },
  unit: number,
) {
  const c = recordRow(view, r.name);
  const lo = c?.profileLowerUnbounded ? '0' : r.profileLower === null ? null : num(orPerUnit(r.profileLower, unit), 3);
  const hi = c?.profileUpperUnbounded ? '∞' : r.profileUpper === null ? null : num(orPerUnit(r.profileUpper, unit), 3);
  if (lo === null && hi === null) return '—';
  return `${lo ?? '—'} to ${hi ?? '—'}`;
}
