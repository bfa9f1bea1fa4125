import { useId, useState } from 'react';
import type { PerformanceView, ValidationView } from '../../worker/protocol';
import { Caution } from '../Caution';
import { useApp, useEnv } from '../context';
import { ci, finiteMax, num, palette, pct } from '../format';
import { LinePlot } from '../plots/LinePlot';
import { NumbersTable } from '../plots/NumbersTable';

export function PerformancePanel() {
  const perf = useApp((s) => s.fit?.performance ?? null);
  const validation = useApp((s) => s.validation);
  if (!perf) return <p>Fit a model to see how well it separates and how far its risks can be trusted.</p>;
  return (
    <div className="panel perf-panel">
      <MetricsTable perf={perf} validation={validation} />
      <Validation />
      <PerformancePlots perf={perf} />
      <Caution />
    </div>
  );
}

export function PerformancePlots({ perf }: { perf: PerformanceView }) {
  return (
    <div className="plot-grid">
      <div>
        <LinePlot
          title="ROC curve"
          xLabel="1 − specificity (false-positive rate)"
          yLabel="Sensitivity"
          xDomain={[0, 1]}
          yDomain={[0, 1]}
          diagonal
          series={[{ label: `model (AUC ${num(perf.auc, 3)})`, color: palette.blue, points: perf.roc }]}
          width={300}
          height={250}
        />
        <NumbersTable
          summary="ROC points"
          headers={['1 − specificity', 'Sensitivity']}
          rows={perf.roc.map((p) => [num(p.x), num(p.y)])}
        />
      </div>
      <div>
        <LinePlot
          title="Precision–recall curve"
          xLabel="Recall (sensitivity)"
          yLabel="Precision (PPV)"
          xDomain={[0, 1]}
          yDomain={[0, 1]}
          series={[
            {
              label: `model (average precision ${num(perf.averagePrecision, 3)})`,
              color: palette.green,
              points: perf.pr,
            },
          ]}
          width={300}
          height={250}
        />
        <NumbersTable
          summary="Precision–recall points"
          headers={['Recall', 'Precision']}
          rows={perf.pr.map((p) => [num(p.x), num(p.y)])}
        />
      </div>
      <div>
        <LinePlot
          title="Calibration curve"
          xLabel="Predicted risk"
          yLabel="Observed proportion"
          diagonal
          xDomain={[0, Math.min(1, finiteMax([0.1, ...perf.calibration.map((c) => c.p)], 1))]}
          yDomain={[0, Math.min(1, finiteMax([0.1, ...perf.calibration.map((c) => c.p)], 1))]}
          series={[
            {
              label: 'flexible calibration curve',
              color: palette.vermillion,
              points: perf.calibration.map((c) => ({ x: c.p, y: c.observed })),
            },
          ]}
          band={perf.calibration.map((c) => ({ x: c.p, lower: c.lower, upper: c.upper }))}
          width={300}
          height={250}
        />
        <NumbersTable
          summary="Calibration curve points"
          headers={['Predicted', 'Observed', 'Lower', 'Upper']}
          rows={perf.calibration.map((c) => [pct(c.p), pct(c.observed), pct(c.lower), pct(c.upper)])}
        />
      </div>
      <div>
        <LinePlot
          title="Decision curve"
          xLabel="Threshold probability"
          yLabel="Net benefit"
          xDomain={[0, Math.min(1, decisionMax(perf))]}
          yDomain={[
            Math.min(
              -0.02,
              -0.25 *
                finiteMax(
                  perf.decision.map((d) => d.model),
                  0,
                ),
            ),
            finiteMax([0.01, ...perf.decision.map((d) => d.all), ...perf.decision.map((d) => d.model)], 0.1) * 1.1,
          ]}
          series={[
            { label: 'model', color: palette.blue, points: perf.decision.map((d) => ({ x: d.t, y: d.model })) },
            {
              label: 'treat all',
              color: palette.orange,
              dash: '6 3',
              points: perf.decision.map((d) => ({ x: d.t, y: d.all })),
            },
            {
              label: 'treat none',
              color: palette.grey,
              dash: '2 3',
              points: perf.decision.map((d) => ({ x: d.t, y: 0 })),
            },
          ]}
          width={300}
          height={250}
        />
        <NumbersTable
          summary="Net benefit as numbers"
          headers={['Threshold', 'Model', 'Treat all']}
          rows={perf.decision.map((d) => [pct(d.t, 0), num(d.model, 4), num(d.all, 4)])}
        />
      </div>
    </div>
  );
}

const decisionMax = (perf: PerformanceView): number => {
  const last = [...perf.decision].reverse().find((d) => d.model > 0);
  return last ? Math.min(1, last.t + 0.1) : 1;
};

function MetricsTable({ perf, validation }: { perf: PerformanceView; validation: ValidationView | null }) {
  const corr = (name: string) => validation?.metrics.find((m) => m.name === name);
  const rows: [string, string, string, number][] = [
    ['AUC (c-statistic)', num(perf.auc, 3), ci(perf.aucLower, perf.aucUpper, 3), perf.auc],
    ['Calibration slope', num(perf.calSlope, 3), ci(perf.calSlopeLower, perf.calSlopeUpper, 3), perf.calSlope],
    [
      'Calibration-in-the-large',
      num(perf.calInLarge, 3),
      ci(perf.calInLargeLower, perf.calInLargeUpper, 3),
      perf.calInLarge,
    ],
    ['Brier score', num(perf.brier, 4), '—', perf.brier],
  ];
  const key: Record<string, string> = {
    'AUC (c-statistic)': 'auc',
    'Calibration slope': 'slope',
    'Calibration-in-the-large': 'intercept',
    'Brier score': 'brier',
  };
  return (
    <table className="metrics" data-testid="metrics">
      <caption>
        On the data the model was fitted to (apparent){validation ? ', and corrected for optimism by bootstrap' : ''}
      </caption>
      <thead>
        <tr>
          <th scope="col">Measure</th>
          <th scope="col">Apparent</th>
          <th scope="col">95% CI</th>
          {validation && (
            <>
              <th scope="col">Optimism</th>
              <th scope="col">Optimism-corrected</th>
            </>
          )}
        </tr>
      </thead>
      <tbody>
        {rows.map(([name, value, interval]) => {
          const c = corr(key[name]);
          return (
            <tr key={name}>
              <th scope="row">{name}</th>
              <td className="num">{value}</td>
              <td className="num">{interval}</td>
              {validation && (
                <>
                  <td className="num">{num(c?.optimism, 4)}</td>
                  <td className="num" data-testid={`corrected-${key[name]}`}>
                    {num(c?.corrected, 3)}
                  </td>
                </>
              )}
            </tr>
          );
        })}
      </tbody>
      <tfoot>
        <tr>
          <td colSpan={validation ? 5 : 3}>
            Scaled Brier {num(perf.scaledBrier, 3)} · average precision {num(perf.averagePrecision, 3)} · calibration
            errors: ICI {num(perf.ici, 4)}, E50 {num(perf.e50, 4)}, E90 {num(perf.e90, 4)}, Emax {num(perf.emax, 4)}
            {perf.hosmerLemeshow &&
              ` · Hosmer–Lemeshow χ² ${num(perf.hosmerLemeshow.chi2, 2)} on ${perf.hosmerLemeshow.df} df (secondary: depends on grouping)`}
          </td>
        </tr>
      </tfoot>
    </table>
  );
}

function Validation() {
  const { ctl } = useEnv();
  const id = useId();
  const [raw, setRaw] = useState('200');
  const b = Math.max(20, Math.min(2000, Math.round(Number(raw)) || 200));
  const status = useApp((s) => s.validationStatus);
  return (
    <section className="validation" aria-labelledby={`${id}-h`}>
      <h3 id={`${id}-h`}>Internal validation</h3>
      <label>
        Bootstrap resamples
        <input type="number" min={20} max={2000} step={10} value={raw} onChange={(e) => setRaw(e.target.value)} />
      </label>
      <button type="button" disabled={status === 'running'} onClick={() => void ctl.validate(b)}>
        Run bootstrap validation
      </button>
      <span role="status" data-testid="validation-status">
        {status === 'running' && ' Running: the whole fitting procedure is repeated on each resample.'}
        {status === 'cancelled' && ' Validation cancelled; apparent values only.'}
        {status === 'done' && ' Done (Efron’s optimism bootstrap). Still internal: not external validation.'}
      </span>
    </section>
  );
}
