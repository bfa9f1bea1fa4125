import { useId, useState } from 'react';
import { Caution } from '../Caution';
import { useApp, useEnv } from '../context';
import { finiteMax, num, palette, pct } from '../format';
import { LinePlot } from '../plots/LinePlot';
import { LossSurfacePlot } from '../plots/LossSurfacePlot';
import { NumbersTable } from '../plots/NumbersTable';

export function ShapePanel() {
  return (
    <div className="panel shape-panel">
      <div className="cols">
        <RiskCurve />
        <LossSurface />
      </div>
      <Caution />
    </div>
  );
}

function RiskCurve() {
  const { ctl } = useEnv();
  const id = useId();
  const fit = useApp((s) => s.fit);
  const curve = useApp((s) => s.riskCurve);
  const predictors = (fit?.fit.recipe.terms ?? []).flatMap((t) => (t.type === 'interaction' ? [] : [t.column]));
  const unique = [...new Set(predictors)];
  return (
    <section aria-labelledby={`${id}-h`}>
      <h2 id={`${id}-h`}>Predicted risk against one predictor</h2>
      <label>
        Predictor
        <select value={curve?.predictor ?? ''} onChange={(e) => void ctl.riskCurve(e.target.value)}>
          {unique.map((c) => (
            <option key={c}>{c}</option>
          ))}
        </select>
      </label>
      {curve && (
        <>
          <LinePlot
            title={`Predicted risk against ${curve.predictor}`}
            xLabel={curve.predictor}
            yLabel="Predicted risk"
            xDomain={
              curve.numeric
                ? [curve.points[0].x, curve.points[curve.points.length - 1].x]
                : [-0.5, curve.points.length - 0.5]
            }
            yDomain={[0, Math.min(1, finiteMax([0.05, ...curve.points.flatMap((p) => [p.risk, p.upper])], 1) * 1.05)]}
            series={[
              {
                label: 'predicted risk',
                color: palette.blue,
                points: curve.points.map((p) => ({ x: p.x, y: p.risk })),
              },
            ]}
            band={
              curve.points.some((p) => Number.isFinite(p.lower))
                ? curve.points.map((p) => ({ x: p.x, lower: p.lower, upper: p.upper }))
                : undefined
            }
            rug={curve.numeric ? curve.rug : undefined}
          />
          <p className="hint">
            Other predictors held at:{' '}
            {Object.entries(curve.heldAt)
              .map(([k, v]) => `${k} = ${typeof v === 'number' ? num(v, 2) : v}`)
              .join(', ') || 'none'}
            .{' '}
            {curve.points.some((p) => Number.isFinite(p.lower))
              ? `Band: ${Math.round((fit?.fit.level ?? 0.95) * 100)}% confidence interval.`
              : 'No confidence band: a penalised fit has no valid covariance.'}
          </p>
          <NumbersTable
            summary="Risk curve as numbers"
            headers={[curve.predictor, 'Risk', 'Lower', 'Upper']}
            rows={curve.points.map((p) => [p.label, pct(p.risk), pct(p.lower), pct(p.upper)])}
            maxRows={30}
          />
        </>
      )}
    </section>
  );
}

function LossSurface() {
  const { ctl } = useEnv();
  const id = useId();
  const fit = useApp((s) => s.fit);
  const surf = useApp((s) => s.lossSurface);
  const names = fit?.fit.coefficients.map((c) => c.name) ?? [];
  const pairOf = (v: NonNullable<typeof surf>): [number, number] => [
    names.indexOf(v.names[0]),
    names.indexOf(v.names[1]),
  ];
  const [pair, setPair] = useState<[number, number]>(() => (surf ? pairOf(surf) : [1, Math.min(2, names.length - 1)]));
  // A new surface (from a fit or another pair) shows which coefficients it is drawn over.
  const [shown, setShown] = useState(surf);
  if (shown !== surf) {
    setShown(surf);
    if (surf) setPair(pairOf(surf));
  }
  const choose = (k: 0 | 1, v: number) => {
    const next: [number, number] = k === 0 ? [v, pair[1]] : [pair[0], v];
    setPair(next);
    if (next[0] !== next[1]) void ctl.lossSurface(next[0], next[1]);
  };
  return (
    <section aria-labelledby={`${id}-h`}>
      <h2 id={`${id}-h`}>The loss the fit minimises</h2>
      <div className="row">
        {[0, 1].map((k) => (
          <label key={k}>
            {k === 0 ? 'Across' : 'Up'}
            <select value={pair[k]} onChange={(e) => choose(k as 0 | 1, Number(e.target.value))}>
              {names.map((n, i) => (
                <option key={n} value={i}>
                  {n}
                </option>
              ))}
            </select>
          </label>
        ))}
      </div>
      {surf && (
        <>
          <LossSurfacePlot view={surf} />
          <p className="hint">
            Mean cross-entropy{surf.penalised ? ' plus the penalty' : ''} with every other coefficient held at its
            estimate.
            {surf.penalised ? ' The penalty pulls the optimum towards zero.' : ''}
          </p>
          <p className="hint" data-testid="loss-summary">
            Values on the grid run from {num(Math.min(...surf.values), 5)} to {num(Math.max(...surf.values), 5)}; the
            estimate is at {surf.names[0]} = {num(surf.optimum[0], 4)}, {surf.names[1]} = {num(surf.optimum[1], 4)}.
          </p>
          <NumbersTable
            summary="Optimiser path as numbers"
            headers={['Step', surf.names[0], surf.names[1]]}
            rows={surf.path.map(([a, b], i) => [i, num(a, 4), num(b, 4)])}
          />
        </>
      )}
    </section>
  );
}
