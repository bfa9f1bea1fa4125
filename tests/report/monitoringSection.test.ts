import { execFileSync } from 'node:child_process';
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { unitSignals } from '../../src/engine/monitoring';
import { buildModelReport } from '../../src/report/buildModelReport';
import { buildMonitoringReport } from '../../src/report/buildMonitoringReport';
import { MONITORING_CAUTIONS } from '../../src/report/cautions';
import { GLOSSARY } from '../../src/report/glossary';
import { formatFixed } from '../../src/report/format';
import type { ReportInput } from '../../src/report/reportInput';
import { birthwtReportInput } from './birthwtRecord';
import { monitoringRecord } from './monitoringRecord';

const dir = mkdtempSync(join(tmpdir(), 'fulcra-monitoring-pdf-'));
const squash = (s: string) => s.replace(/\s+/g, ' ');

/** The PDF's text (pdftotext from poppler-utils; `-layout` keeps a label and its value on one line). */
function pdfText(bytes: Uint8Array, name: string, layout = false): string {
  const path = join(dir, `${name}.pdf`);
  writeFileSync(path, bytes);
  const args = ['-enc', 'UTF-8', ...(layout ? ['-layout'] : []), path, '-'];
  return squash(execFileSync('pdftotext', args, { encoding: 'utf8' }));
}

let input: ReportInput;
const m = monitoringRecord({ overdispersion: true });
beforeAll(async () => {
  input = await birthwtReportInput();
});

describe('the monitoring section of the model summary', () => {
  it('is absent without a monitoring result', () => {
    expect(pdfText(buildModelReport(input), 'none')).not.toContain('Monitoring with the model');
  });

  it('prints the overall numbers, the limits and parameters used, the run lengths and the cautions', () => {
    const r = m.record;
    const text = pdfText(buildModelReport({ ...input, monitoring: m }), 'monitoring', true);
    const section = text.slice(text.indexOf('Monitoring with the model'));
    expect(section).toContain(`Observed events (O) ${r.overall.observed}`);
    expect(section).toContain(`Expected events (E) ${formatFixed(r.overall.expected, 1)}`);
    expect(section).toContain(
      `O/E (95% exact CI) ${formatFixed(r.overall.oe.estimate, 2)} (${formatFixed(r.overall.oe.lower, 2)} to ` +
        `${formatFixed(r.overall.oe.upper, 2)})`,
    );
    expect(section).toContain('funnel limits 95% and 99.8% (exact Poisson, Spiegelhalter 2005)');
    expect(section).toContain('target in-control run length 500');
    expect(section).toContain(`h = ${formatFixed(r.cusum.deteriorate.h, 3)}`);
    expect(section).toContain(`h = ${formatFixed(r.cusum.improve.h, 3)}`);
    expect(section).toContain(`Overdispersion: \u03c6 = ${formatFixed(r.funnel!.overdispersion!.phi, 2)}`);
    const own = unitSignals(r);
    if (own.length === 0) expect(section).toContain('No unit\u2019s own chart signalled');
    else {
      expect(section).toContain('Signals on each unit\u2019s own chart');
      for (const g of own.slice(0, 5)) expect(section).toContain(g.s.dateLabel);
    }
    expect(section).toContain('Calibration drift by month');
    for (const p of r.periods) expect(section).toContain(p.label);
    expect(section).toContain(`Recalibrated on the latest 3 periods (${m.recalibration.periods.join(', ')}`);
    for (const c of MONITORING_CAUTIONS.clinical) expect(section).toContain(squash(c));
  });

  it('words the cautions for a quality setting', () => {
    const text = pdfText(buildModelReport({ ...input, monitoring: m, cautionSetting: 'quality' }), 'quality');
    for (const c of MONITORING_CAUTIONS.quality) expect(text).toContain(squash(c));
    expect(text).not.toContain(squash(MONITORING_CAUTIONS.clinical[0]));
  });

  it('explains O/E, the funnel plot, CUSUM, ARL and cumulative O − E in the glossary', () => {
    const text = pdfText(buildModelReport({ ...input, monitoring: m }), 'glossary');
    const glossary = text.slice(text.search(/\d+\. Glossary/));
    for (const k of ['observedExpected', 'funnelPlot', 'cusum', 'arl', 'cumulativeOMinusE'] as const)
      expect(glossary).toContain(squash(GLOSSARY[k].text));
  });

  it('draws the plots as vectors (no images) and writes the page images for review', () => {
    const bytes = buildModelReport({ ...input, monitoring: m });
    const path = join(dir, 'review.pdf');
    writeFileSync(path, bytes);
    expect(Buffer.from(bytes).toString('latin1')).not.toMatch(/\/Subtype\s*\/Image/);
    writeFileSync('/tmp/fulcra-monitoring-review.pdf', bytes);
  });

  it('also stands alone as a monitoring report (for a model opened from a file), with its glossary lines', () => {
    const bytes = buildMonitoringReport({
      monitoring: m,
      meta: { fulcraVersion: '0.1.0', created: '2026-12-04T05:00:00Z' },
      cautionSetting: 'quality',
    });
    const text = pdfText(bytes, 'alone', true);
    expect(text).toContain('Monitoring "ssi_30d" = yes with the model');
    expect(text).toContain('1. Monitoring with the model');
    expect(text).toContain('Model: the current fit (outcome');
    expect(text).toContain(`Observed events (O) ${m.record.overall.observed}`);
    for (const c of MONITORING_CAUTIONS.quality) expect(text).toContain(squash(c));
    expect(text).toContain(squash(GLOSSARY.cusum.text));
    expect(text).not.toContain(squash(GLOSSARY.auc.text));
    writeFileSync('/tmp/fulcra-monitoring-alone.pdf', bytes);
  });
});
