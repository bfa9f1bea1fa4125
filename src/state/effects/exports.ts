/** Files out: the model summary PDF, the model file, PMML and the workspace file. */
import type { ReportText } from '../../worker/protocol';
import * as A from '../actions';
import type { AppState } from '../appState';
import { isMonitorStale } from '../monitorActions';
import { isStale } from '../stale';
import { toWorkspace } from '../workspace';
import type { EffectContext } from './context';
import type { DataEffects } from './data';

export interface ExportEffects {
  /** The model-summary PDF bytes of the current model (built in the worker). */
  modelReport(text: ReportText): Promise<Uint8Array | undefined>;
  /** The model file (JSON text) or PMML of the current model. */
  modelFile(text: ReportText): Promise<string | undefined>;
  pmml(): Promise<string | undefined>;
  /** The whole workspace as a gzip file, with its suggested name; undefined when no data are loaded. */
  workspaceFile(version: string): Promise<{ bytes: Uint8Array; name: string } | undefined>;
}

/** The monitoring result shown, when it is up to date (the PDF prints it), with its recalibration. */
function currentMonitoring(s: AppState) {
  const r = s.monitor.result;
  return r && !isMonitorStale(s) ? { record: r.record, recalibration: s.monitor.recalibration } : undefined;
}

/** What an export of a model fitted for other settings is refused with (the notice offers to refit). */
export const STALE_EXPORT =
  'The model settings changed after this fit, so this file would describe the previous model: nothing was saved.';

export function filesOut({ store, client, s, job }: EffectContext, data: Pick<DataEffects, 'held'>): ExportEffects {
  const now = () => new Date().toISOString();
  /** Refuses (with a notice offering to refit) when the model shown is out of date. */
  const current = (what: string): boolean => {
    if (!isStale(s())) return true;
    store.apply(A.notify, {
      kind: 'error',
      text: STALE_EXPORT,
      suggestion: `Refit the model, then save the ${what} again.`,
      action: 'refit',
      code: A.STALE_EXPORT_CODE,
    });
    return false;
  };
  return {
    modelReport: async (text) =>
      current('model summary')
        ? job('Writing the model summary', false, () =>
            client.call((api) =>
              api.modelReport(
                s().costs,
                s().threshold,
                now(),
                { ...text, oddsUnits: s().oddsUnits },
                {
                  how: s().cutoffHow,
                  costsSetByUser: s().costsSetByUser,
                },
                currentMonitoring(s()),
              ),
            ),
          )
        : undefined,
    modelFile: async (text) =>
      current('model file') ? client.call((api) => api.modelFile(s().costs, s().threshold, now(), text)) : undefined,
    pmml: async () => (current('PMML file') ? client.call((api) => api.pmml(now())) : undefined),
    async workspaceFile(version) {
      const held = data.held();
      if (!held || !s().data) return undefined;
      const bytes = await client.call((api) => api.workspaceFile(toWorkspace(s(), held, false), version));
      if (!bytes) return undefined;
      const stem = (s().outcome ?? held.summary.source.name).replace(/[^\p{L}\p{N}_-]+/gu, '_').slice(0, 40) || 'data';
      return { bytes, name: `fulcra-workspace-${stem}-${now().slice(0, 10)}.fulcra-workspace.json.gz` };
    },
  };
}
