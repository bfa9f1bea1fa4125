import { categorical, clamp, demoRng, demoScenario, drawLevel, drawOutcome } from './shared';
import {
  newColumns,
  numeric,
  punchMissing,
  round,
  type DemoMeta,
  type DemoScenario,
  type TrueCoefficient,
} from './shared';
import type { Rng } from '../numerics/rng';

export const ASA = ['I', 'II', 'III', 'IV'];
export const WOUND = ['clean', 'clean-contaminated', 'contaminated', 'dirty'];
export const TIMING = ['on time', 'late', 'none'];
export const YESNO = ['no', 'yes'];

/** True log-odds of the invented registry (per year, per kg/m², per minute; levels against the first level). */
export const ssiTruth: TrueCoefficient[] = [
  { column: null, value: -6.7 },
  { column: 'age', value: 0.02 },
  { column: 'bmi', value: 0.05 },
  { column: 'diabetes', level: 'yes', value: 0.55 },
  { column: 'asa_class', level: 'II', value: 0.3 },
  { column: 'asa_class', level: 'III', value: 0.7 },
  { column: 'asa_class', level: 'IV', value: 1.1 },
  { column: 'wound_class', level: 'clean-contaminated', value: 0.4 },
  { column: 'wound_class', level: 'contaminated', value: 0.8 },
  { column: 'wound_class', level: 'dirty', value: 1.2 },
  { column: 'duration_min', value: 0.006 },
  { column: 'prophylaxis', level: 'late', value: 0.5 },
  { column: 'prophylaxis', level: 'none', value: 0.9 },
  { column: 'smoker', level: 'yes', value: 0.45 },
];

const SSI: DemoMeta = {
  id: 'ssi',
  title: 'Northfield General Hospital (fictional) — surgical-site infections',
  rows: 'operations',
  nothingReal: 'No real patients.',
  outcome: 'ssi_30d',
  event: 'yes',
};

/**
 * The one seeded data-entry error of the demo (for the diagnostics view to find): data row 1054 (spreadsheet row
 * 1056), an operation of 48 minutes entered in seconds, 2880 — an impossible 48-hour operation without infection.
 */
export const ssiSeededError = { dataRow: 1054, sheetRow: 1056, column: 'duration_min', value: 2880, was: 48 } as const;

/** The predictor columns of invented operations (level indices for the categorical ones). */
export interface SsiColumns {
  age: Float64Array;
  bmi: Float64Array;
  dur: Float64Array;
  diab: Int32Array;
  asa: Int32Array;
  wound: Int32Array;
  timing: Int32Array;
  smoker: Int32Array;
}

export function newSsiColumns(n: number): SsiColumns {
  const [age, bmi, dur] = newColumns(3, () => new Float64Array(n));
  const [diab, asa, wound, timing, smoker] = newColumns(5, () => new Int32Array(n));
  return { age, bmi, dur, diab, asa, wound, timing, smoker };
}

/**
 * Draws operation i's predictors into `c`, always in the same order of random draws (so a seed gives the same
 * data), with the case mix of ASA class and wound class given, and returns the row `ssiTruth` reads; shared by the
 * registry and the monitoring year.
 */
export function drawSsiCase(
  rng: Rng,
  c: SsiColumns,
  i: number,
  asaProbs: readonly number[],
  woundProbs: readonly number[],
): Record<string, number | string> {
  c.age[i] = Math.round(clamp(60 + 14 * rng.normal(), 18, 95));
  c.bmi[i] = round(clamp(28 + 5 * rng.normal(), 16, 55), 1);
  c.asa[i] = drawLevel(rng, asaProbs);
  c.diab[i] = rng.next() < 0.1 + 0.05 * c.asa[i] ? 1 : 0;
  c.wound[i] = drawLevel(rng, woundProbs);
  c.dur[i] = Math.round(clamp(120 * Math.exp(0.45 * rng.normal()), 20, 600));
  c.timing[i] = drawLevel(rng, [0.8, 0.12, 0.08]);
  c.smoker[i] = rng.next() < 0.2 ? 1 : 0;
  return {
    age: c.age[i],
    bmi: c.bmi[i],
    diabetes: YESNO[c.diab[i]],
    asa_class: ASA[c.asa[i]],
    wound_class: WOUND[c.wound[i]],
    duration_min: c.dur[i],
    prophylaxis: TIMING[c.timing[i]],
    smoker: YESNO[c.smoker[i]],
  };
}

/**
 * INVENTED surgical-site-infection registry of "Northfield General Hospital (fictional)": n operations
 * drawn from a logistic model with the known coefficients `ssiTruth` (outcome `ssi_30d`, event "yes");
 * about 2% of BMI, 1% of duration and 1% of smoker cells are then removed completely at random; finally one
 * duration is overwritten with a data-entry error (ssiSeededError) when n is large enough to hold that row.
 */
export function generateSsiRegistry(n = 2000, seed = 20240611): DemoScenario {
  const rng = demoRng(n, seed);
  const cols = newSsiColumns(n);
  const { age, bmi, dur, diab, asa, wound, timing, smoker } = cols;
  const ssi = new Int32Array(n);
  for (let i = 0; i < n; i++) {
    ssi[i] = drawOutcome(rng, ssiTruth, drawSsiCase(rng, cols, i, [0.15, 0.45, 0.32, 0.08], [0.55, 0.3, 0.1, 0.05]));
  }
  const bmiCol = numeric('bmi', bmi),
    durCol = numeric('duration_min', dur);
  const smokerCol = categorical('smoker', YESNO, smoker);
  punchMissing(rng, bmiCol, 0.02);
  punchMissing(rng, durCol, 0.01);
  punchMissing(rng, smokerCol, 0.01);
  if (n > ssiSeededError.dataRow) durCol.values[ssiSeededError.dataRow] = ssiSeededError.value;
  return demoScenario(SSI, seed, ssiTruth, [
    numeric('age', age),
    bmiCol,
    categorical('diabetes', YESNO, diab),
    categorical('asa_class', ASA, asa),
    categorical('wound_class', WOUND, wound),
    durCol,
    categorical('prophylaxis', TIMING, timing),
    smokerCol,
    categorical('ssi_30d', YESNO, ssi),
  ]);
}
