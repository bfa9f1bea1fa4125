/**
 * A monitoring report on its own (issue 15: "or a separate monitoring PDF"): for a model opened from a model file,
 * which has no model summary on this page, or for handing the monitoring to a quality committee alone. The same
 * section as in the model summary (reportSectionMonitoring.ts), with the glossary lines it uses. Pure: no DOM.
 */
import type { CautionSetting } from './cautions';
import { GLOSSARY, type GlossaryTerm } from './glossary';
import { PdfLayout } from './pdfLayout';
import { monitoringSection, type MonitoringReport } from './reportSectionMonitoring';

export interface MonitoringReportInput {
  monitoring: MonitoringReport;
  meta: { fulcraVersion: string; created: string };
  cautionSetting?: CautionSetting;
}

const TERMS: GlossaryTerm[] = [
  'observedExpected',
  'funnelPlot',
  'cusum',
  'arl',
  'cumulativeOMinusE',
  'calibrationInTheLarge',
  'calibrationSlope',
  'recalibration',
  'confidenceInterval',
];

export function buildMonitoringReport(input: MonitoringReportInput): Uint8Array {
  const L = new PdfLayout();
  const r = input.monitoring.record;
  const created = new Date(input.meta.created);
  if (!Number.isNaN(created.getTime())) L.doc.setCreationDate(created);
  L.doc.setProperties({
    title: `Monitoring: ${r.model.outcome}`,
    creator: `Fulcra ${input.meta.fulcraVersion}`,
    subject: 'Risk-adjusted monitoring of later cases with a logistic regression model',
  });
  L.setFont(17, true);
  L.doc.setTextColor(20, 50, 90);
  L.doc.text(`Monitoring "${r.model.outcome}" = ${r.model.event} with the model`, L.left, L.y + 6);
  L.doc.setTextColor(0, 0, 0);
  L.y += 10;
  L.paragraph(
    `Observed against expected events by unit and over time, prepared with Fulcra ${input.meta.fulcraVersion} on ` +
      `${Number.isNaN(created.getTime()) ? input.meta.created : created.toISOString().slice(0, 10)}.`,
    { size: 9.5, color: [80, 80, 80] },
  );
  monitoringSection(L, input.monitoring, input.cautionSetting ?? 'clinical', true);
  L.section('Glossary');
  for (const t of TERMS) L.bullet(`${GLOSSARY[t].label}: ${GLOSSARY[t].text}`, 8.5);
  L.footer(`Fulcra ${input.meta.fulcraVersion} \u00b7 monitoring \u00b7 model: ${r.model.name}`);
  return new Uint8Array(L.doc.output('arraybuffer'));
}
