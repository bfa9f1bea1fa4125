/**
 * The TRIPOD+AI checklist page of the model-summary PDF: for each topic of the reporting checklist of Collins et al.
 * 2024 (BMJ 385:e078378), where this summary answers it (section number, title and page, read from the sections
 * actually drawn), or that the author has to complete it.
 *
 * The topic texts are Fulcra's own short paraphrases, written from memory of the topics of the published checklist
 * and grouped under the paper's section labels; they were not checked line by line against the paper, so the page
 * gives no item numbers and sends the reader to the published checklist for its wording and numbering.
 */
import type { FitResult } from '../engine/core';
import { cautionSettingOf } from './cautions';
import type { PdfLayout } from './pdfLayout';
import type { ReportInput } from './reportInput';

/** A numbered section as drawn by PdfLayout.section (number, title, page of its heading). */
export interface DrawnSection {
  number: number;
  title: string;
  page: number;
}

/** answered: this summary answers the topic; partly: it answers part and the author the rest; author: all author. */
export type TripodStatus = 'answered' | 'partly' | 'author';

/** One checklist topic: where this summary answers it and what is left for the author (null: nothing). */
export interface TripodItem {
  group: string;
  topic: string;
  status: TripodStatus;
  where: string[];
  author: string | null;
}

export const TRIPOD_CITATION =
  'Collins GS, Moons KGM, Dhiman P, et al. TRIPOD+AI statement: updated guidance for reporting clinical prediction ' +
  'models that use regression or machine learning methods. BMJ 2024;385:e078378.';

/** The title of the checklist's own section. */
export const TRIPOD_TITLE = 'TRIPOD+AI checklist: where this summary answers each topic';

/** Titles of the summary's sections, as drawn (see buildModelReport.ts). */
export const SECTION = {
  purpose: 'Purpose, setting and population',
  data: 'Data and outcome',
  predictors: 'Predictors and their handling',
  sampleSize: 'Sample size',
  method: 'Modelling method',
  equation: 'Model equation',
  odds: 'Coefficients and odds ratios',
  imputation: 'Multiple imputation (sensitivity analysis)',
  performance: 'Performance',
  plots: 'Calibration, discrimination and net benefit',
  external: 'External validation',
  influence: 'Influential rows',
  monitoring: 'Monitoring with the model',
  threshold: 'Decision threshold',
  warnings: 'Warnings',
  cautions: 'Cautions',
  glossary: 'Glossary',
} as const;

/** Sections that may be added to the summary, found by a word of their title. */
const OPTIONAL = { subgroups: /subgroup/i, comparison: /compar/i, points: /points/i } as const;

type Key = keyof typeof SECTION | keyof typeof OPTIONAL;

export const AUTHOR = 'For the author to complete';

interface Ctx {
  input: ReportInput;
  m: FitResult;
  /** "“Title” (section n, p. k): detail", or null when the summary has no such section. */
  at(key: Key, detail: string): string | null;
  has(key: Key): boolean;
  /** Whether the user typed this free-text field (the Purpose section prints it). */
  typed(field: 'purpose' | 'setting' | 'population'): boolean;
}

interface Rule {
  topic: string;
  /** Where the summary answers it (nulls for absent sections are dropped) and what the author still has to give. */
  answer(c: Ctx): { where?: (string | null)[]; author?: string | null };
}

const authorOnly =
  (author?: string): Rule['answer'] =>
  () => ({ author: author ?? null });

/** The checklist's topics in the paper's order, grouped by its sections (paraphrased; see the file comment). */
const GROUPS: { group: string; rules: Rule[] }[] = [
  {
    group: 'Title and abstract',
    rules: [
      {
        topic: 'Title says a prediction model is developed or evaluated, for whom, for what outcome, by what method',
        answer: (c) => ({
          where: [`Title block (page 1): outcome "${c.m.recipe.outcome}" = ${c.m.recipe.event}, logistic regression`],
          author: 'the title of the write-up, naming the target population',
        }),
      },
      { topic: 'Structured abstract', answer: authorOnly() },
    ],
  },
  {
    group: 'Introduction',
    rules: [
      {
        topic: 'Health-care context, why a model is needed, existing models',
        answer: authorOnly('context, rationale and models already published'),
      },
      {
        topic: 'Intended population, place in the care pathway, intended users',
        answer: (c) =>
          c.typed('population') || c.typed('setting')
            ? {
                where: [c.at('purpose', 'the population and setting as typed by the user')],
                author: 'the place in the care pathway and the intended users, if the text above does not say',
              }
            : { author: 'population, care pathway and users (not typed on the page)' },
      },
      { topic: 'Known health inequalities between groups of people', answer: authorOnly() },
      {
        topic: 'Objectives: development, evaluation or both',
        answer: (c) => ({
          where: [
            c.at('performance', 'the model is developed on these data, with its apparent performance'),
            c.at('external', 'and evaluated on a second file'),
            c.typed('purpose') ? c.at('purpose', 'the purpose as typed by the user') : null,
          ],
          author: c.typed('purpose') ? null : 'the study objectives (no purpose typed on the page)',
        }),
      },
    ],
  },
  {
    group: 'Methods: data',
    rules: [
      {
        topic: 'Source of the data (for development and for evaluation), why chosen, how representative',
        answer: (c) => ({
          where: [
            c.at('data', `file "${c.input.source.fileName}", its rows and columns`),
            c.at('external', 'the evaluation file'),
          ],
          author: 'what kind of source it is (cohort, registry, trial…), why it was chosen, how representative',
        }),
      },
      {
        topic: 'Dates: start and end of recruitment, end of follow-up',
        answer: (c) =>
          c.input.source.dateRange
            ? {
                where: [c.at('data', `date range of column "${c.input.source.dateRange.column}"`)],
                author: 'end of follow-up, if the date range does not give it',
              }
            : { author: 'study dates (no date column was given for this summary)' },
      },
      {
        topic: 'Data preparation and quality checks, and whether they were the same across groups of people',
        answer: (c) => ({
          where: [
            c.at('predictors', 'coding of each predictor'),
            c.at(
              'influence',
              c.input.diagnostics?.leftOut.length
                ? 'rows that move the model most; rows left out on request'
                : 'rows that move the model most',
            ),
          ],
          author: 'cleaning done before the data reached Fulcra, and whether it differed between groups',
        }),
      },
    ],
  },
  {
    group: 'Methods: participants',
    rules: [
      {
        topic: 'Setting (primary or hospital care, general population), number and places of centres',
        answer: (c) =>
          c.typed('setting')
            ? {
                where: [c.at('purpose', 'the setting as typed by the user')],
                author: 'number and places of centres, if the text does not say',
              }
            : { author: 'setting and centres (not typed on the page)' },
      },
      {
        topic: 'Eligibility: who was included and excluded',
        answer: (c) => ({
          where: [
            c.typed('population') ? c.at('purpose', 'the population as typed by the user') : null,
            c.at('data', 'rows used and rows left out for missing values'),
            c.input.diagnostics?.leftOut.length ? c.at('influence', 'rows left out on request') : null,
          ],
          author: 'the inclusion and exclusion criteria',
        }),
      },
      { topic: 'Treatments the participants received', answer: authorOnly() },
    ],
  },
  {
    group: 'Methods: outcome',
    rules: [
      {
        topic: 'What the outcome is, over what time, how and when it was assessed, and why',
        answer: (c) => ({
          where: [c.at('data', `outcome column "${c.m.recipe.outcome}" and the event "${c.m.recipe.event}"`)],
          author: 'the clinical definition, time horizon and how it was assessed',
        }),
      },
      { topic: 'Who assessed an outcome needing judgement (training, background)', answer: authorOnly() },
      { topic: 'Whether outcome assessors knew the predictor values', answer: authorOnly() },
    ],
  },
  {
    group: 'Methods: predictors',
    rules: [
      { topic: 'How the candidate predictors were chosen, any selection before modelling', answer: authorOnly() },
      {
        topic: 'What each predictor is, how and when it was measured, blinding to the outcome',
        answer: (c) => ({
          where: [c.at('predictors', 'each term, its type and coding'), c.at('equation', 'coding of design variables')],
          author: 'how and when each predictor was measured, and blinding',
        }),
      },
      { topic: 'Who assessed a predictor needing judgement (training, background)', answer: authorOnly() },
    ],
  },
  {
    group: 'Methods: sample size',
    rules: [
      {
        topic: 'Size of the study and how it was decided or justified',
        answer: (c) =>
          c.input.sampleSize
            ? {
                where: [
                  c.at(
                    'sampleSize',
                    'events per parameter and the minimum of Riley et al. 2020, criterion by criterion',
                  ),
                  c.at('external', 'cases in the evaluation file'),
                ],
              }
            : {
                where: [c.at('sampleSize', 'events per parameter')],
                author: 'how the size was justified (the Riley criteria were not computed for this summary)',
              },
      },
    ],
  },
  {
    group: 'Methods: missing data',
    rules: [
      {
        topic: 'How missing values were handled, and why',
        answer: (c) => ({
          where: [
            c.at('data', 'missing values by column and how they were handled'),
            c.at('imputation', 'the same model on multiply imputed data'),
          ],
          author: 'why values are missing, if known',
        }),
      },
    ],
  },
  {
    group: 'Methods: analytical methods',
    rules: [
      {
        topic: 'How the data were used: development, evaluation, any split',
        answer: (c) => ({
          where: [
            c.at(
              'performance',
              c.input.corrected
                ? 'all rows develop the model; internal validation by resampling'
                : 'all rows develop the model; apparent performance only, no internal validation',
            ),
            c.at('external', 'a second file for evaluation'),
          ],
        }),
      },
      {
        topic: 'How predictors were handled: form of continuous ones, transformations, scaling',
        answer: (c) => ({
          where: [c.at('predictors', 'linear or spline terms, knots, reference levels'), c.at('equation', 'full form')],
        }),
      },
      {
        topic: 'Type of model, why chosen, model-building steps, tuning, internal validation',
        answer: (c) => ({
          where: [
            c.at(
              'method',
              c.input.lambdaChoice ? 'method and how \u03bb was chosen' : 'fitting method and convergence',
            ),
            c.input.corrected ? c.at('performance', 'optimism-corrected performance and its method') : null,
          ],
          author: 'why this type of model was chosen',
        }),
      },
      {
        topic: 'Differences between clusters (centres, countries) and how they were handled',
        answer: (c) =>
          c.has('subgroups')
            ? { where: [c.at('subgroups', 'performance per subgroup')], author: 'how clustering was handled' }
            : { author: 'clustering and how it was handled' },
      },
      {
        topic: 'Performance measures used and why; comparison of models',
        answer: (c) => ({
          where: [
            c.at('performance', 'discrimination, calibration and Brier score with their methods'),
            c.at('plots', 'calibration curve, ROC curve, decision curve'),
            c.at('comparison', 'two models compared on the same rows'),
            c.at('glossary', 'what each measure means'),
          ],
        }),
      },
      {
        topic: 'Any updating of the model after evaluation (e.g. recalibration)',
        answer: (c) =>
          c.input.external?.recalibrated || c.input.monitoring?.recalibration
            ? {
                where: [
                  c.input.external?.recalibrated ? c.at('external', 'recalibrated for that setting') : null,
                  c.input.monitoring?.recalibration ? c.at('monitoring', 'recalibration on recent periods') : null,
                ],
              }
            : { author: 'any updating (none in this summary)' },
      },
      {
        topic: 'How predictions were calculated for evaluation',
        answer: (c) => ({
          where: [c.at('equation', 'the formula for each case\u2019s risk'), c.at('external', 'the same formula')],
        }),
      },
    ],
  },
  {
    group: 'Methods: class imbalance',
    rules: [
      {
        topic: 'Any method for an uncommon outcome (re-sampling, weighting), why, and recalibration after it',
        answer: (c) => ({
          where: [c.at('data', 'event proportion; Fulcra fits the rows as recorded, with no re-balancing')],
        }),
      },
    ],
  },
  {
    group: 'Methods: fairness',
    rules: [
      {
        topic: 'Any approach to the fairness of the model, and why',
        answer: (c) =>
          c.has('subgroups')
            ? { where: [c.at('subgroups', 'performance per subgroup')], author: 'the approach and the groups chosen' }
            : { author: 'the approach to fairness (no subgroup section in this summary)' },
      },
    ],
  },
  {
    group: 'Methods: model output',
    rules: [
      {
        topic: 'What the model outputs (risk, class), any classification, and how thresholds were chosen',
        answer: (c) => ({
          where: [
            c.at('equation', 'predicted risk'),
            c.at('threshold', 'threshold, how it was chosen and the costs'),
            c.at('points', 'integer points per predictor and the risk of each total'),
          ],
          author: c.has('threshold') ? null : 'any threshold or risk groups (no threshold in this summary)',
        }),
      },
    ],
  },
  {
    group: 'Methods: training versus evaluation',
    rules: [
      {
        topic: 'Differences between development and evaluation data (setting, eligibility, outcome, predictors)',
        answer: (c) =>
          c.has('external')
            ? { where: [c.at('external', 'the evaluation file')], author: 'how its setting and people differ' }
            : { author: 'not applicable unless the model is evaluated on other data (none in this summary)' },
      },
    ],
  },
  {
    group: 'Methods: ethical approval',
    rules: [{ topic: 'Ethics committee and consent', answer: authorOnly() }],
  },
  {
    group: 'Open science',
    rules: [
      { topic: 'Funding', answer: authorOnly() },
      { topic: 'Conflicts of interest', answer: authorOnly() },
      { topic: 'Protocol: where it is, and departures from it', answer: authorOnly() },
      { topic: 'Registration', answer: authorOnly() },
      {
        topic: 'Whether and how the data can be obtained',
        answer: () => ({
          where: ['Title block (page 1): SHA-256 checksum of the exact data'],
          author: 'whether and how the data can be obtained',
        }),
      },
      {
        topic: 'Whether and how the code can be obtained',
        answer: (c) => ({
          where: [
            `Title block (page 1): Fulcra version ${c.input.meta.fulcraVersion}` +
              (c.input.meta.seed === null ? '' : ` and random seed ${c.input.meta.seed}`),
          ],
          author: 'where the software and any own code can be obtained',
        }),
      },
    ],
  },
  {
    group: 'Patient and public involvement',
    rules: [{ topic: 'How patients and the public were involved, or that they were not', answer: authorOnly() }],
  },
  {
    group: 'Results',
    rules: [
      {
        topic: 'Flow of participants, numbers with and without the outcome, follow-up, their characteristics',
        answer: (c) => ({
          where: [c.at('data', 'rows used, events and non-events, rows left out')],
          author: 'flow diagram, follow-up and a table of characteristics',
        }),
      },
      {
        topic: 'Number of participants and outcome events in each analysis',
        answer: (c) => ({
          where: [
            c.at('data', 'the development fit'),
            c.at('imputation', 'the imputed analysis'),
            c.at('external', 'the evaluation file'),
            c.at('subgroups', 'each subgroup'),
          ],
        }),
      },
      {
        topic: 'The full model, so that anyone can calculate a prediction',
        answer: (c) => ({
          where: [
            c.at('equation', 'intercept and every coefficient'),
            c.at('odds', 'estimates with intervals'),
            c.at('points', 'the points table'),
          ],
        }),
      },
      {
        topic: 'Performance with confidence intervals, including in key subgroups',
        answer: (c) => ({
          where: [
            c.at('performance', 'with intervals'),
            c.at('threshold', 'at the threshold'),
            c.at('external', 'on the evaluation file'),
            c.at('subgroups', 'per subgroup'),
          ],
          author: c.has('subgroups') ? null : 'performance in key subgroups (no subgroup section in this summary)',
        }),
      },
      {
        topic: 'Results of any model updating',
        answer: (c) =>
          c.input.external?.recalibrated || c.input.monitoring?.recalibration
            ? {
                where: [
                  c.input.external?.recalibrated ? c.at('external', 'recalibrated model') : null,
                  c.input.monitoring?.recalibration ? c.at('monitoring', 'recalibrated model') : null,
                ],
              }
            : { author: 'any updating (none in this summary)' },
      },
    ],
  },
  {
    group: 'Discussion',
    rules: [
      { topic: 'Interpretation of the results, including fairness', answer: authorOnly() },
      {
        topic: 'Limitations (sample, size, over-fitting, missing data…)',
        answer: (c) => ({
          where: [c.at('warnings', 'what the checks found'), c.at('cautions', 'general limits')],
          author: 'the study\u2019s own limitations',
        }),
      },
      {
        topic: 'Use in practice: intended use, poor or missing inputs, who uses it and with what expertise',
        answer: (c) => ({
          where: [
            c.at('threshold', 'how a case is flagged'),
            c.at('points', 'the bedside card'),
            c.at('monitoring', 'watching the model in use'),
            c.at('cautions', 'cautions for use'),
          ],
          author: 'intended use, handling of missing inputs, users and expertise needed',
        }),
      },
      { topic: 'Implications for future research', answer: authorOnly() },
    ],
  },
];

/**
 * The checklist's topics with where this summary answers each, from the input and the sections actually drawn
 * (`sections`, in order): a topic answered only by a section that is absent is left for the author.
 */
export function tripodChecklist(input: ReportInput, sections: readonly DrawnSection[]): TripodItem[] {
  const find = (key: Key): DrawnSection | undefined => {
    if (key in OPTIONAL) {
      const re = OPTIONAL[key as keyof typeof OPTIONAL];
      return sections.find((s) => re.test(s.title));
    }
    return sections.find((s) => s.title === SECTION[key as keyof typeof SECTION]);
  };
  const typedText = input.freeText ?? {};
  const ctx: Ctx = {
    input,
    m: input.model,
    has: (key) => find(key) !== undefined,
    at: (key, detail) => {
      const s = find(key);
      return s ? `\u201c${s.title}\u201d (section ${s.number}, p. ${s.page}): ${detail}` : null;
    },
    typed: (field) => (typedText[field]?.trim().length ?? 0) > 0,
  };
  return GROUPS.flatMap(({ group, rules }) =>
    rules.map((r) => {
      const a = r.answer(ctx);
      const where = (a.where ?? []).filter((w): w is string => w !== null);
      const author = where.length === 0 ? (a.author ?? '') : (a.author ?? null);
      const status: TripodStatus = where.length === 0 ? 'author' : author === null ? 'answered' : 'partly';
      return { group, topic: r.topic, status, where, author };
    }),
  );
}

const STATUS_TEXT: Record<TripodStatus, { label: string; color: [number, number, number] }> = {
  answered: { label: 'here', color: [20, 110, 50] },
  partly: { label: 'in part', color: [150, 100, 0] },
  author: { label: 'author', color: [160, 50, 30] },
};

/** The right-hand cell: where it is answered, then what the author still has to give. */
function whereText(item: TripodItem): string {
  const lines = [...item.where];
  if (item.author !== null) lines.push(item.author === '' ? `${AUTHOR}.` : `${AUTHOR}: ${item.author}.`);
  return lines.join('\n');
}

/**
 * The checklist on a page of its own, after every other section (so that it can name them all). Call it last.
 * Clinical setting only: TRIPOD+AI is a guideline for clinical prediction models, and a quality-setting summary
 * keeps to the words of products and processes.
 */
export function tripodSection(L: PdfLayout, input: ReportInput): void {
  if (cautionSettingOf(input.cautionSetting) !== 'clinical') return;
  const items = tripodChecklist(input, L.drawnSections);
  L.newPage();
  L.section(TRIPOD_TITLE);
  const count = (s: TripodStatus) => items.filter((i) => i.status === s).length;
  L.paragraph(
    `Where this summary answers each topic of the TRIPOD+AI reporting checklist (${TRIPOD_CITATION}) ` +
      `Of ${items.length} topics, ${count('answered')} are answered here, ${count('partly')} in part and ` +
      `${count('author')} are for the author to complete (study design, ethics, funding and what Fulcra cannot ` +
      'know). The topics are short paraphrases grouped under the paper\u2019s section labels, without item ' +
      'numbers: the published checklist has the exact wording and numbering.',
    { size: 8.5 },
  );
  drawItems(L, items);
}

const COLUMNS = { topic: 64, status: 14, where: 96 };

function drawItems(L: PdfLayout, items: TripodItem[]): void {
  const size = 7.8;
  const lh = L.lineHeight(size);
  const pad = 0.9;
  const xStatus = L.left + COLUMNS.topic;
  const xWhere = xStatus + COLUMNS.status;
  const header = (): void => {
    L.setFont(size, true);
    L.doc.setFillColor(232, 238, 246);
    L.doc.rect(L.left, L.y, L.width, lh + 2 * pad, 'F');
    const ty = L.y + pad + lh * 0.78;
    L.doc.text('Topic (paraphrased)', L.left + pad, ty);
    L.doc.text('Status', xStatus + pad, ty);
    L.doc.text('Where this summary answers it', xWhere + pad, ty);
    L.y += lh + 2 * pad;
  };
  header();
  let group = '';
  for (const item of items) {
    L.setFont(size);
    const topic: string[] = L.doc.splitTextToSize(item.topic, COLUMNS.topic - 2 * pad);
    const where: string[] = whereText(item)
      .split('\n')
      .flatMap((t) => L.doc.splitTextToSize(t, COLUMNS.where - 2 * pad) as string[]);
    const h = Math.max(topic.length, where.length) * lh + 2 * pad;
    const groupH = item.group !== group ? lh + 2 * pad + 0.6 : 0;
    if (L.y + groupH + h > L.bottom) {
      L.newPage();
      header();
    }
    if (item.group !== group) {
      group = item.group;
      L.y += 0.6;
      L.setFont(size + 0.4, true);
      L.doc.setTextColor(20, 50, 90);
      L.doc.text(group, L.left + pad, L.y + pad + lh * 0.78);
      L.doc.setTextColor(0, 0, 0);
      L.y += lh + 2 * pad;
    }
    L.setFont(size);
    topic.forEach((t, k) => L.doc.text(t, L.left + pad, L.y + pad + lh * (k + 0.78)));
    const st = STATUS_TEXT[item.status];
    L.setFont(size, true);
    L.doc.setTextColor(...st.color);
    L.doc.text(st.label, xStatus + pad, L.y + pad + lh * 0.78);
    L.doc.setTextColor(0, 0, 0);
    L.setFont(size);
    where.forEach((t, k) => L.doc.text(t, xWhere + pad, L.y + pad + lh * (k + 0.78)));
    L.y += h;
    L.doc.setDrawColor(200, 200, 200);
    L.doc.setLineWidth(0.1);
    L.doc.line(L.left, L.y, L.right, L.y);
  }
  L.y += 3;
}
