import { useId } from 'react';
import { useApp, useEnv } from '../context';
import { ExplainList } from '../Explain';
import { count, num, plural } from '../format';
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
          {ext.sameCases && (
            <p className="outside-data" role="alert" data-testid="external-same">
              <strong>Not an external validation: </strong>this file holds the same cases the model was fitted on. The
              numbers below only repeat the fit (a recalibration of intercept 0 and slope 1 is what refitting on the
              same cases always gives). Check the model on cases from another time, place or population.
            </p>
          )}
          {!ext.sameCases && ext.sharedCases > 0 && (
            <p className="outside-data" role="alert" data-testid="external-same">
              <strong>Partly the development data: </strong>
              {count(ext.sharedCases)} of the {count(ext.n)} cases in this file are also cases the model was fitted on,
              so this check is optimistic.
            </p>
          )}
          <p>
            {plural(ext.n, 'case')}. AUC {num(ext.performance.auc, 3)} ({num(ext.performance.aucLower, 3)} to{' '}
            {num(ext.performance.aucUpper, 3)}), calibration slope {num(ext.performance.calSlope, 3)},
            calibration-in-the-large {num(ext.performance.calInLarge, 3)}, Brier {num(ext.performance.brier, 4)}.
          </p>
          {ext.recalibration && (
            <p>
              Recalibrated for this setting: new intercept {num(ext.recalibration.intercept, 3)}, slope{' '}
              {num(ext.recalibration.slope, 3)} on the linear predictor.
            </p>
          )}
          <ExplainList terms={['externalValidation', 'recalibration']} />
          <PerformancePlots perf={ext.performance} />
        </div>
      )}
    </section>
  );
}
