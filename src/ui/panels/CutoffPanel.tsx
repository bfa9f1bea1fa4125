import { useId } from 'react';
import * as A from '../../state/actions';
import { Caution } from '../Caution';
import { useApp, useEnv } from '../context';
import { count, finiteMax, num, palette, pct } from '../format';
import { NumberField } from '../NumberField';
import { LinePlot } from '../plots/LinePlot';
import { NumbersTable } from '../plots/NumbersTable';
import { ConfusionTable } from './ConfusionTable';

export function CutoffPanel() {
  const { ctl } = useEnv();
  const id = useId();
  const costs = useApp((s) => s.costs);
  const t = useApp((s) => s.threshold);
  const cv = useApp((s) => s.costView);
  const tv = useApp((s) => s.thresholdView);
  const move = (v: number) => void ctl.act(A.moveCutoff, v);
  const setCost = (k: 'missedCase' | 'falseAlarm', v: number) => void ctl.act(A.changeCosts, { [k]: v });
  const emp = cv?.optimal.empirical.threshold ?? null;
  const theory = cv?.optimal.decisionTheory.threshold ?? null;
  return (
    <div className="panel cutoff-panel">
      <section className="costs" aria-labelledby={`${id}-h`}>
        <h2 id={`${id}-h`}>Where to draw the line</h2>
        <div className="row">
          <NumberField
            label="Cost of a missed case"
            min={0}
            value={costs.missedCase}
            valid={(v) => v > 0 && Number.isFinite(v)}
            onChange={(v) => setCost('missedCase', v)}
          />
          <NumberField
            label="Cost of a false alarm"
            min={0}
            value={costs.falseAlarm}
            valid={(v) => v > 0 && Number.isFinite(v)}
            onChange={(v) => setCost('falseAlarm', v)}
          />
          <span className="hint">
            Only the ratio matters: a missed case costs {num(costs.missedCase / costs.falseAlarm, 1)} false alarms.
          </span>
        </div>
        <div className="slider">
          <label htmlFor={`${id}-t`}>
            Probability cut-off: flag a case when its predicted risk is at least{' '}
            <output data-testid="cutoff-value">{pct(t, 1)}</output>
          </label>
          <input
            id={`${id}-t`}
            type="range"
            min={0.001}
            max={0.999}
            step={0.001}
            value={t}
            list={`${id}-marks`}
            onChange={(e) => move(Number(e.target.value))}
          />
          <datalist id={`${id}-marks`}>
            {theory !== null && <option value={theory} label="cost-based" />}
            {emp !== null && <option value={emp} label="cheapest on these data" />}
          </datalist>
          <div className="row">
            {theory !== null && (
              <button type="button" onClick={() => move(theory)}>
                Use the cost-based cut-off for calibrated risks ({pct(theory)})
              </button>
            )}
            {emp !== null && (
              <button type="button" onClick={() => move(emp)}>
                Use the cheapest cut-off on these data ({pct(emp)})
              </button>
            )}
          </div>
        </div>
      </section>
      <div className="cols">
        <div>{tv && <ConfusionTable view={tv} />}</div>
        <div>
          {cv && (
            <>
              <LinePlot
                title="Expected cost per 100 cases against the cut-off"
                xLabel="Probability cut-off"
                yLabel="Expected cost per 100 cases"
                xDomain={[0, 1]}
                yDomain={[
                  0,
                  finiteMax(
                    cv.curve.map((p) => p.y),
                    1,
                  ) * 1.05 || 1,
                ]}
                series={[{ label: 'expected cost per 100', color: palette.blue, points: cv.curve }]}
                markers={[
                  { x: t, label: `current cut-off ${pct(t)}`, color: palette.vermillion },
                  ...(theory !== null ? [{ x: theory, label: `cost-based ${pct(theory)}`, color: palette.green }] : []),
                  ...(emp !== null ? [{ x: emp, label: `cheapest on data ${pct(emp)}`, color: palette.purple }] : []),
                ]}
                width={420}
                height={260}
              />
              <NumbersTable
                summary="Expected cost as numbers"
                headers={['Cut-off', 'Cost per 100']}
                rows={cv.curve.map((p) => [pct(p.x, 0), num(p.y, 2)])}
              />
              <details className="assumptions">
                <summary>What these cut-offs assume</summary>
                <p>Cost-based ({pct(theory)}):</p>
                <ul>
                  {cv.optimal.decisionTheory.assumptions.map((a) => (
                    <li key={a}>{a}</li>
                  ))}
                </ul>
                <p>
                  Cheapest on these data ({pct(emp)}; {count(cv.optimal.empirical.flagged)} flagged):
                </p>
                <ul>
                  {cv.optimal.empirical.assumptions.map((a) => (
                    <li key={a}>{a}</li>
                  ))}
                </ul>
              </details>
            </>
          )}
        </div>
      </div>
      <Caution />
    </div>
  );
}
