import type { PerformanceView, ValidationView } from '../../worker/protocol';
import type { GlossaryTerm } from '../../report/glossary';
import { Explain, ExplainList } from '../Explain';
import { ci, num } from '../format';

/** Apparent performance with intervals and, after a bootstrap, the optimism and the corrected values. */
export function MetricsTable({ perf, validation }: { perf: PerformanceView; validation: ValidationView | null }) {
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
  const term: Record<string, GlossaryTerm> = {
    'AUC (c-statistic)': 'auc',
    'Calibration slope': 'calibrationSlope',
    'Calibration-in-the-large': 'calibrationInTheLarge',
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
          <th scope="col">
            Apparent
            <Explain term="apparent" tip />
          </th>
          <th scope="col">
            95% CI
            <Explain term="confidenceInterval" tip />
          </th>
          {validation && (
            <>
              <th scope="col">
                Optimism
                <Explain term="optimism" tip />
              </th>
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
              <th scope="row">
                {name}
                <br />
                <Explain term={term[name]} />
              </th>
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
              ` · Hosmer–Lemeshow χ² ${num(perf.hosmerLemeshow.chi2, 2)} on ${perf.hosmerLemeshow.df} df` +
                ' (secondary: depends on grouping)'}
            <ExplainList
              terms={[
                'scaledBrier',
                'averagePrecision',
                'ici',
                ...(perf.hosmerLemeshow ? (['hosmerLemeshow'] as const) : []),
                ...(validation ? (['optimism'] as const) : []),
              ]}
            />
          </td>
        </tr>
      </tfoot>
    </table>
  );
}
