import { useId, useState } from 'react';
import { Caution } from '../Caution';
import { surfacePair } from '../../state/effects/fitting';
import { useApp, useEnv } from '../context';
import { ExplainList } from '../Explain';
import { finiteMax, num, palette, pct } from '../format';
import { LinePlot } from '../plots/LinePlot';
import { LossSurfacePlot, surfaceAxisTitle } from '../plots/LossSurfacePlot';
import { NumbersTable } from '../plots/NumbersTable';
import { PointRangePlot } from '../plots/PointRangePlot';
import type { LossSurfaceChoice, LossSurfaceView } from '../../worker/protocol';
import { StaleBanner } from '../StaleBanner';

export function ShapePanel() {
  return (
    <div className="panel shape-panel">
      <StaleBanner />
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
  const hasBand = curve?.points.some((p) => Number.isFinite(p.lower)) ?? false;
  const level = `${Math.round((fit?.fit.level ?? 0.95) * 100)}% confidence interval`;
  const yTop = Math.min(1, finiteMax([0.05, ...(curve?.points ?? []).flatMap((p) => [p.risk, p.upper])], 1) * 1.05);
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
          {!curve.numeric && (
            <PointRangePlot
              title={`Predicted risk at each level of ${curve.predictor}`}
              xLabel={curve.predictor}
              yLabel="Predicted risk"
              yDomain={[0, yTop]}
              points={curve.points.map((p) => ({ label: p.label, y: p.risk, lower: p.lower, upper: p.upper }))}
              intervalLabel={level}
            />
          )}
          {curve.numeric && (
            <LinePlot
              title={`Predicted risk against ${curve.predictor}`}
              xLabel={curve.predictor}
              yLabel="Predicted risk"
              xDomain={[curve.points[0].x, curve.points[curve.points.length - 1].x]}
              yDomain={[0, yTop]}
              series={[
                {
                  label: 'predicted risk',
                  color: palette.blue,
                  points: curve.points.map((p) => ({ x: p.x, y: p.risk })),
                },
              ]}
              band={hasBand ? curve.points.map((p) => ({ x: p.x, lower: p.lower, upper: p.upper })) : undefined}
              rug={curve.rug}
            />
          )}
          <p className="hint">
            Other predictors held at:{' '}
            {Object.entries(curve.heldAt)
              .map(([k, v]) => `${k} = ${typeof v === 'number' ? num(v, 2) : v}`)
              .join(', ') || 'none'}
            .{' '}
            {hasBand
              ? `${curve.numeric ? 'Band' : 'Bars'}: ${level}.`
              : `No confidence ${curve.numeric ? 'band' : 'bars'}: a penalised fit has no valid covariance.`}
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
  const [pair, setPair] = useState<[number, number]>(() =>
    surf ? pairOf(surf) : (surfacePair(fit?.fit.coefficients ?? []) ?? [1, Math.min(2, names.length - 1)]),
  );
  // A new surface (from a fit or another pair) shows which coefficients it is drawn over.
  const [shown, setShown] = useState(surf);
  if (shown !== surf) {
    setShown(surf);
    if (surf) setPair(pairOf(surf));
  }
  const choice: LossSurfaceChoice = surf
    ? { scale: surf.scale, window: surf.window }
    : { scale: 'standardised', window: 'estimate' };
  const choose = (k: 0 | 1, v: number) => {
    const next: [number, number] = k === 0 ? [v, pair[1]] : [pair[0], v];
    setPair(next);
    if (next[0] !== next[1]) void ctl.lossSurface(next[0], next[1], choice);
  };
  const reshape = (c: Partial<LossSurfaceChoice>) => {
    if (pair[0] !== pair[1]) void ctl.lossSurface(pair[0], pair[1], { ...choice, ...c });
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
                <option key={n} value={i} disabled={fit?.fit.coefficients[i].aliased}>
                  {fit?.fit.coefficients[i].aliased ? `${n} (aliased: no estimate)` : n}
                </option>
              ))}
            </select>
          </label>
        ))}
        <label>
          Scale
          <select
            value={choice.scale}
            onChange={(e) => reshape({ scale: e.target.value as LossSurfaceChoice['scale'] })}
          >
            <option value="standardised">per SD of each predictor (standardised)</option>
            <option value="original">per unit of each predictor</option>
          </select>
        </label>
        <label>
          Window
          <select
            value={choice.window}
            onChange={(e) => reshape({ window: e.target.value as LossSurfaceChoice['window'] })}
          >
            <option value="estimate">±4 standard errors around the estimate</option>
            <option value="path">from the optimiser’s start to the estimate</option>
          </select>
        </label>
      </div>
      {surf && (
        <>
          <LossSurfacePlot view={surf} />
          <p className="hint" data-testid="loss-window">
            {windowCaption(surf)}
          </p>
          <p className="hint">
            Mean cross-entropy{surf.penalised ? ' plus the penalty' : ''} with every other coefficient held at its
            estimate.
            {surf.penalised ? ' The penalty pulls the optimum towards zero.' : ''}
          </p>
          <ExplainList terms={['crossEntropy', 'lossSurface']} />
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

/** Which scale and window the surface shows, in words. */
function windowCaption(v: LossSurfaceView): string {
  const scale =
    v.scale === 'standardised'
      ? 'Coefficients per standard deviation of each predictor (standardised, the intercept taken at the ' +
        'predictors’ means), so both axes share one scale.'
      : 'Coefficients per unit of each predictor, as in the odds-ratio table.';
  if (v.window === 'path') return `${scale} Window: from the optimiser’s start (all zero) to the estimate.`;
  const axes = `${surfaceAxisTitle(v, 0).split(' (')[0]} and ${surfaceAxisTitle(v, 1).split(' (')[0]}`;
  return v.seBased
    ? `${scale} Window: ±${v.span} standard errors of ${axes} around the estimate; ` +
        'optimiser steps outside it are not drawn.'
    : `${scale} Window: a penalised fit has no standard errors, so the window is ±${v.span} × the larger of ` +
        'half the estimate and 0.5 per SD around it; optimiser steps outside it are not drawn.';
}
