import type { MonitoringRecord } from '../../engine/monitoring';
import { cautionSettingOf, MONITORING_CAUTIONS } from '../../report/cautions';
import { UNSCORED_REASON_TEXT } from '../../report/monitoringText';
import { useApp, useEnv } from '../context';
import { downloadFile } from '../download';
import { ExplainList } from '../Explain';
import { count, num } from '../format';
import { MonitorDrift } from './MonitorDrift';
import { MonitorFunnel } from './MonitorFunnel';
import { MonitorOverTime } from './MonitorOverTime';
import { est, pctLevel } from './monitorFormat';

/** The monitoring record drawn: overall, funnel, CUSUMs, cumulative O − E, drift by period, unscored rows. */
export function MonitorResults({ record: r }: { record: MonitoringRecord }) {
  const { ctl } = useEnv();
  const setting = useApp((s) => cautionSettingOf(s.reportText.cautions));
  const lvl = pctLevel(r.overall.level);
  const csv = (which: 'units' | 'signals') => {
    const text = ctl.monitoringCsv(which);
    if (text) downloadFile(text, `fulcra-monitoring-${which}-${new Date().toISOString().slice(0, 10)}.csv`, 'text/csv');
  };
  const pdf = async () => {
    const bytes = await ctl.monitoringReport();
    if (bytes) downloadFile(bytes, `fulcra-monitoring-${new Date().toISOString().slice(0, 10)}.pdf`, 'application/pdf');
  };
  const f = r.funnel;
  return (
    <div className="monitor-results" data-testid="monitor-result">
      <aside className="caution" aria-label="Cautions on monitoring" data-testid="monitor-cautions">
        <ul>
          {MONITORING_CAUTIONS[setting].map((c) => (
            <li key={c}>{c}</li>
          ))}
        </ul>
      </aside>
      <section aria-label="Overall">
        <h3>Overall</h3>
        <p>
          Model: <strong>{r.model.source === 'model-file' ? `model file “${r.model.name}”` : 'the current fit'}</strong>
          . {count(r.nUsed)} of {count(r.nRows)} rows monitored, {r.dateRange.firstLabel} to {r.dateRange.lastLabel}
          {r.nUnscored > 0 ? `; ${count(r.nUnscored)} not scored (listed below)` : ''}.
        </p>
        <table className="metrics" data-testid="monitor-overall">
          <tbody>
            <tr>
              <th scope="row">Observed events (O)</th>
              <td className="num">{count(r.overall.observed)}</td>
            </tr>
            <tr>
              <th scope="row">Expected events (E, the sum of the risks)</th>
              <td className="num">{num(r.overall.expected, 1)}</td>
            </tr>
            <tr>
              <th scope="row">O/E ({lvl} exact Poisson CI)</th>
              <td className="num">{est(r.overall.oe, 2)}</td>
            </tr>
            <tr>
              <th scope="row">O − E</th>
              <td className="num">{num(r.overall.oMinusE, 1)}</td>
            </tr>
            <tr>
              <th scope="row">Calibration-in-the-large ({lvl} CI)</th>
              <td className="num">{est(r.overall.calibrationInTheLarge, 3)}</td>
            </tr>
            <tr>
              <th scope="row">Calibration slope ({lvl} CI)</th>
              <td className="num">{est(r.overall.calibrationSlope, 3)}</td>
            </tr>
          </tbody>
        </table>
        <ExplainList terms={['observedExpected', 'calibrationInTheLarge']} />
      </section>
      {f && <MonitorFunnel funnel={f} level={r.overall.level} onCsv={() => csv('units')} />}
      <MonitorOverTime record={r} onCsv={() => csv('signals')} onPdf={() => void pdf()} />
      <MonitorDrift record={r} />
      {r.nUnscored > 0 && (
        <section aria-label="Rows not scored" data-testid="monitor-unscored">
          <h3>Rows not scored</h3>
          <p>
            {(Object.keys(r.unscoredByReason) as (keyof typeof r.unscoredByReason)[])
              .filter((k) => r.unscoredByReason[k] > 0)
              .map((k) => `${count(r.unscoredByReason[k])}: ${UNSCORED_REASON_TEXT[k]}`)
              .join('; ')}
            .
          </p>
          <p className="hint">
            {r.unscored
              .slice(0, 10)
              .map((u) => `row ${u.row} (${u.column}${u.value !== null ? ` = “${u.value}”` : ''})`)
              .join(', ')}
            {r.nUnscored > 10 ? ', …' : ''}
          </p>
        </section>
      )}
    </div>
  );
}
