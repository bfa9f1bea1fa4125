import { atThreshold, costThresholds, decisionTheoryThreshold } from '../engine/evaluation';
import { datasetChecksum } from '../io/export/checksum';
import { createModelFile, modelFileToJson } from '../io/export/modelFile';
import { modelToPmml } from '../io/export/pmml';
import { buildModelReport } from '../report/buildModelReport';
import { cutoffRuleText } from '../report/cutoffRule';
import { cautionSettingOf } from '../report/cautions';
import { reportInputFromRecords } from '../report/fromEngine';
import type { MonitoringReport } from '../report/reportSectionMonitoring';
import { cooksForReport } from '../report/reportSectionDiagnostics';
import { FULCRA_VERSION } from '../report/version';
import type { Costs, CutoffOrigin, ReportRequestText, ReportText } from './protocol';
import { requireData, requireFit, requireRecord, type Session } from './session';
import { currentPoints } from './pointsOps';
import { subgroupsForReport } from './subgroupOps';
import { comparisonForReport } from './compareOps';

/**
 * The model-summary PDF of the current model, built in the worker from the engine's own records (fit,
 * evaluation, bootstrap validation when run, sample-size check) with the cut-off and costs chosen on the page,
 * saying how the cut-off was set and whether the costs are the default (`origin`; without it: set by hand), and
 * the monitoring of later cases when the page has a current result (`monitoring`).
 */
export function modelReport(
  s: Session,
  costs: Costs,
  threshold: number,
  created: string,
  text: ReportRequestText = {},
  origin: CutoffOrigin = { how: 'hand', costsSetByUser: true },
  monitoring?: MonitoringReport,
): Uint8Array {
  const record = requireRecord(s);
  const data = requireData(s);
  const evaluation = s.prepared
    ? { ...record.evaluation, prepared: null, atThreshold: atThreshold(s.prepared, threshold, { costs }) }
    : undefined;
  const lam = record.lambda;
  const lambdaChoice =
    lam && lam.rule !== 'fixed'
      ? `${lam.folds}-fold cross-validation over 100 values of λ, ` +
        (lam.rule === 'cv-1se' ? 'one-standard-error rule' : 'lowest cross-validated deviance')
      : undefined;
  const input = reportInputFromRecords({
    meta: {
      fulcraVersion: FULCRA_VERSION,
      created,
      seed: record.validation?.seed ?? (lambdaChoice ? record.request.seed : null),
      dataChecksum: datasetChecksum(data),
    },
    source: { fileName: s.summary?.source.name ?? 'data', rows: data.nRows, columns: data.columns.length },
    freeText: {
      purpose: text.purpose,
      setting: text.setting,
      population: text.population,
      notes: [s.summary?.source.notice, text.notes].filter(Boolean).join(' ') || undefined,
    },
    cautionSetting: cautionSettingOf(text.cautions),
    oddsUnits: text.oddsUnits,
    fit: record.fit,
    layout: record.layout ?? undefined,
    evaluation,
    validation: record.validation ?? undefined,
    sampleSize: record.sampleSize ?? undefined,
    costs,
    costsSetByUser: origin.costsSetByUser,
    thresholdRule: cutoffRuleText({
      how: origin.how,
      threshold,
      costs,
      costBased: decisionTheoryThreshold(costs),
      cheapest: s.prepared ? costThresholds(s.prepared, costs).empirical.threshold : null,
    }),
    lambdaChoice,
    imputation: s.imputed ? { ...s.imputed, columns: s.imputed.imputedColumns } : undefined,
    diagnostics: record.diagnostics
      ? {
          summary: record.diagnostics,
          leftOut: record.request.leaveOut ?? [],
          cooks:
            s.diagnostics?.fit === record.fit && s.diagnostics.rows.cooks
              ? cooksForReport(s.diagnostics.rows.sheetRows, s.diagnostics.rows.cooks)
              : null,
        }
      : undefined,
    external: record.external ?? undefined,
    monitoring,
    points: currentPoints(s),
    warnings: s.imputed?.warnings,
  });
  const subgroups = subgroupsForReport(s, threshold);
  const comparison = comparisonForReport(s);
  return buildModelReport({ ...input, ...(subgroups ? { subgroups } : {}), ...(comparison ? { comparison } : {}) });
}

/** The versioned model file (JSON) of the current model, with the cut-off and costs chosen on the page. */
export function modelFileText(
  s: Session,
  costs: Costs,
  threshold: number,
  created: string,
  text: ReportText = {},
): string {
  const fit = requireFit(s);
  const data = requireData(s);
  return modelFileToJson(
    createModelFile(fit, {
      fulcraVersion: FULCRA_VERSION,
      created,
      dataChecksum: datasetChecksum(data),
      fileName: s.summary?.source.name ?? null,
      rows: data.nRows,
      threshold: { value: threshold, costMissedCase: costs.missedCase, costFalseAlarm: costs.falseAlarm },
      notes: { purpose: text.purpose, setting: text.setting, population: text.population, notes: text.notes },
      rowsLeftOut: requireRecord(s).request.leaveOut ?? [],
      points: currentPoints(s)?.score,
    }),
  );
}

/** The current model as PMML 4.4 (for other scoring systems). */
export function pmmlText(s: Session, created: string): string {
  const fit = requireFit(s);
  const outcome = s.data?.columns.find((c) => c.name === fit.recipe.outcome);
  return modelToPmml(fit, {
    fulcraVersion: FULCRA_VERSION,
    created,
    outcomeLevels: outcome?.kind === 'categorical' ? outcome.levels : undefined,
  });
}
