import {
  categorical,
  clamp,
  demoRng,
  demoScenario,
  drawLevel,
  drawOutcome,
  newColumns,
  numeric,
  round,
} from './shared';
import type { DemoMeta, DemoScenario, TrueCoefficient } from './shared';

const LOTS = ['F-231', 'F-232', 'F-233', 'F-234'];
const LINES = ['A', 'B', 'C'];
const NO_YES = ['no', 'yes'];

/** True log-odds of the invented seal log (per °C, per second, per bar, per % humidity; levels vs the first). */
export const sealTruth: TrueCoefficient[] = [
  { column: null, value: 10.75 },
  { column: 'seal_temp_c', value: -0.06 },
  { column: 'dwell_s', value: -1.5 },
  { column: 'pressure_bar', value: -0.6 },
  { column: 'film_lot', level: 'F-232', value: 0.2 },
  { column: 'film_lot', level: 'F-233', value: 0.8 },
  { column: 'film_lot', level: 'F-234', value: 0 },
  { column: 'line', level: 'B', value: 0.35 },
  { column: 'line', level: 'C', value: -0.2 },
  { column: 'humidity_pct', value: 0.03 },
];

/**
 * INVENTED seal-failure log of a fictional packaging plant: n seals drawn from a logistic model with the
 * known coefficients `sealTruth` (outcome `seal_failed`, event "yes"). No missing values.
 */
export function generateSealLog(n = 5000, seed = 20240612): DemoScenario {
  const rng = demoRng(n, seed);
  const [temp, dwell, press, hum] = newColumns(4, () => new Float64Array(n));
  const [lot, line, failed] = newColumns(3, () => new Int32Array(n));
  for (let i = 0; i < n; i++) {
    temp[i] = round(180 + 6 * rng.normal(), 1);
    dwell[i] = round(clamp(1.2 + 0.25 * rng.normal(), 0.4, 2.5), 2);
    press[i] = round(clamp(4 + 0.5 * rng.normal(), 2, 6), 2);
    lot[i] = drawLevel(rng, [0.3, 0.3, 0.2, 0.2]);
    line[i] = drawLevel(rng, [0.4, 0.35, 0.25]);
    hum[i] = round(clamp(45 + 10 * rng.normal(), 15, 90), 0);
    const row = {
      seal_temp_c: temp[i],
      dwell_s: dwell[i],
      pressure_bar: press[i],
      film_lot: LOTS[lot[i]],
      line: LINES[line[i]],
      humidity_pct: hum[i],
    };
    failed[i] = drawOutcome(rng, sealTruth, row);
  }
  return demoScenario(SEALS, seed, sealTruth, [
    numeric('seal_temp_c', temp),
    numeric('dwell_s', dwell),
    numeric('pressure_bar', press),
    categorical('film_lot', LOTS, lot),
    categorical('line', LINES, line),
    numeric('humidity_pct', hum),
    categorical('seal_failed', NO_YES, failed),
  ]);
}

/** Names of the seal demo. */
const SEALS: DemoMeta = {
  id: 'seals',
  title: 'Fictional packaging plant — heat-seal failures',
  rows: 'seals',
  nothingReal: 'No real plant.',
  outcome: 'seal_failed',
  event: 'yes',
};
