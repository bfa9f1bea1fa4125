import { useEnv } from '../context';
import { OpenData } from './OpenData';
import { OpenModel } from './OpenModel';

export function StartPanel() {
  const { ctl } = useEnv();
  return (
    <div className="start">
      <h2>Start with an invented example, or open your own spreadsheet</h2>
      <p>
        All three examples are invented by a seeded simulation with known true coefficients, so you can see whether the
        fitted model recovers them. No real patients, no real plant.
      </p>
      <div className="demo-cards">
        <button type="button" className="demo" onClick={() => void ctl.startDemo('ssi')}>
          <strong>Surgical-site infections</strong>
          <span>
            Northfield General Hospital (fictional): 2,000 invented operations — age, BMI, diabetes, ASA class, wound
            class, duration, antibiotic timing, smoking; outcome: infection within 30 days.
          </span>
        </button>
        <button type="button" className="demo" onClick={() => void ctl.startDemo('seals')}>
          <strong>Heat-seal failures</strong>
          <span>
            A fictional packaging plant: 5,000 invented seals — temperature, dwell time, pressure, film lot, line,
            humidity; outcome: seal failure.
          </span>
        </button>
        <button type="button" className="demo" onClick={() => void ctl.startDemo('ssi-counts')}>
          <strong>Infections by ward and month</strong>
          <span>
            The same fictional hospital as a table of counts: 144 invented ward-month rows with the number of operations
            and of infections — ward, month, wound class; one row stands for many operations.
          </span>
        </button>
      </div>
      <OpenData />
      <h3>Or monitor later cases with a saved model</h3>
      <OpenModel />
      <aside className="caution">
        Fulcra is not a medical device. Internal validation is not external validation; recalibrate before using a model
        elsewhere, and follow local governance and licensed clinical judgement.
      </aside>
    </div>
  );
}
