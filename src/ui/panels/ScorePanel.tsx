import { Caution } from '../Caution';
import { ExportReport } from './ExportReport';
import { BatchScore } from './BatchScore';
import { ExternalCheck } from './ExternalCheck';
import { OneCase } from './OneCase';
import { StaleBanner } from '../StaleBanner';

export function ScorePanel() {
  return (
    <div className="panel score-panel">
      <StaleBanner />
      <div className="cols">
        <OneCase />
        <div>
          <BatchScore />
          <ExternalCheck />
        </div>
      </div>
      <ExportReport />
      <Caution external />
    </div>
  );
}
