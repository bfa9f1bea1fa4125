import type { MonitoringRecord } from '../../engine/monitoring';
import { setRecalPeriods } from '../../state/monitorActions';
import { useApp, useEnv } from '../context';
import { ExplainList } from '../Explain';
import { count, num } from '../format';
import { NumberField } from '../NumberField';
import { PeriodIntervalPlot } from '../plots/PeriodIntervalPlot';
import { est, pctLevel } from './monitorFormat';

/** O/E and calibration-in-the-large by period, and the recalibration on the latest periods. */
export function MonitorDrift({ record: r }: { record: MonitoringRecord }) {
  const { ctl, store } = useEnv();
  const n = useApp((s) => s.monitor.recalPeriods);
  const rc = useApp((s) => s.monitor.recalibration);
  if (r.periods.length === 0) return null;
  return (
    <section aria-label="Calibration drift by period">
      <h3>Calibration drift by {r.options.period}</h3>
      <div className="plot-row">
        <PeriodIntervalPlot
          title={`O/E by ${r.options.period}`}
          yLabel="O/E"
          reference={1}
          yClamp={[0, 5]}
          points={r.periods.map((p) => ({ label: p.label, y: p.oe.estimate, lower: p.oe.lower, upper: p.oe.upper }))}
        />
        <PeriodIntervalPlot
          title={`Calibration-in-the-large by ${r.options.period}`}
          yLabel="Calibration-in-the-large"
          reference={0}
          yClamp={[-3, 3]}
          points={r.periods.map((p) => ({
            label: p.label,
            y: p.citl?.estimate ?? null,
            lower: p.citl?.lower ?? null,
            upper: p.citl?.upper ?? null,
          }))}
        />
      </div>
      <details>
        <summary>By {r.options.period} as a table</summary>
        <table data-testid="period-table">
          <thead>
            <tr>
              <th scope="col">Period</th>
              <th scope="col">Cases</th>
              <th scope="col">O</th>
              <th scope="col">E</th>
              <th scope="col">O/E ({pctLevel(r.overall.level)} CI)</th>
              <th scope="col">Calibration-in-the-large</th>
            </tr>
          </thead>
          <tbody>
            {r.periods.map((p) => (
              <tr key={p.label}>
                <th scope="row">{p.label}</th>
                <td className="num">{count(p.n)}</td>
                <td className="num">{count(p.observed)}</td>
                <td className="num">{num(p.expected, 1)}</td>
                <td className="num">{est(p.oe, 2)}</td>
                <td className="num">{est(p.citl, 2)}</td>
              </tr>
            ))}
          </tbody>
        </table>
      </details>
      <div className="row">
        <NumberField
          label="Latest periods"
          value={n}
          min={1}
          max={r.periods.length}
          step={1}
          valid={(v) => Number.isInteger(v) && v >= 1 && v <= r.periods.length}
          onChange={(v) => store.apply(setRecalPeriods, v)}
        />
        <button type="button" onClick={() => void ctl.recalibrateOnPeriods()} data-testid="recalibrate">
          Recalibrate on the latest periods
        </button>
      </div>
      {rc && (
        <p data-testid="recalibration">
          {`Recalibrated on ${rc.periods.join(', ')} (${count(rc.nUsed)} cases, ${count(rc.events)} events): `}
          new intercept {est(rc.intercept, 3)}, slope {est(rc.slope, 3)} on the linear predictor.
        </p>
      )}
      <ExplainList terms={['recalibration']} />
    </section>
  );
}
