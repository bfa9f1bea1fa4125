import { useId } from 'react';
import { useApp, useEnv } from '../context';
import { count, num } from '../format';
import { PerformancePlots } from './PerformancePlots';

/** The model checked on a second file with known outcomes, with the recalibrated models. */
export function ExternalCheck() {
  const { ctl } = useEnv();
  const id = useId();
  const ext = useApp((s) => s.external);
  return (
    <section aria-labelledby={`${id}-h`}>
      <h2 id={`${id}-h`}>Check the model on a new file (external validation)</h2>
      <label className="button-like" htmlFor={`${id}-f`}>
        Choose a file with known outcomes
      </label>
      <input
        id={`${id}-f`}
        type="file"
        className="visually-hidden"
        accept=".csv,.tsv,.txt,.xlsx"
        onChange={(e) => {
          const f = e.target.files?.[0];
          if (f) void ctl.externalValidate(f);
          e.target.value = '';
        }}
      />
      {ext && (
        <div data-testid="external-result">
          <p>
            {count(ext.n)} cases. AUC {num(ext.performance.auc, 3)} ({num(ext.performance.aucLower, 3)} to{' '}
            {num(ext.performance.aucUpper, 3)}), calibration slope {num(ext.performance.calSlope, 3)},
            calibration-in-the-large {num(ext.performance.calInLarge, 3)}, Brier {num(ext.performance.brier, 4)}.
          </p>
          {ext.recalibration && (
            <p>
              Recalibrated for this setting: new intercept {num(ext.recalibration.intercept, 3)}, slope{' '}
              {num(ext.recalibration.slope, 3)} on the linear predictor.
            </p>
          )}
          <PerformancePlots perf={ext.performance} />
        </div>
      )}
    </section>
  );
}
