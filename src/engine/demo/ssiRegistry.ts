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

const ASA = ['I', 'II', 'III', 'IV'];
const WOUND = ['clean', 'clean-contaminated', 'contaminated', 'dirty'];
const TIMING = ['on time', 'late', 'none'];
const YESNO = ['no', 'yes'];

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

/**
 * INVENTED surgical-site-infection registry of "Northfield General Hospital (fictional)": n operations
 * drawn from a logistic model with the known coefficients `ssiTruth` (outcome `ssi_30d`, event "yes");
 * about 2% of BMI, 1% of duration and 1% of smoker cells are then removed completely at random; finally one
 * duration is overwritten with a data-entry error (ssiSeededError) when n is large enough to hold that row.
 */
export function generateSsiRegistry(n = 2000, seed = 20240611): DemoScenario {
  const rng = demoRng(n, seed);
  const [age, bmi, dur] = newColumns(3, () => new Float64Array(n));
  const [diab, asa, wound, timing, smoker, ssi] = newColumns(6, () => new Int32Array(n));
  for (let i = 0; i < n; i++) {
    age[i] = Math.round(clamp(60 + 14 * rng.normal(), 18, 95));
    bmi[i] = round(clamp(28 + 5 * rng.normal(), 16, 55), 1);
    asa[i] = drawLevel(rng, [0.15, 0.45, 0.32, 0.08]);
    diab[i] = rng.next() < 0.1 + 0.05 * asa[i] ? 1 : 0;
    wound[i] = drawLevel(rng, [0.55, 0.3, 0.1, 0.05]);
    dur[i] = Math.round(clamp(120 * Math.exp(0.45 * rng.normal()), 20, 600));
    timing[i] = drawLevel(rng, [0.8, 0.12, 0.08]);
    smoker[i] = rng.next() < 0.2 ? 1 : 0;
    const row = {
      age: age[i],
      bmi: bmi[i],
      diabetes: YESNO[diab[i]],
      asa_class: ASA[asa[i]],
      wound_class: WOUND[wound[i]],
      duration_min: dur[i],
      prophylaxis: TIMING[timing[i]],
      smoker: YESNO[smoker[i]],
    };
    ssi[i] = drawOutcome(rng, ssiTruth, row);
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
