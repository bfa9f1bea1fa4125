import type { FlagTable, ModelComparison } from '../../engine/comparison';
import { aucDifferenceText, lrTestText } from '../../report/comparisonText';
import { useApp, useEnv } from '../context';
import { ci, count, num, palette, pct, pValue } from '../format';
import { LinePlot } from '../plots/LinePlot';

/** The comparison of two kept models (engine/comparison record), or the refusal when their rows differ. */
export function ComparisonResult() {
  const { ctl } = useEnv();
  const c = useApp((s) => s.models.comparison);
  const threshold = useApp((s) => s.threshold);
  if (!c) return null;
  const o = c.outcome;
  return (
    <section data-testid="comparison">
      <h3>Comparison</h3>
      {c.threshold !== threshold && (
        <p className="hint" data-testid="comparison-cutoff-changed">
          Made at the cut-off {pct(c.threshold)}; the cut-off is now {pct(threshold)}.{' '}
          <button type="button" onClick={() => void ctl.compareModels()}>
            Compare again
          </button>
        </p>
      )}
      {o.status === 'different-rows' ? (
        <div className="notice error" role="alert" data-testid="comparison-refused" style={{ display: 'block' }}>
          <p>{o.message}</p>
          <p className="suggestion">{o.suggestion}</p>
          <button type="button" onClick={() => void ctl.refitOnCommonRows()}>
            Refit both on the common rows
          </button>
        </div>
      ) : (
        <Compared c={o.comparison} />
      )}
    </section>
  );
}

function Compared({ c }: { c: ModelComparison }) {
  const lv = `${Math.round(c.level * 100)}% CI`;
  const cal = (k: 'a' | 'b', which: 'interceptInTheLarge' | 'slope') => {
    const e = c.calibration[k][which];
    return e ? `${num(e.estimate, 3)} (${ci(e.lower, e.upper, 3)})` : '—';
  };
  const d = c.auc.difference;
  const b = c.brier.difference;
  return (
    <>
      <p>
        <strong>{c.a.label}</strong> (A: {c.a.terms.join(', ')}) and <strong>{c.b.label}</strong> (B:{' '}
        {c.b.terms.join(', ')}) on the same {count(c.n)} rows ({count(c.events)} events). Differences are B minus A;
        apparent performance on the rows both were fitted on.
      </p>
      <p>{c.nesting.explanation}</p>
      <p data-testid="lr-test">
        <strong>{lrTestText(c)}</strong>
        {c.nesting.aicDifference !== null &&
          ` AIC difference ${num(c.nesting.aicDifference, 2)}, BIC difference ${num(c.nesting.bicDifference, 2)} ` +
            '(lower is better).'}
      </p>
      <p data-testid="auc-difference">{aucDifferenceText(c)}</p>
      <table className="comparison-table">
        <thead>
          <tr>
            <th scope="col">Measure</th>
            <th scope="col">A</th>
            <th scope="col">B</th>
            <th scope="col">B − A ({lv})</th>
            <th scope="col">p</th>
          </tr>
        </thead>
        <tbody>
          <tr>
            <th scope="row">AUC (DeLong)</th>
            <td className="num">
              {num(c.auc.a.auc)} ({ci(c.auc.a.lower, c.auc.a.upper, 3)})
            </td>
            <td className="num">
              {num(c.auc.b.auc)} ({ci(c.auc.b.lower, c.auc.b.upper, 3)})
            </td>
            <td className="num">
              {num(d.difference)} ({ci(d.lower, d.upper, 3)})
            </td>
            <td className="num">{pValue(d.p)}</td>
          </tr>
          <tr>
            <th scope="row">Brier score</th>
            <td className="num">{num(c.brier.a.brier, 4)}</td>
            <td className="num">{num(c.brier.b.brier, 4)}</td>
            <td className="num">
              {num(b.estimate, 4)} ({ci(b.lower, b.upper, 4)})
            </td>
            <td className="num">{pValue(b.p)}</td>
          </tr>
          <tr>
            <th scope="row">Calibration-in-the-large</th>
            <td className="num">{cal('a', 'interceptInTheLarge')}</td>
            <td className="num">{cal('b', 'interceptInTheLarge')}</td>
            <td>—</td>
            <td>—</td>
          </tr>
          <tr>
            <th scope="row">Calibration slope</th>
            <td className="num">{cal('a', 'slope')}</td>
            <td className="num">{cal('b', 'slope')}</td>
            <td>—</td>
            <td>—</td>
          </tr>
        </tbody>
      </table>
      <NetBenefitDifference c={c} />
      <Reclassification c={c} />
      {c.warnings.length > 0 && (
        <ul className="notices">
          {c.warnings.map((w) => (
            <li key={w.code + w.message} className="notice warning" data-code={w.code}>
              {w.message} <span className="suggestion">{w.suggestion}</span>
            </li>
          ))}
        </ul>
      )}
    </>
  );
}

const SHOWN_THRESHOLDS = [0.05, 0.1, 0.2, 0.3, 0.5];

function NetBenefitDifference({ c }: { c: ModelComparison }) {
  const nb = c.netBenefit;
  const points = nb.thresholds.map((x, k) => ({ x, y: nb.difference[k] }));
  const span = Math.max(0.005, ...nb.difference.filter(Number.isFinite).map(Math.abs)) * 1.1;
  const at = (t: number) => nb.thresholds.findIndex((x) => Math.abs(x - t) < 1e-9);
  const cut = c.reclassification?.threshold;
  return (
    <div className="nb-difference">
      <LinePlot
        title={`Net benefit of B minus A by threshold probability`}
        xLabel="Threshold probability"
        yLabel="Net benefit, B − A"
        xDomain={[0, 1]}
        yDomain={[-span, span]}
        series={[
          {
            label: 'no difference',
            color: palette.grey,
            points: [
              { x: 0, y: 0 },
              { x: 1, y: 0 },
            ],
            dash: '4 4',
          },
          { label: 'B − A', color: palette.blue, points },
        ]}
        markers={cut !== undefined ? [{ x: cut, label: 'cut-off', color: palette.vermillion }] : []}
        width={460}
        height={240}
      />
      <table className="compact" aria-label="Net benefit by threshold">
        <thead>
          <tr>
            <th scope="col">Threshold</th>
            <th scope="col">A</th>
            <th scope="col">B</th>
            <th scope="col">B − A</th>
          </tr>
        </thead>
        <tbody>
          {SHOWN_THRESHOLDS.filter((t) => at(t) >= 0).map((t) => (
            <tr key={t}>
              <th scope="row">{pct(t, 0)}</th>
              <td className="num">{num(nb.a[at(t)], 4)}</td>
              <td className="num">{num(nb.b[at(t)], 4)}</td>
              <td className="num">{num(nb.difference[at(t)], 4)}</td>
            </tr>
          ))}
        </tbody>
      </table>
      <p className="hint">
        Above 0, B gives more net benefit at that threshold (true positives per patient after subtracting false
        positives weighted by the threshold odds; Vickers &amp; Elkin 2006). The dashed red line is the cut-off.
      </p>
    </div>
  );
}

function FlagCross({ title, t }: { title: string; t: FlagTable }) {
  return (
    <table className="compact flag-table" aria-label={title}>
      <caption>
        {title} ({count(t.total)})
      </caption>
      <thead>
        <tr>
          <th scope="col"></th>
          <th scope="col">B flags</th>
          <th scope="col">B does not</th>
        </tr>
      </thead>
      <tbody>
        <tr>
          <th scope="row">A flags</th>
          <td className="num">{count(t.both)}</td>
          <td className="num">{count(t.aOnly)}</td>
        </tr>
        <tr>
          <th scope="row">A does not</th>
          <td className="num">{count(t.bOnly)}</td>
          <td className="num">{count(t.neither)}</td>
        </tr>
      </tbody>
    </table>
  );
}

function Reclassification({ c }: { c: ModelComparison }) {
  const r = c.reclassification;
  if (!r) return null;
  return (
    <div data-testid="reclassification">
      <h4>Who changes side of the cut-off {pct(r.threshold)}</h4>
      <p className="hint">{r.flagRule}</p>
      <div className="flag-tables" style={{ display: 'flex', flexWrap: 'wrap', gap: '2rem' }}>
        <FlagCross title="Events" t={r.events} />
        <FlagCross title="Non-events" t={r.nonEvents} />
      </div>
      <p>
        NRI {num(r.nri)}: events {num(r.eventNri)} (change in sensitivity), non-events {num(r.nonEventNri)} (change in
        specificity).
        {r.costPer100 &&
          ` Expected cost per 100 cases: ${num(r.costPer100.a, 1)} (A) and ${num(r.costPer100.b, 1)} (B).`}
      </p>
      <p data-testid="nri-caution">
        <strong>Caution: </strong>
        {r.caution}
      </p>
    </div>
  );
}
