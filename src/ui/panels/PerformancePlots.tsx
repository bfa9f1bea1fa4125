import type { PerformanceView } from '../../worker/protocol';
import { Explain } from '../Explain';
import { finiteMax, num, palette, pct } from '../format';
import { LinePlot } from '../plots/LinePlot';
import { NumbersTable } from '../plots/NumbersTable';

/** ROC, precision–recall, calibration and decision curves, each with its numbers as a table. */
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
        <Explain term="rocCurve" />
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
        <Explain term="averagePrecision" />
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
        <Explain term="calibrationCurve" />
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
        <Explain term="netBenefit" />
        <NumbersTable
          summary="Net benefit as numbers"
          headers={['Threshold', 'Model', 'Treat all']}
          rows={perf.decision.map((d) => [pct(d.t, 0), num(d.model, 4), num(d.all, 4)])}
        />
      </div>
    </div>
  );
}

/** The decision curve's x-axis ends a little past the last cut-off at which the model still has net benefit. */
const decisionMax = (perf: PerformanceView): number => {
  const last = [...perf.decision].reverse().find((d) => d.model > 0);
  return last ? Math.min(1, last.t + 0.1) : 1;
};
