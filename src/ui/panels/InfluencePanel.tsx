import { useEffect } from 'react';
import type { InfluentialRow } from '../../engine/diagnostics';
import type { DiagnosticsView } from '../../worker/diagnosticsOps';
import type { FitView } from '../../worker/protocol';
import * as I from '../../state/influenceState';
import { useApp, useEnv } from '../context';
import { count, num, palette, plural } from '../format';
import { ScatterRefPlot } from '../plots/ScatterRefPlot';
import { Caution } from '../Caution';
import { StaleBanner } from '../StaleBanner';

/** The change of a coefficient as a percentage of its all-rows value (per-unit odds ratios near 1 hide it). */
const coefChange = (before: number, after: number) =>
  before === 0
    ? '—'
    : `${after >= before ? '+' : '−'}${Math.abs((100 * (after - before)) / Math.abs(before)).toFixed(0)}%`;

const orText = (x: number) => (Math.abs(x - 1) < 0.05 ? x.toFixed(4) : num(x, 3));

/**
 * "Influential rows": which rows drive the model. The engine's diagnostics of the current fit (leverage,
 * standardised residuals, Cook's distance, DFBETAS), the rows they name, two plots with reference lines named by
 * their rule, and "what if these rows were left out?" with the odds ratios before and after side by side.
 */
export function InfluencePanel() {
  const { ctl } = useEnv();
  const fit = useApp((s) => s.fit);
  const inf = useApp((s) => s.influence);
  useEffect(() => {
    if (fit && inf.forFit !== fit) void ctl.loadInfluence();
  }, [fit, inf.forFit, ctl]);
  if (!fit) return <div className="panel">Fit a model first.</div>;
  const view = inf.forFit === fit ? inf.view : null;
  return (
    <div className="panel influence-panel" data-testid="influence-panel">
      <h2>Influential rows</h2>
      <StaleBanner />
      <p className="hint">
        Which rows move this model most: a data-entry error (an impossible value, an outcome coded the wrong way) can
        steer a whole model. Each measure is computed for every row the model used, in one pass over the data.
      </p>
      {!view && <p>Computing the diagnostics…</p>}
      {view && <LeftOut fit={fit} view={view} />}
      {view && <RowWarnings view={view} />}
      {view && <TopRows view={view} selected={inf.selected} />}
      {view && <Plots view={view} />}
      {view && <Applicability view={view} />}
      <Caution />
    </div>
  );
}

function RowWarnings({ view }: { view: DiagnosticsView }) {
  const ws = view.summary.warnings;
  if (ws.length === 0)
    return (
      <p data-testid="influence-warnings">
        No row has a standardised residual beyond ±3, a Cook’s distance above 1, or moves an odds ratio by more than
        half its standard error.
      </p>
    );
  return (
    <ul className="notices" data-testid="influence-warnings">
      {ws.map((w) => (
        <li key={w.code} className="notice warning" data-code={w.code}>
          {w.message} <span className="suggestion">{w.suggestion}</span>
        </li>
      ))}
    </ul>
  );
}

function TopRows({ view, selected }: { view: DiagnosticsView; selected: number[] }) {
  const { ctl } = useEnv();
  const s = view.summary;
  const by = s.rankedBy === 'cooks' ? 'Cook’s distance' : 'the size of the deviance residual';
  return (
    <section>
      <h3>
        The {plural(s.top.length, 'row')} that move the model most (by {by})
      </h3>
      <table className="num influence-table" data-testid="influence-table">
        <thead>
          <tr>
            <th scope="col">Leave out</th>
            <th scope="col">Spreadsheet row</th>
            <th scope="col">Outcome</th>
            <th scope="col">Risk</th>
            <th scope="col">Leverage</th>
            <th scope="col">Std. Pearson</th>
            <th scope="col">Std. deviance</th>
            <th scope="col">Cook’s D</th>
            <th scope="col">Largest |DFBETAS|</th>
            <th scope="col">Odds ratio it moves most (one-step)</th>
          </tr>
        </thead>
        <tbody>
          {s.top.map((t) => (
            <TopRow key={t.sheetRow} t={t} ticked={selected.includes(t.sheetRow)} />
          ))}
        </tbody>
      </table>
      <p>
        <button
          type="button"
          data-testid="refit-without"
          disabled={selected.length === 0}
          onClick={() => void ctl.act(I.refitWithoutRows, undefined)}
        >
          {selected.length === 0
            ? 'Tick rows to refit without them'
            : `Refit without ${selected.length === 1 ? 'row' : 'rows'} ${selected.map(count).join(', ')}`}
        </button>{' '}
        <span className="hint">
          The data are not changed; the rows left out are recorded with the model and in the PDF.
        </span>
      </p>
    </section>
  );
}

function TopRow({ t, ticked }: { t: InfluentialRow; ticked: boolean }) {
  const { ctl, store } = useEnv();
  return (
    <tr data-row={t.sheetRow}>
      <td>
        <input
          type="checkbox"
          aria-label={`Leave out row ${t.sheetRow}`}
          checked={ticked}
          onChange={() => store.apply(I.toggleLeaveOut, t.sheetRow)}
        />
      </td>
      <th scope="row">
        <button
          type="button"
          className="link"
          title="Show this row in the data grid"
          onClick={() => {
            store.apply(I.showSheetRow, { sheetRow: t.sheetRow, dataRow: t.dataRow });
            ctl.show('data');
          }}
        >
          {count(t.sheetRow)}
        </button>
      </th>
      <td>{t.outcome === 1 ? 'event' : 'no event'}</td>
      <td>{num(t.risk, 3)}</td>
      <td>{num(t.leverage, 4)}</td>
      <td>{num(t.stdPearson, 2)}</td>
      <td>{num(t.stdDeviance, 2)}</td>
      <td>{num(t.cooks, 4)}</td>
      <td>{t.maxAbsDfbetas === null ? '—' : `${num(t.maxAbsDfbetas, 2)} (${t.dfbetasCoefficient})`}</td>
      <td>
        {t.shift
          ? `${t.shift.coefficient}: ${orText(t.shift.oddsRatioBefore)} → ${orText(t.shift.oddsRatioAfter)} ` +
            `(${t.shift.inSe.toFixed(1)} SE)`
          : '—'}
      </td>
    </tr>
  );
}

function LeftOut({ fit, view }: { fit: FitView; view: DiagnosticsView }) {
  const { ctl } = useEnv();
  const before = useApp((s) => s.influence.before);
  if (view.leftOut.length === 0) return null;
  return (
    <section className="left-out" data-testid="left-out">
      <p>
        <strong>
          {view.leftOut.length === 1 ? 'Row' : 'Rows'} {view.leftOut.map(count).join(', ')} left out of this fit
        </strong>{' '}
        on request ({count(fit.rowsUsed)} rows used). The data are unchanged.{' '}
        <button type="button" data-testid="refit-all" onClick={() => void ctl.refitAllRows()}>
          Fit all rows again
        </button>
      </p>
      {before && (
        <table className="num" data-testid="leave-out-compare">
          <caption>Odds ratios with all rows and without the rows left out (95% Wald limits)</caption>
          <thead>
            <tr>
              <th scope="col">Term</th>
              <th scope="col">All rows ({count(before.rowsUsed)})</th>
              <th scope="col">Without ({count(fit.rowsUsed)})</th>
              <th scope="col">Change of the coefficient (log odds ratio)</th>
            </tr>
          </thead>
          <tbody>
            {fit.rows
              .filter((r) => r.term !== '(Intercept)')
              .map((r) => {
                const b = before.odds.find((o) => o.name === r.name);
                const lim = (lo: number | null, hi: number | null) =>
                  lo === null || hi === null ? '' : ` (${orText(Math.exp(lo))} to ${orText(Math.exp(hi))})`;
                return (
                  <tr key={r.name} data-name={r.name}>
                    <th scope="row">{r.name}</th>
                    <td data-col="before">{b ? orText(b.oddsRatio) + lim(b.waldLower, b.waldUpper) : '—'}</td>
                    <td data-col="after">{orText(r.oddsRatio) + lim(r.waldLower, r.waldUpper)}</td>
                    <td data-col="change">{b ? coefChange(Math.log(b.oddsRatio), Math.log(r.oddsRatio)) : '—'}</td>
                  </tr>
                );
              })}
          </tbody>
        </table>
      )}
    </section>
  );
}

function Plots({ view }: { view: DiagnosticsView }) {
  const p = view.points;
  const s = view.summary;
  const top = new Set(s.top.slice(0, 5).map((t) => t.sheetRow));
  const marked: number[] = [];
  for (let i = 0; i < p.sheetRow.length; i++) if (top.has(p.sheetRow[i])) marked.push(i);
  const labels = marked.map((i) => String(p.sheetRow[i]));
  const th = (m: string) => s.thresholds.filter((t) => t.measure === m);
  const maxOf = (a: ArrayLike<number>) => {
    let m = 0;
    for (let i = 0; i < a.length; i++) if (Number.isFinite(a[i]) && Math.abs(a[i]) > m) m = Math.abs(a[i]);
    return m;
  };
  const rowX = Float64Array.from(p.sheetRow);
  const rMax = Math.max(3.5, maxOf(p.residual) * 1.05);
  return (
    <section className="cols">
      {p.cooks && (
        <div>
          <h3>Cook’s distance by row</h3>
          <ScatterRefPlot
            title="Cook's distance by spreadsheet row"
            xLabel="Spreadsheet row"
            yLabel="Cook's distance"
            x={rowX}
            y={p.cooks}
            marked={marked}
            labels={labels}
            xDomain={[rowX[0] ?? 0, rowX[rowX.length - 1] ?? 1]}
            yDomain={[0, Math.max(th('cooks')[0].value * 1.5, maxOf(p.cooks) * 1.05)]}
            lines={th('cooks').map((t, k) => ({
              axis: 'y' as const,
              value: t.value,
              label: k === 0 ? '4/n' : 'D = 1',
              color: k === 0 ? palette.orange : palette.vermillion,
            }))}
          />
        </div>
      )}
      <div>
        <h3>{p.leverage ? 'Standardised deviance residual against leverage' : 'Deviance residual by row'}</h3>
        <ScatterRefPlot
          title={p.leverage ? 'Standardised deviance residual against leverage' : 'Deviance residual by row'}
          xLabel={p.leverage ? 'Leverage (hat value)' : 'Spreadsheet row'}
          yLabel={p.leverage ? 'Standardised deviance residual' : 'Deviance residual'}
          x={p.leverage ?? rowX}
          y={p.residual}
          marked={marked}
          labels={labels}
          xDomain={
            p.leverage
              ? [0, Math.max(th('leverage')[1].value * 1.2, maxOf(p.leverage) * 1.05)]
              : [rowX[0] ?? 0, rowX[rowX.length - 1] ?? 1]
          }
          yDomain={[-rMax, rMax]}
          lines={[
            ...(p.leverage
              ? th('leverage').map((t, k) => ({
                  axis: 'x' as const,
                  value: t.value,
                  label: k === 0 ? '2p/n' : '3p/n',
                  color: k === 0 ? palette.orange : palette.vermillion,
                }))
              : []),
            { axis: 'y' as const, value: 3, label: '+3', color: palette.purple },
            { axis: 'y' as const, value: -3, label: '−3', color: palette.purple },
          ]}
        />
      </div>
      <div className="rules" data-testid="influence-rules">
        <h3>Reference lines</h3>
        <ul>
          {s.thresholds.map((t) => (
            <li key={t.rule}>
              {t.rule}: {num(t.value, t.value < 0.1 ? 4 : 2)}
            </li>
          ))}
        </ul>
        {view.sampled && (
          <p className="hint">
            The plots show {count(p.sheetRow.length)} of {count(view.rowsUsed)} rows: the 2,000 with the largest Cook’s
            distance and an even sample of the rest. The table and the warnings use every row.
          </p>
        )}
        {s.counts && (
          <p className="hint">
            Rows above 2p/n leverage: {count(s.counts.leverageAbove2p)}; above 3p/n: {count(s.counts.leverageAbove3p)};
            Cook’s distance above 4/n: {count(s.counts.cooksAbove4n)}; |standardised residual| above 3:{' '}
            {count(s.counts.largeResidual)}.
          </p>
        )}
      </div>
    </section>
  );
}

function Applicability({ view }: { view: DiagnosticsView }) {
  const notExact = view.summary.applicability.filter((a) => a.status !== 'exact');
  return (
    <section data-testid="influence-applicability">
      <h3>What these measures mean for this fit</h3>
      <p className="hint">
        Formulas as R’s glm influence measures (hatvalues, rstandard, cooks.distance, dfbetas): one-step approximations
        from the fitted model, no refit per row. Leave a row out to see its exact effect.
      </p>
      {notExact.length > 0 && (
        <ul>
          {notExact.map((a) => (
            <li key={a.measure}>
              <strong>{a.measure}</strong>: {a.status}. {a.why}
            </li>
          ))}
        </ul>
      )}
    </section>
  );
}
