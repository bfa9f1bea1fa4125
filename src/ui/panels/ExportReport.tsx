import { useId } from 'react';
import { setReportText } from '../../state/actions';
import type { ReportText } from '../../worker/protocol';
import { useApp, useEnv } from '../context';
import { pct } from '../format';
import { downloadFile, suggestedFileName } from '../download';

const FIELDS: { key: keyof ReportText; label: string }[] = [
  { key: 'purpose', label: 'Purpose of the model' },
  { key: 'setting', label: 'Setting (where and when the data come from)' },
  { key: 'population', label: 'Population (which cases are included)' },
  { key: 'notes', label: 'Notes for the committee' },
];

/** Downloads the model-summary PDF (built in the worker) for a governance committee. */
export function ExportReport() {
  const { ctl, store } = useEnv();
  const id = useId();
  const outcome = useApp((s) => s.fit?.fit.recipe.outcome ?? 'model');
  const t = useApp((s) => s.threshold);
  const costsSet = useApp((s) => s.costsSetByUser);
  const validated = useApp((s) => s.validationStatus === 'done');
  const text = useApp((s) => s.reportText);
  const run = async () => {
    const bytes = await ctl.modelReport(text);
    if (bytes) downloadFile(bytes, suggestedFileName('model-summary', outcome), 'application/pdf');
  };
  return (
    <section className="export" aria-label="Model summary for a governance committee">
      <details>
        <summary>Your words for the summary: purpose, setting, population, notes</summary>
        <div className="report-text">
          {FIELDS.map((f) => (
            <label key={f.key} htmlFor={`${id}-${f.key}`}>
              {f.label}
              <textarea
                id={`${id}-${f.key}`}
                rows={2}
                value={text[f.key] ?? ''}
                onChange={(e) => store.apply(setReportText, { [f.key]: e.target.value })}
              />
            </label>
          ))}
        </div>
      </details>
      <div className="row">
        <button type="button" onClick={() => void run()}>
          Download the model summary (PDF)
        </button>
        <button
          type="button"
          onClick={() =>
            void ctl
              .modelFile(text)
              .then((t) => t && downloadFile(t, suggestedFileName('model', outcome), 'application/json'))
          }
        >
          Save the model file (JSON)
        </button>
        <button
          type="button"
          onClick={() =>
            void ctl.pmml().then((t) => t && downloadFile(t, suggestedFileName('pmml', outcome), 'application/xml'))
          }
        >
          Save as PMML
        </button>
      </div>
      <span className="hint">
        {' '}
        Includes the equation, odds ratios, performance
        {validated
          ? ' with the bootstrap correction'
          : ' (run bootstrap validation first to include optimism-corrected values)'}
        , plots, the cut-off of {pct(t)} with {costsSet ? 'its costs' : 'the default costs (10 : 1, not set by you)'},
        warnings and cautions.
      </span>
    </section>
  );
}
