import { useEffect, useId, useState } from 'react';
import type { PointsBaseUnit, PointsOptions } from '../../engine/points';
import type { PointsRecord } from '../../engine/workflow';
import { POINTS_CAUTIONS, pointsCasesText, pointsComparisonRows, pointsText, riskText } from '../../report/pointsCard';
import type { PointsAnswer } from '../../worker/pointsOps';
import type { FitView } from '../../worker/protocol';
import { useApp, useEnv } from '../context';
import { StaleBanner } from '../StaleBanner';
import { PointsCardPreview } from './PointsCardPreview';

type Unit = 'auto' | 'per-increase' | 'log-odds';
interface Choice {
  unit: Unit;
  widest: string;
  column: string;
  increase: string;
  logOdds: string;
  ranges: string;
}
type Problem = { message: string; suggestion: string };

/** The engine's options from the typed inputs; a box that is not a number is named. */
export function pointsOptionsOf(c: Choice): { options: Partial<PointsOptions> } | { problem: Problem } {
  const number = (text: string, what: string): number | Problem => {
    const x = Number(text.trim());
    return text.trim() !== '' && Number.isFinite(x)
      ? x
      : {
          message: `“${text}” in ${what} is not a number.`,
          suggestion: 'Type a number (a point as the decimal mark).',
        };
  };
  const ranges = number(c.ranges, 'ranges per numeric predictor');
  if (typeof ranges !== 'number') return { problem: ranges };
  let baseUnit: PointsBaseUnit;
  let widestTermPoints: number | undefined;
  if (c.unit === 'auto') {
    const w = number(c.widest, 'points of the strongest predictor');
    if (typeof w !== 'number') return { problem: w };
    baseUnit = { kind: 'auto' };
    widestTermPoints = w;
  } else if (c.unit === 'per-increase') {
    const inc = number(c.increase, 'the increase');
    if (typeof inc !== 'number') return { problem: inc };
    baseUnit = { kind: 'per-increase', column: c.column, increase: inc };
  } else {
    const b = number(c.logOdds, 'the log odds per point');
    if (typeof b !== 'number') return { problem: b };
    baseUnit = { kind: 'log-odds', value: b };
  }
  return { options: { baseUnit, rangesPerTerm: ranges, ...(widestTermPoints ? { widestTermPoints } : {}) } };
}

/**
 * "Bedside points card": the fitted model turned into whole points per category or range of each predictor
 * (Sullivan, Massaro & D'Agostino 2004) from a base unit the user chooses, the table from total points to risk, the
 * card's AUC and calibration beside the full model's, the cautions, and the printable card as PDF and PNG. The
 * engine builds the one record that the model-summary PDF, the model file and `npm run fit --points` also carry.
 */
export function PointsPanel() {
  const { ctl } = useEnv();
  const fit = useApp((s) => s.fit);
  const numeric = fit ? fit.fit.recipe.terms.flatMap((t) => (t.type === 'numeric' ? [t.column] : [])) : [];
  const [choice, setChoice] = useState<Choice>({
    unit: 'auto',
    widest: '10',
    column: '',
    increase: '5',
    logOdds: '0.25',
    ranges: '5',
  });
  const [answer, setAnswer] = useState<{ fit: FitView; a: PointsAnswer } | null>(null);
  const [typed, setTyped] = useState<Problem | null>(null);
  const [busy, setBusy] = useState(false);

  // A new fit: show the score the engine kept for it (after a view switch), if any.
  useEffect(() => {
    if (!fit) return;
    let live = true;
    void ctl.currentPoints().then((p) => {
      if (live && p) setAnswer({ fit, a: { ok: true, points: p } });
    });
    return () => {
      live = false;
    };
  }, [fit, ctl]);

  if (!fit) return <div className="panel">Fit a model first.</div>;
  const column = choice.column || numeric[0] || '';
  const submit = async () => {
    setTyped(null);
    const parsed = pointsOptionsOf({ ...choice, column });
    if ('problem' in parsed) return setTyped(parsed.problem);
    setBusy(true);
    try {
      const a = await ctl.computePoints(parsed.options);
      if (a) setAnswer({ fit, a });
    } finally {
      setBusy(false);
    }
  };
  const shown = answer && answer.fit === fit ? answer.a : null;
  const problem = typed ?? (shown && !shown.ok ? shown.problem : null);
  return (
    <div className="panel points-panel" data-testid="points-panel">
      <h2>Bedside points card</h2>
      <StaleBanner />
      <p className="hint">
        Turns the model into whole points per category or range of each predictor, to add up by hand at the bedside
        (Sullivan, Massaro &amp; D’Agostino 2004, Stat Med 23:1631). Choose what one point stands for; the card is then
        compared with the full model on the rows it was fitted on, so you can see what rounding costs.
      </p>
      <UnitForm
        choice={{ ...choice, column }}
        numeric={numeric}
        busy={busy}
        onChange={(c) => (setChoice(c), setTyped(null))}
        onSubmit={() => void submit()}
      />
      {problem && (
        <p className="notice error" role="alert" data-testid="points-problem">
          {problem.message} <span className="suggestion">{problem.suggestion}</span>
        </p>
      )}
      {shown?.ok && !typed && <Result points={shown.points} />}
    </div>
  );
}

function UnitForm(p: {
  choice: Choice;
  numeric: string[];
  busy: boolean;
  onChange(c: Choice): void;
  onSubmit(): void;
}) {
  const id = useId();
  const c = p.choice;
  const set = (m: Partial<Choice>) => p.onChange({ ...c, ...m });
  const toAuto = () => set({ unit: 'auto' });
  return (
    <form
      className="points-form"
      onSubmit={(e) => {
        e.preventDefault();
        p.onSubmit();
      }}
    >
      <fieldset>
        <legend>One point stands for</legend>
        <label>
          <input type="radio" name={`${id}-unit`} checked={c.unit === 'auto'} onChange={toAuto} /> the strongest
          predictor spanning{' '}
          <input
            aria-label="Points of the strongest predictor"
            data-testid="points-widest"
            size={4}
            value={c.widest}
            onChange={(e) => set({ widest: e.target.value, unit: 'auto' })}
          />{' '}
          points
        </label>
        <br />
        <label>
          <input
            type="radio"
            name={`${id}-unit`}
            data-testid="points-unit-increase"
            checked={c.unit === 'per-increase'}
            disabled={p.numeric.length === 0}
            onChange={() => set({ unit: 'per-increase' })}
          />{' '}
          an increase of{' '}
          <input
            aria-label="Increase that one point stands for"
            data-testid="points-increase"
            size={5}
            value={c.increase}
            onChange={(e) => set({ increase: e.target.value, unit: 'per-increase' })}
          />{' '}
          in{' '}
          <select
            aria-label="Numeric predictor of the base unit"
            data-testid="points-column"
            value={c.column}
            disabled={p.numeric.length === 0}
            onChange={(e) => set({ column: e.target.value, unit: 'per-increase' })}
          >
            {p.numeric.map((n) => (
              <option key={n}>{n}</option>
            ))}
          </select>
          {p.numeric.length === 0 && <span className="hint"> (the model has no linear numeric predictor)</span>}
        </label>
        <br />
        <label>
          <input
            type="radio"
            name={`${id}-unit`}
            checked={c.unit === 'log-odds'}
            onChange={() => set({ unit: 'log-odds' })}
          />{' '}
          a change of{' '}
          <input
            aria-label="Log odds per point"
            size={6}
            value={c.logOdds}
            onChange={(e) => set({ logOdds: e.target.value, unit: 'log-odds' })}
          />{' '}
          in the log odds
        </label>
      </fieldset>
      <label>
        Ranges per numeric predictor{' '}
        <input
          aria-label="Ranges per numeric predictor"
          size={3}
          value={c.ranges}
          onChange={(e) => set({ ranges: e.target.value })}
        />
      </label>{' '}
      <button type="submit" data-testid="points-build" disabled={p.busy}>
        {p.busy ? 'Building…' : 'Build the card'}
      </button>
    </form>
  );
}

function Result({ points }: { points: PointsRecord }) {
  const s = points.score;
  const warnings = [...s.warnings, ...points.evaluation.warnings];
  return (
    <section aria-label="Points score">
      <p data-testid="points-base-unit">
        <strong>{s.baseUnit.description}</strong> Totals run from {pointsText(s.minTotal)} to {pointsText(s.maxTotal)}.
      </p>
      <div
        className="points-tables"
        style={{ display: 'flex', flexWrap: 'wrap', gap: '0.25rem 1.5rem', alignItems: 'flex-start' }}
      >
        {s.terms.map((t) => (
          <table key={t.term} className="num points-term" data-testid="points-term">
            <caption>{t.term === t.column ? t.term : `${t.term} (${t.column})`}</caption>
            <thead>
              <tr>
                <th scope="col">{t.kind === 'categorical' ? 'Category' : 'Range'}</th>
                <th scope="col">Points</th>
              </tr>
            </thead>
            <tbody>
              {t.categories.map((c) => (
                <tr key={c.label}>
                  <th scope="row">{c.label}</th>
                  <td>{pointsText(c.points)}</td>
                </tr>
              ))}
            </tbody>
          </table>
        ))}
        <table className="num points-risk" data-testid="points-risk-table">
          <caption>Total points → risk</caption>
          <thead>
            <tr>
              <th scope="col">Total</th>
              <th scope="col">Risk</th>
            </tr>
          </thead>
          <tbody>
            {s.table.map((r) => (
              <tr key={r.total}>
                <th scope="row">{pointsText(r.total)}</th>
                <td>{riskText(r.risk)}</td>
              </tr>
            ))}
          </tbody>
        </table>
      </div>
      <h3>The card beside the full model</h3>
      <p className="hint">{pointsCasesText(points)}</p>
      <table className="num" data-testid="points-comparison">
        <thead>
          <tr>
            <th scope="col">Measure</th>
            <th scope="col">Points card</th>
            <th scope="col">Full model</th>
          </tr>
        </thead>
        <tbody>
          {pointsComparisonRows(points).map((row) => (
            <tr key={row[0]}>
              <th scope="row">{row[0]}</th>
              <td>{row[1]}</td>
              <td>{row[2]}</td>
            </tr>
          ))}
        </tbody>
      </table>
      {warnings.map((w, i) => (
        <p key={i} className="notice warning">
          {w.message} <span className="suggestion">{w.suggestion}</span>
        </p>
      ))}
      <aside className="caution" aria-label="Cautions of the points card" data-testid="points-cautions">
        <ul>
          {POINTS_CAUTIONS.map((c) => (
            <li key={c}>{c}</li>
          ))}
        </ul>
      </aside>
      <PointsCardPreview points={points} />
    </section>
  );
}
