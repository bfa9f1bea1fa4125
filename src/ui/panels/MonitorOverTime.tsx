import type { MonitoringRecord } from '../../engine/monitoring';
import { overallSignals, unitSignals } from '../../engine/core';
import { arlText } from '../../report/monitoringText';
import { ExplainList } from '../Explain';
import { count, num, palette } from '../format';
import { DatePathPlot } from '../plots/DatePathPlot';

/** Over time: the two risk-adjusted CUSUMs and the cumulative O − E, the signal list, the CSV and the report. */
export function MonitorOverTime({
  record: r,
  onCsv,
  onPdf,
}: {
  record: MonitoringRecord;
  onCsv: () => void;
  onPdf: () => void;
}) {
  const range: [number, number] = [r.dateRange.first, r.dateRange.last];
  const signals = overallSignals(r);
  const byUnit = unitSignals(r);
  return (
    <section aria-label="Over time">
      <h3>Over time: risk-adjusted CUSUM and cumulative O − E</h3>
      <div className="plot-row">
        {[r.cusum.deteriorate, r.cusum.improve].map((c) => {
          const worse = c.direction === 'deteriorate';
          return (
            <div key={c.direction}>
              <DatePathPlot
                title={
                  worse
                    ? `CUSUM for deterioration (odds × ${c.oddsRatio})`
                    : `CUSUM for improvement (odds × ${c.oddsRatio})`
                }
                yLabel="CUSUM"
                path={c.path}
                color={worse ? palette.blue : palette.green}
                range={range}
                limit={{ y: worse ? c.h : -c.h, label: `${worse ? '' : '−'}h = ${num(c.h, 2)}` }}
                marks={c.signals.map((s) => ({
                  date: s.date,
                  value: worse ? c.h : -c.h,
                  label: `signal ${s.dateLabel}`,
                }))}
              />
              <p className="hint" data-testid={`arl-${c.direction}`}>
                {arlText(c)}.
              </p>
            </div>
          );
        })}
        <div>
          <DatePathPlot
            title="Cumulative observed minus expected events"
            yLabel="O − E"
            path={r.vlad.path}
            color={palette.purple}
            range={range}
          />
          <p className="hint">
            After the last case ({r.dateRange.lastLabel}): {num(r.vlad.final, 1)} events{' '}
            {r.vlad.final >= 0 ? 'more' : 'fewer'} than expected.
          </p>
        </div>
      </div>
      {signals.length === 0 ? (
        <p>Neither chart over all cases signalled.</p>
      ) : (
        <table data-testid="signal-list">
          <caption>
            Signals over all cases (each restarts its chart at 0; the unit is that of the case at the signal)
          </caption>
          <thead>
            <tr>
              <th scope="col">Chart</th>
              <th scope="col">Date</th>
              <th scope="col">Case</th>
              <th scope="col">Unit of that case</th>
              <th scope="col">Spreadsheet row</th>
            </tr>
          </thead>
          <tbody>
            {signals.slice(0, 50).map(({ s, chart }) => (
              <tr key={`${chart}-${s.case}`}>
                <td>{chart}</td>
                <td>{s.dateLabel}</td>
                <td className="num">{count(s.case)}</td>
                <td>{s.unit ?? '—'}</td>
                <td className="num">{s.row}</td>
              </tr>
            ))}
          </tbody>
        </table>
      )}
      {signals.length > 50 && <p>… and {count(signals.length - 50)} more (the CSV lists all).</p>}
      {r.cusum.deteriorate.byUnit &&
        (byUnit.length === 0 ? (
          <p data-testid="unit-signal-none">No unit’s own chart signalled (each unit’s cases run with the same h).</p>
        ) : (
          <table data-testid="unit-signal-list">
            <caption>
              Signals on each unit’s own chart (its cases in date order, same h; a unit with a small share of the cases
              can signal here when the chart over all cases does not)
            </caption>
            <thead>
              <tr>
                <th scope="col">Unit</th>
                <th scope="col">Chart</th>
                <th scope="col">Date</th>
                <th scope="col">Case within the unit</th>
                <th scope="col">Spreadsheet row</th>
              </tr>
            </thead>
            <tbody>
              {byUnit.slice(0, 50).map(({ s, chart, unit }) => (
                <tr key={`${unit}-${chart}-${s.case}`}>
                  <td>{unit}</td>
                  <td>{chart}</td>
                  <td>{s.dateLabel}</td>
                  <td className="num">{count(s.case)}</td>
                  <td className="num">{s.row}</td>
                </tr>
              ))}
            </tbody>
          </table>
        ))}
      {byUnit.length > 50 && <p>… and {count(byUnit.length - 50)} more (the CSV lists all).</p>}
      <button type="button" onClick={onCsv}>
        Download the signal list (CSV)
      </button>{' '}
      <button type="button" onClick={onPdf}>
        Download the monitoring report (PDF)
      </button>
      <ExplainList terms={['cusum', 'arl', 'cumulativeOMinusE']} />
    </section>
  );
}
