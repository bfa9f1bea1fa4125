import type { MonitoringRecord } from '../engine/monitoring';
import { fmt, table } from './format';

const ci = (lo: number | null | undefined, hi: number | null | undefined, d = 2) => `${fmt(lo, d)} to ${fmt(hi, d)}`;

/** The human summary of `npm run fit -- … --monitor FILE` (the JSON prints the whole MonitoringRecord). */
export function monitoringLines(m: MonitoringRecord & { file: { file: string } }): string[] {
  const o = m.overall;
  const pctLevel = `${Math.round(m.options.level * 1000) / 10}%`;
  const out = [
    `Monitoring ${m.file.file} with the ${m.model.name}: ${m.nUsed} of ${m.nRows} rows, ` +
      `${m.dateRange.firstLabel} to ${m.dateRange.lastLabel}` +
      (m.nUnscored ? ` (${m.nUnscored} not scored)` : ''),
    `  observed ${o.observed}, expected ${fmt(o.expected, 1)}, O − E ${fmt(o.oMinusE, 1)}; ` +
      `O/E ${fmt(o.oe.estimate, 3)} (${pctLevel} CI ${ci(o.oe.lower, o.oe.upper, 3)}, exact Poisson)`,
    `  calibration-in-the-large ${fmt(o.calibrationInTheLarge?.estimate, 3)} ` +
      `(${ci(o.calibrationInTheLarge?.lower, o.calibrationInTheLarge?.upper, 3)}); ` +
      `slope ${fmt(o.calibrationSlope?.estimate, 3)} (${ci(o.calibrationSlope?.lower, o.calibrationSlope?.upper, 3)})`,
  ];
  for (const c of [m.cusum.deteriorate, m.cusum.improve]) {
    const s = c.arl0Simulated;
    out.push(
      `  CUSUM for odds × ${c.oddsRatio}: h ${fmt(c.h, 3)} for ARL0 ${c.targetArl0} cases (Markov chain ` +
        `${fmt(c.arl0Markov, 0)}; simulated ${fmt(s.mean, 0)} ± ${fmt(s.se, 0)}, ${s.runs} runs); ` +
        (c.signals.length
          ? `${c.signals.length} signal${c.signals.length > 1 ? 's' : ''}: ` +
            c.signals
              .slice(0, 5)
              .map((g) => `${g.dateLabel}${g.unit ? ` (${g.unit})` : ''} row ${g.row}`)
              .join(', ') +
            (c.signals.length > 5 ? ', …' : '')
          : 'no signal'),
    );
    for (const u of c.byUnit ?? [])
      if (u.signals.length)
        out.push(
          `    ${u.unit}: signal${u.signals.length > 1 ? 's' : ''} ${u.signals.map((g) => g.dateLabel).join(', ')}`,
        );
  }
  out.push(`  cumulative O − E at the end ${fmt(m.vlad.final, 1)}`);
  if (m.funnel) {
    out.push('', `Funnel plot by unit (limits ${m.funnel.levels.map((l) => `${l * 100}%`).join(' and ')})`);
    out.push(
      table(
        ['Unit', 'n', 'O', 'E', 'O/E', 'flag'],
        m.funnel.units.map((u) => [
          u.unit,
          String(u.n),
          String(u.observed),
          fmt(u.expected, 1),
          fmt(u.oe.estimate, 2),
          u.flag,
        ]),
      ),
    );
  }
  out.push('', `Calibration by ${m.options.period}`);
  out.push(
    table(
      ['Period', 'n', 'O', 'E', 'O/E', 'CI', 'CITL'],
      m.periods.map((p) => [
        p.label,
        String(p.n),
        String(p.observed),
        fmt(p.expected, 1),
        fmt(p.oe.estimate, 2),
        ci(p.oe.lower, p.oe.upper),
        fmt(p.citl?.estimate, 2),
      ]),
    ),
  );
  out.push(
    '  A signal is a prompt to look, not proof of worse care; expected counts are unreliable for case mix outside ' +
      'the development data; follow local governance.',
  );
  return out;
}
