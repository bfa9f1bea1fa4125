import type { FitView } from '../../worker/protocol';
import { Explain } from '../Explain';
import { Caution } from '../Caution';
import { useApp } from '../context';
import { count, num, plural, pValue } from '../format';
import { NumbersTable } from '../plots/NumbersTable';
import { ExportReport } from './ExportReport';
import { FitControls } from './FitControls';
import { ForestPlot } from './ForestPlot';
import { ImputedPanel } from './ImputedPanel';
import { OddsTable } from './OddsTable';
import { StaleBanner } from '../StaleBanner';
import { useResultFocus } from '../resultFocus';

export function ModelPanel() {
  const view = useApp((s) => s.fit);
  return (
    <div className="panel model-panel">
      <StaleBanner />
      {!view && <FitControls />}
      {view && <FitSummary view={view} />}
      {view && <OddsTable view={view} />}
      {view && (
        <div className="cols">
          <div>
            <h3>Odds ratios</h3>
            <ForestPlot rows={view.rows} level={view.fit.level} recipe={view.fit.recipe} />
            <NumbersTable
              summary="Odds ratios as numbers"
              headers={['Term', 'Odds ratio', 'Lower', 'Upper']}
              rows={view.rows
                .filter((r) => r.term !== '(Intercept)')
                .map((r) => [
                  r.name,
                  num(r.oddsRatio),
                  unboundedSide(view, r.name, 'lower') ?? num(Math.exp(r.profileLower ?? r.waldLower ?? NaN)),
                  unboundedSide(view, r.name, 'upper') ?? num(Math.exp(r.profileUpper ?? r.waldUpper ?? NaN)),
                ])}
            />
          </div>
          <div>
            <TermTests view={view} />
            <SampleSize view={view} />
          </div>
        </div>
      )}
      {view && <ImputedPanel view={view} />}
      {view && <ExportReport />}
      {view && <Caution />}
    </div>
  );
}

function FitSummary({ view }: { view: FitView }) {
  const f = view.fit;
  const methodName = {
    ml: 'maximum likelihood',
    firth: 'Firth penalised likelihood',
    ridge: 'ridge',
    lasso: 'lasso',
    'elastic-net': 'elastic net',
  }[view.request.method];
  const how = f.converged ? ` in ${f.iterations} iterations` : ' — did NOT converge';
  const heading = useResultFocus<HTMLHeadingElement>('model');
  const lay = view.layout ?? null;
  const weighted = !!lay && (lay.kind !== 'binary' || lay.weights !== null);
  return (
    <section className="summary" aria-label="Fit summary" data-testid="fit-summary">
      <h2 className="result-heading" ref={heading} tabIndex={-1}>
        The fitted model
      </h2>
      <p>
        Fitted by <strong>{methodName}</strong>
        {how} on <strong>{count(f.nUsed)}</strong> {weighted ? 'cases' : f.nUsed === 1 ? 'row' : 'rows'}
        {weighted && lay ? ` from ${count(lay.tableRowsUsed)} of ${count(lay.tableRows)} rows` : ''} (
        {plural(f.events, 'event')}, {plural(f.nonEvents, 'non-event')}
        {!weighted && f.nDropped > 0 ? `; ${plural(f.nDropped, 'row')} left out for missing values` : ''}).{' '}
        {f.parameters} {f.parameters === 1 ? 'parameter' : 'parameters'}: {num(f.eventsPerParameter, 1)} events per
        parameter.
        {view.threads > 1 && (
          <span data-testid="fit-threads"> Sums over the rows ran on {view.threads} threads of this computer.</span>
        )}
        {view.threads === 1 && view.inferenceThreads > 1 && (
          <span data-testid="fit-threads">
            {' '}
            The sums over the rows for the profile-likelihood limits and term tests ran on {view.inferenceThreads}{' '}
            threads of this computer.
          </span>
        )}
        <Explain term="eventsPerParameter" label />
      </p>
      {view.lambda && (
        <p>
          Penalty λ = {num(view.lambda.chosen, 5)} (
          {view.lambda.rule === 'cv-1se' ? 'one-standard-error rule' : 'lowest CV deviance'}; λ at the minimum{' '}
          {num(view.lambda.lambdaMin, 5)}, by the 1-SE rule {num(view.lambda.lambda1se, 5)}; α ={' '}
          {num(view.lambda.alpha, 2)}).
        </p>
      )}
      {f.modelLrChi2 === null || f.modelLrP === null ? (
        <p>
          Deviance {num(f.deviance, 2)} at the shrunken estimates vs {num(f.nullDeviance, 2)} without predictors. No
          likelihood-ratio test, AIC or BIC: the penalised estimate is not a likelihood maximum.
        </p>
      ) : (
        <p>
          Deviance {num(f.deviance, 2)} vs {num(f.nullDeviance, 2)} without predictors
          {penalisedTests(f)
            ? ` (both unpenalised); penalised-likelihood-ratio χ² (Firth's penalised log-likelihood ` +
              `${num(f.penalisedLogLik ?? NaN, 2)}, not a deviance difference) = `
            : ': likelihood-ratio χ² = '}
          {num(f.modelLrChi2, 2)} on {f.modelDf} df, p{' '}
          {pValue(f.modelLrP).startsWith('<') ? pValue(f.modelLrP) : `= ${pValue(f.modelLrP)}`}. AIC {num(f.aic, 1)},
          BIC {num(f.bic, 1)}.
        </p>
      )}
      {weighted && lay && <LayoutNote layout={lay} />}
    </section>
  );
}

/** How a table of counts or weighted rows was counted: the convention, both deviances, fit by covariate pattern. */
function LayoutNote({ layout }: { layout: NonNullable<FitView['layout']> }) {
  const d = layout.deviance;
  const g = layout.goodnessOfFit;
  return (
    <div className="layout-note" data-testid="layout-note">
      <p>{layout.convention}</p>
      {d && (
        <p>
          {`Deviance per case ${num(d.perCase, 2)} (as the table written out one row per case; AIC and BIC use it); `}
          grouped {num(d.grouped, 2)} on {d.groupedDf} df, relative to the saturated model of the table rows (the
          convention of statistics packages that fit events out of trials). The two differ by a constant (
          {num(d.saturated, 2)}) and give the same likelihood-ratio tests.
        </p>
      )}
      {g && (
        <p>
          Goodness of fit by covariate pattern ({count(g.patterns)} patterns, {g.df} df): Pearson χ² {num(g.pearson, 2)}
          , p {pValue(g.pearsonP ?? NaN)}; deviance χ² {num(g.deviance, 2)}, p {pValue(g.devianceP ?? NaN)}.{' '}
          {g.reliable
            ? 'Most expected counts are 5 or more.'
            : `Not trustworthy here: ${Math.round(g.smallExpectedShare * 100)} % of the expected counts are ` +
              'below 5.'}{' '}
          <span className="hint">{g.rule}</span>
        </p>
      )}
    </div>
  );
}

/** Firth's tests are penalised-likelihood ratios (the record's testLikelihood; older records: by method). */
const penalisedTests = (f: FitView['fit']) =>
  (f.testLikelihood ?? (f.method === 'firth' ? 'penalised' : 'ordinary')) === 'penalised';

/** "0" / "∞" for a profile limit that is unbounded on the odds-ratio scale (separation), else null. */
function unboundedSide(view: FitView, name: string, side: 'lower' | 'upper'): string | null {
  const c = view.fit.coefficients.find((k) => k.name === name);
  if (side === 'lower') return c?.profileLowerUnbounded ? '0' : null;
  return c?.profileUpperUnbounded ? '∞' : null;
}

function TermTests({ view }: { view: FitView }) {
  const terms = view.fit.terms.filter((t) => t.name !== '(Intercept)');
  if (terms.every((t) => t.lrChi2 === null)) return null;
  return (
    <table className="terms" aria-label="Likelihood-ratio test per term">
      <caption>
        Does each term matter? {penalisedTests(view.fit) ? 'Penalised-likelihood-ratio' : 'Likelihood-ratio'} test of
        leaving it out{penalisedTests(view.fit) ? " (Firth's penalised likelihood)" : ''}
        <Explain term="likelihoodRatioTest" />
      </caption>
      <thead>
        <tr>
          <th scope="col">Term</th>
          <th scope="col">df</th>
          <th scope="col">χ²</th>
          <th scope="col">p</th>
        </tr>
      </thead>
      <tbody>
        {terms.map((t) => (
          <tr key={t.name}>
            <th scope="row">{t.name}</th>
            <td className="num">{t.df}</td>
            <td className="num">{num(t.lrChi2, 2)}</td>
            <td className="num">{pValue(t.lrP)}</td>
          </tr>
        ))}
      </tbody>
    </table>
  );
}

function SampleSize({ view }: { view: FitView }) {
  if (!view.sampleSize) return null;
  return (
    <section className="sample-size" aria-label="Sample-size check">
      <h3>Is the sample big enough?</h3>
      <ul>
        {view.sampleSize.lines.map((l) => (
          <li key={l}>{l}</li>
        ))}
      </ul>
    </section>
  );
}
