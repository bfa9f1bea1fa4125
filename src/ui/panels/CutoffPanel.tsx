import { useId, useState } from 'react';
import * as A from '../../state/actions';
import { Caution } from '../Caution';
import { useApp, useEnv } from '../context';
import { count, num, pct } from '../format';
import { CostCurvePlot } from '../plots/CostCurvePlot';
import { cutoffMarks } from '../plots/CutoffMarks';
import { RiskHistogram } from '../plots/RiskHistogram';
import { ConfusionTable } from './ConfusionTable';
import { CostInput } from './CostInput';
import { StaleBanner } from '../StaleBanner';

export function CutoffPanel() {
  const { ctl } = useEnv();
  const id = useId();
  const costs = useApp((s) => s.costs);
  const t = useApp((s) => s.threshold);
  const cv = useApp((s) => s.costView);
  const tv = useApp((s) => s.thresholdView);
  const how = useApp((s) => s.cutoffHow);
  const [wide, setWide] = useState(false);
  const [badCost, setBadCost] = useState({ missedCase: false, falseAlarm: false });
  const move = (v: number) => void ctl.act(A.moveCutoff, v);
  const setCost = (k: 'missedCase' | 'falseAlarm', v: number) => void ctl.act(A.changeCosts, { [k]: v });
  const validity = (k: 'missedCase' | 'falseAlarm') => (ok: boolean) => setBadCost((b) => ({ ...b, [k]: !ok }));
  const emp = cv?.optimal.empirical.threshold ?? null;
  const theory = cv?.optimal.decisionTheory.threshold ?? null;
  const marks = cutoffMarks(t, theory, emp);
  const domain: [number, number] = cv && !wide ? [cv.zoom.from, cv.zoom.to] : [0, 1];
  const howText = {
    'cost-based': 'the cost-based cut-off (it follows the costs)',
    cheapest: 'the cheapest cut-off on these data (it follows the costs)',
    hand: 'set by hand',
    restored: 'as saved in the workspace',
  }[how];
  return (
    <div className="panel cutoff-panel">
      <StaleBanner />
      <section className="costs" aria-labelledby={`${id}-h`}>
        <h2 id={`${id}-h`}>Where to draw the line</h2>
        <div className="row">
          <CostInput
            label="Cost of a missed case"
            value={costs.missedCase}
            onChange={(v) => setCost('missedCase', v)}
            onValidity={validity('missedCase')}
          />
          <CostInput
            label="Cost of a false alarm"
            value={costs.falseAlarm}
            onChange={(v) => setCost('falseAlarm', v)}
            onValidity={validity('falseAlarm')}
          />
          <span className="hint" data-testid="cost-ratio">
            Only the ratio matters: a missed case costs {num(costs.missedCase / costs.falseAlarm, 1)} false alarms
            {badCost.missedCase || badCost.falseAlarm ? ' (the last valid costs)' : ''}.
          </span>
        </div>
        <div className="slider">
          <label htmlFor={`${id}-t`}>
            Probability cut-off: flag a case when its predicted risk is at least{' '}
            <output data-testid="cutoff-value">{pct(t, 1)}</output>{' '}
            <span className="hint" data-testid="cutoff-how">
              ({howText})
            </span>
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
              <button type="button" onClick={() => void ctl.act(A.useCostBasedCutoff, undefined)}>
                Use the cost-based cut-off for calibrated risks ({pct(theory)})
              </button>
            )}
            {emp !== null && (
              <button type="button" onClick={() => void ctl.act(A.useCheapestCutoff, undefined)}>
                Use the cheapest cut-off on these data ({pct(emp)})
              </button>
            )}
          </div>
        </div>
      </section>
      {cv && (
        <section className="cutoff-pictures" aria-label="Pictures of the cut-off">
          <div className="row">
            <label className="zoom-toggle">
              <input type="checkbox" checked={wide} onChange={(e) => setWide(e.target.checked)} /> Show cut-offs 0–1
            </label>
            <span className="hint" data-testid="zoom-rule">
              {wide
                ? 'Showing every cut-off from 0 to 1.'
                : `Showing ${pct(cv.zoom.from)} to ${pct(cv.zoom.to)}: ${cv.zoom.rule}.`}
            </span>
          </div>
          <div className="cols">
            <RiskHistogram
              title="Predicted risk of cases with and without the event"
              bins={wide ? cv.distribution : cv.zoom.distribution}
              domain={domain}
              marks={marks}
            />
            <CostCurvePlot
              title="Expected cost per 100 cases against the cut-off"
              curve={wide ? cv.curve : cv.zoom.curve}
              domain={domain}
              marks={marks}
            />
          </div>
        </section>
      )}
      <div className="cols">
        <div>{tv && <ConfusionTable view={tv} />}</div>
        <div>
          {cv && (
            <>
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
