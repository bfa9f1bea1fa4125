import type { MonitoringFunnel } from '../../engine/monitoring';
import { funnelFlagText } from '../../report/monitoringText';
import { ExplainList } from '../Explain';
import { ci, count, num } from '../format';
import { FunnelPlot } from '../plots/FunnelPlot';
import { est, pctLevel } from './monitorFormat';

/** By unit: the funnel plot, the units outside its limits (named), every unit as a table, the CSV. */
export function MonitorFunnel({
  funnel: f,
  level,
  onCsv,
}: {
  funnel: MonitoringFunnel;
  level: number;
  onCsv: () => void;
}) {
  const lvl = pctLevel(level);
  const adjusted = !!f.overdispersion?.applied;
  const flagOf = (u: MonitoringFunnel['units'][number]) => (adjusted && u.adjustedFlag ? u.adjustedFlag : u.flag);
  const flagged = f.units.filter((u) => flagOf(u) !== 'within');
  return (
    <section aria-label="By unit: funnel plot">
      <h3>By unit: funnel plot</h3>
      <FunnelPlot
        title="Funnel plot: O/E by unit"
        curves={adjusted ? f.overdispersion!.curves : f.curves}
        levels={f.levels}
        units={f.units.map((u) => ({ unit: u.unit, expected: u.expected, oe: u.oe.estimate, flag: flagOf(u) }))}
      />
      {f.overdispersion && (
        <p data-testid="overdispersion">
          Overdispersion factor φ = {num(f.overdispersion.phi, 2)} from {f.overdispersion.units} units
          {f.overdispersion.applied
            ? ': the limits drawn and the positions below are widened by it.'
            : ' (not above 1, so the exact limits are kept).'}
        </p>
      )}
      {flagged.length === 0 ? (
        <p>No unit lies outside the {pctLevel(f.levels[0])} limits.</p>
      ) : (
        <table data-testid="funnel-outliers">
          <caption>Units outside the limits</caption>
          <thead>
            <tr>
              <th scope="col">Unit</th>
              <th scope="col">Cases</th>
              <th scope="col">O</th>
              <th scope="col">E</th>
              <th scope="col">O/E ({lvl} CI)</th>
              <th scope="col">Position</th>
            </tr>
          </thead>
          <tbody>
            {flagged.map((u) => (
              <tr key={u.unit}>
                <th scope="row">{u.unit}</th>
                <td className="num">{count(u.n)}</td>
                <td className="num">{count(u.observed)}</td>
                <td className="num">{num(u.expected, 1)}</td>
                <td className="num">{est(u.oe, 2)}</td>
                <td>{funnelFlagText(flagOf(u))}</td>
              </tr>
            ))}
          </tbody>
        </table>
      )}
      <details>
        <summary>Every unit (the funnel plot as a table)</summary>
        <table data-testid="funnel-units">
          <thead>
            <tr>
              <th scope="col">Unit</th>
              <th scope="col">Cases</th>
              <th scope="col">O</th>
              <th scope="col">E</th>
              <th scope="col">O/E ({lvl} CI)</th>
              <th scope="col">Limits {pctLevel(f.levels[1])}</th>
              <th scope="col">Position</th>
            </tr>
          </thead>
          <tbody>
            {f.units.map((u) => {
              const lim = adjusted && u.adjustedLimits ? u.adjustedLimits : u.limits;
              return (
                <tr key={u.unit}>
                  <th scope="row">{u.unit}</th>
                  <td className="num">{count(u.n)}</td>
                  <td className="num">{count(u.observed)}</td>
                  <td className="num">{num(u.expected, 1)}</td>
                  <td className="num">{est(u.oe, 2)}</td>
                  <td className="num">{ci(lim.outer.lower, lim.outer.upper, 2)}</td>
                  <td>{funnelFlagText(flagOf(u))}</td>
                </tr>
              );
            })}
          </tbody>
        </table>
      </details>
      <button type="button" onClick={onCsv}>
        Download the unit table (CSV)
      </button>
      <ExplainList terms={['funnelPlot']} />
    </section>
  );
}
