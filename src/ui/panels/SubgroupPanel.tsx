import { useEffect, useId, useState } from 'react';
import { forestData, type SubgroupMeasure, type SubgroupPerformance } from '../../engine/subgroups';
import type { SubgroupChoice } from '../../engine/workflow';
import { subgroupsCsv } from '../../io/export/subgroupsCsv';
import { FOREST_MEASURES, subgroupTableText } from '../../report/subgroupTable';
import type { SubgroupAnswer } from '../../worker/subgroupOps';
import type { ColumnView, FitView } from '../../worker/protocol';
import { useApp, useEnv } from '../context';
import { downloadFile } from '../download';
import { count, num } from '../format';
import { SubgroupForestPlot } from '../plots/SubgroupForestPlot';
import { Caution } from '../Caution';
import { StaleBanner } from '../StaleBanner';

type Problem = { message: string; suggestion: string };

/** Cut points typed as "40, 60, 80" (commas, semicolons or spaces); a token that is not a number is named. */
export function parseCutPoints(text: string): { cuts: number[] } | { problem: Problem } {
  const tokens = text.split(/[\s,;]+/).filter(Boolean);
  const bad = tokens.find((t) => !Number.isFinite(Number(t)));
  if (bad !== undefined)
    return {
      problem: {
        message: `“${bad}” in the cut points is not a number.`,
        suggestion: 'Type numbers separated by commas, e.g. 40, 60, 80 (a point as the decimal mark).',
      },
    };
  return { cuts: tokens.map(Number) };
}

const THIRD: { id: SubgroupMeasure; label: string }[] = [
  { id: 'calibrationSlope', label: 'Calibration slope' },
  { id: 'calibrationInTheLarge', label: 'Calibration-in-the-large' },
  { id: 'sensitivity', label: 'Sensitivity at the cut-off' },
  { id: 'specificity', label: 'Specificity at the cut-off' },
  { id: 'fractionFlagged', label: 'Fraction flagged at the cut-off' },
];

/** Columns that can define subgroups: usable, not dates, not the outcome. */
const candidates = (columns: ColumnView[], fit: FitView): ColumnView[] =>
  columns.filter((c) => c.modelling && c.type !== 'date' && c.name !== fit.request.spec.outcome);

/**
 * "Subgroups": the model's performance within the groups of one column the user picks (each category, or bands of a
 * numeric column at typed cut points): per group n, events, O/E, AUC, calibration and the cut-off measures, a forest
 * plot, the too-small rule with its sources. The engine computes the one record the PDF and `npm run fit` print.
 */
export function SubgroupPanel() {
  const { ctl } = useEnv();
  const fit = useApp((s) => s.fit);
  const columns = useApp((s) => s.data?.columns ?? []);
  const threshold = useApp((s) => s.threshold);
  const [column, setColumn] = useState('');
  const [cutText, setCutText] = useState('');
  const [answer, setAnswer] = useState<{ fit: FitView; a: SubgroupAnswer } | null>(null);
  const [typed, setTyped] = useState<Problem | null>(null);
  const [busy, setBusy] = useState(false);
  const usable = fit ? candidates(columns, fit) : [];
  const chosen = usable.find((c) => c.name === column) ?? null;

  const run = async (choice: SubgroupChoice) => {
    if (!fit) return;
    setBusy(true);
    try {
      const a = await ctl.computeSubgroups(choice);
      if (a) setAnswer({ fit, a });
    } finally {
      setBusy(false);
    }
  };

  // A new fit: restore the choice the engine kept for it (after a view switch), else propose a column.
  useEffect(() => {
    if (!fit) return;
    let live = true;
    void ctl.lastSubgroupChoice().then((c) => {
      if (!live) return;
      if (c) {
        setColumn(c.column);
        setCutText((c.cutPoints ?? []).join(', '));
        void run({ ...c, threshold });
      } else {
        const all = candidates(columns, fit);
        setColumn((prev) =>
          all.some((x) => x.name === prev)
            ? prev
            : ((all.find((x) => x.name === 'ward') ?? all.find((x) => x.kind === 'categorical') ?? all[0])?.name ?? ''),
        );
      }
    });
    return () => {
      live = false;
    };
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [fit]);

  // The cut-off moved: the shown groups follow it.
  const shown = answer && answer.fit === fit ? answer.a : null;
  useEffect(() => {
    if (!fit || !shown?.ok || shown.performance.threshold === threshold) return;
    void ctl.computeSubgroups({ ...shown.choice, threshold }).then((a) => {
      if (a) setAnswer({ fit, a });
    });
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [threshold]);

  if (!fit) return <div className="panel">Fit a model first.</div>;

  const submit = () => {
    setTyped(null);
    if (!chosen) return;
    let cutPoints: number[] = [];
    if (chosen.kind === 'numeric') {
      const parsed = parseCutPoints(cutText);
      if ('problem' in parsed) return setTyped(parsed.problem);
      cutPoints = parsed.cuts;
    }
    void run({ column: chosen.name, cutPoints, threshold });
  };
  const problem = typed ?? (shown && !shown.ok ? shown.problem : null);
  return (
    <div className="panel subgroup-panel" data-testid="subgroup-panel">
      <h2>Subgroups</h2>
      <StaleBanner />
      <p className="hint">
        Does the model work as well in every group? Pick a column: each of its categories is a group, or type cut points
        to split a numeric column into bands. The numbers are the model’s apparent performance on the rows it was fitted
        to, within each group.
      </p>
      <ChoiceForm
        usable={usable}
        column={column}
        onColumn={(c) => (setColumn(c), setTyped(null))}
        numeric={chosen?.kind === 'numeric'}
        cutText={cutText}
        onCutText={setCutText}
        busy={busy}
        onSubmit={submit}
        range={chosen?.kind === 'numeric' ? [chosen.min, chosen.median, chosen.max] : null}
      />
      {problem && (
        <p className="notice error" role="alert" data-testid="subgroup-problem">
          {problem.message} <span className="suggestion">{problem.suggestion}</span>
        </p>
      )}
      {shown?.ok && !typed && <Result perf={shown.performance} />}
      <Caution />
    </div>
  );
}

function ChoiceForm(p: {
  usable: ColumnView[];
  column: string;
  onColumn(c: string): void;
  numeric: boolean;
  cutText: string;
  onCutText(t: string): void;
  busy: boolean;
  onSubmit(): void;
  range: [number | null, number | null, number | null] | null;
}) {
  const id = useId();
  return (
    <form
      className="row"
      onSubmit={(e) => {
        e.preventDefault();
        p.onSubmit();
      }}
    >
      <label htmlFor={`${id}-col`}>
        Column{' '}
        <select
          id={`${id}-col`}
          data-testid="subgroup-column"
          value={p.column}
          onChange={(e) => p.onColumn(e.target.value)}
        >
          {p.usable.map((c) => (
            <option key={c.name} value={c.name}>
              {c.name} ({c.kind === 'numeric' ? 'numeric' : `${c.levels.length} categories`})
            </option>
          ))}
        </select>
      </label>{' '}
      {p.numeric && (
        <label htmlFor={`${id}-cuts`}>
          Cut points{' '}
          <input
            id={`${id}-cuts`}
            data-testid="subgroup-cuts"
            value={p.cutText}
            placeholder="e.g. 40, 60, 80"
            onChange={(e) => p.onCutText(e.target.value)}
          />
          {p.range && (
            <span className="hint">
              {' '}
              values {plain(p.range[0])} to {plain(p.range[2])}, median {plain(p.range[1])}; bands are closed on the
              left (40 to &lt; 60); empty: one group per value
            </span>
          )}
        </label>
      )}{' '}
      <button type="submit" data-testid="subgroup-run" disabled={p.busy || !p.column}>
        {p.busy ? 'Computing…' : 'Show performance by group'}
      </button>
    </form>
  );
}

function Result({ perf }: { perf: SubgroupPerformance }) {
  const [third, setThird] = useState<SubgroupMeasure>('calibrationSlope');
  const id = useId();
  const { header, rows } = subgroupTableText(perf);
  const panels = [...FOREST_MEASURES.slice(0, 2), third].map((m) => forestData(perf, m));
  return (
    <section data-testid="subgroup-result">
      <h3>
        Performance by “{perf.column}”: {perf.rows.length} group{perf.rows.length === 1 ? '' : 's'},{' '}
        {count(perf.overall.n)} rows
      </h3>
      <p className="hint">
        {perf.threshold === null
          ? 'No cut-off is set.'
          : `Sensitivity, specificity and the fraction flagged at the current cut-off ${num(perf.threshold, 3)} ` +
            '(flagged: risk ≥ cut-off; change it in “Cut-off & costs”).'}{' '}
        {perf.conventions.join(' ')}
        {perf.emptyGroups.length > 0 && ` Groups with none of the rows used: ${perf.emptyGroups.join(', ')}.`}
      </p>
      <div style={{ overflowX: 'auto' }}>
        <table className="num subgroup-table" data-testid="subgroup-table">
          <thead>
            <tr>
              {header.map((h) => (
                <th key={h} scope="col">
                  {h}
                </th>
              ))}
            </tr>
          </thead>
          <tbody>
            {rows.map((cells, k) => (
              <tr key={k} data-group={k < perf.rows.length ? perf.rows[k].label : 'all rows'}>
                <th scope="row">{cells[0]}</th>
                {cells.slice(1).map((c, i) => (
                  <td key={i}>{c}</td>
                ))}
              </tr>
            ))}
          </tbody>
        </table>
      </div>
      <p>
        <button
          type="button"
          data-testid="subgroup-csv"
          onClick={() =>
            downloadFile(
              subgroupsCsv(perf),
              `fulcra-subgroups-${perf.column.replace(/[^\p{L}\p{N}_-]+/gu, '_').slice(0, 40)}.csv`,
              'text/csv',
            )
          }
        >
          Download the table (CSV)
        </button>
      </p>
      <label htmlFor={id}>
        Third panel{' '}
        <select id={id} value={third} onChange={(e) => setThird(e.target.value as SubgroupMeasure)}>
          {THIRD.map((t) => (
            <option key={t.id} value={t.id} disabled={perf.threshold === null && isCut(t.id)}>
              {t.label}
            </option>
          ))}
        </select>
      </label>
      {isCut(third) && perf.threshold === null ? (
        <p>No cut-off is set.</p>
      ) : (
        <SubgroupForestPlot panels={panels} title={`Performance by ${perf.column}`} />
      )}
      <Rule perf={perf} />
    </section>
  );
}

/** A column summary value without trailing zeros (18, 60.5), or a dash. */
const plain = (x: number | null) => (x === null ? '—' : String(Number(x.toPrecision(4))));

const isCut = (m: SubgroupMeasure) => m === 'sensitivity' || m === 'specificity' || m === 'fractionFlagged';

function Rule({ perf }: { perf: SubgroupPerformance }) {
  return (
    <>
      {perf.warnings.length > 0 && (
        <ul className="notices" data-testid="subgroup-warnings">
          {perf.warnings.map((w, k) => (
            <li key={k} className="notice warning" data-code={w.code}>
              {w.message} <span className="suggestion">{w.suggestion}</span>
            </li>
          ))}
        </ul>
      )}
      <h3>When a subgroup is too small</h3>
      <p data-testid="subgroup-rule">{perf.rule.text}</p>
      <details>
        <summary>How each number is computed</summary>
        <ul>
          {perf.methods.map((m) => (
            <li key={m}>{m}</li>
          ))}
        </ul>
      </details>
    </>
  );
}
