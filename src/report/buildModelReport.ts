import { PdfLayout } from './pdfLayout';
import type { ReportInput } from './reportInput';
import {
  dataSection,
  equation,
  imputation,
  method,
  oddsRatios,
  predictors,
  purpose,
  sampleSize,
} from './reportSectionsModel';
import { cautions, cautionsHeight, performance, plots, threshold, warningsSection } from './reportSectionsResults';
import { externalSection } from './reportSectionExternal';
import { diagnosticsSection } from './reportSectionDiagnostics';
import { comparisonSection } from './reportSectionComparison';
import { subgroupsSection } from './reportSectionSubgroups';
import { glossarySection } from './reportSectionGlossary';
import { monitoringSection } from './reportSectionMonitoring';
import { pointsSection } from './pointsCardPdf';
import { tripodSection } from './reportSectionTripod';

export { REPORT_CAUTIONS } from './reportSectionsResults';

/**
 * Builds the model-summary PDF (A4, vector plots, embedded Liberation Sans) as bytes. Pure: no DOM, runs in
 * Node and the browser. Content follows the TRIPOD items the workbench knows (Collins et al. 2015, BMJ
 * 350:g7594; TRIPOD+AI, BMJ 2024;385:e078378): source of data, outcome, predictors and coding, sample size,
 * missing data (with the multiple-imputation sensitivity analysis when run), modelling method, full equation, odds
 * ratios, performance, threshold, warnings and cautions.
 */
export function buildModelReport(input: ReportInput): Uint8Array {
  const L = new PdfLayout();
  const m = input.model;
  const created = new Date(input.meta.created);
  if (!Number.isNaN(created.getTime())) L.doc.setCreationDate(created);
  L.doc.setProperties({
    title: input.meta.title ?? `Model summary: ${m.recipe.outcome}`,
    creator: `Fulcra ${input.meta.fulcraVersion}`,
    subject: 'Logistic regression risk model summary',
  });

  titleBlock(L, input);
  purpose(L, input);
  dataSection(L, input);
  predictors(L, m);
  sampleSize(L, input);
  method(L, input);
  equation(L, m);
  oddsRatios(L, m, input.oddsUnits);
  imputation(L, input);
  performance(L, input);
  plots(L, input);
  externalSection(L, input.external);
  diagnosticsSection(L, input.diagnostics);
  comparisonSection(L, input.comparison);
  subgroupsSection(L, input.subgroups);
  monitoringSection(L, input.monitoring, input.cautionSetting ?? 'clinical');
  pointsSection(L, input.points, input.meta);
  threshold(L, input);
  warningsSection(L, [...m.warnings, ...(input.warnings ?? [])], cautionsHeight(L, input.cautionSetting));
  cautions(L, input.cautionSetting);
  glossarySection(L);
  tripodSection(L, input); // last: it names the sections drawn above

  L.footer(
    `Fulcra ${input.meta.fulcraVersion} \u00b7 model summary \u00b7 ${dateText(input.meta.created)} \u00b7 ` +
      `data SHA-256 ${input.meta.dataChecksum.slice(0, 12)}\u2026`,
  );
  return new Uint8Array(L.doc.output('arraybuffer'));
}

function dateText(iso: string): string {
  const d = new Date(iso);
  return Number.isNaN(d.getTime()) ? iso : d.toISOString().slice(0, 10);
}

function titleBlock(L: PdfLayout, input: ReportInput): void {
  const m = input.model;
  L.setFont(17, true);
  L.doc.setTextColor(20, 50, 90);
  const lay = m.recipe.layout;
  const title =
    lay && lay.kind !== 'binary'
      ? `Risk model for "${m.recipe.outcome}" ${lay.kind === 'events-trials' ? 'out of' : 'against'} ` +
        `"${lay.kind === 'events-trials' ? lay.trials : lay.nonEvents}"`
      : `Risk model for "${m.recipe.outcome}" = ${m.recipe.event}`;
  L.doc.text(input.meta.title ?? title, L.left, L.y + 6);
  L.doc.setTextColor(0, 0, 0);
  L.y += 10;
  L.paragraph('Logistic regression model summary, prepared with Fulcra for review by a governance committee.', {
    size: 9.5,
    color: [80, 80, 80],
  });
  L.keyValues(
    [
      ['Report date', new Date(input.meta.created).toISOString().replace('T', ' ').slice(0, 16) + ' UTC'],
      ['Fulcra version', input.meta.fulcraVersion],
      ['Random seed', input.meta.seed === null ? 'none used' : String(input.meta.seed)],
      ['Data checksum', `SHA-256 ${input.meta.dataChecksum}`],
    ],
    36,
    8.5,
  );
}
