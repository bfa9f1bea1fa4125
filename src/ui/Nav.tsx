import type { ViewId } from '../state/appState';
import { useApp, useEnv } from './context';

const VIEWS: { id: ViewId; label: string; needsFit: boolean }[] = [
  { id: 'data', label: 'Data & roles', needsFit: false },
  { id: 'model', label: 'Odds ratios', needsFit: false },
  { id: 'models', label: 'Models & comparison', needsFit: true },
  { id: 'influence', label: 'Influential rows', needsFit: true },
  { id: 'shape', label: 'Risk curve & loss', needsFit: true },
  { id: 'performance', label: 'Discrimination & calibration', needsFit: true },
  { id: 'subgroups', label: 'Subgroups', needsFit: true },
  { id: 'cutoff', label: 'Cut-off & costs', needsFit: true },
  { id: 'score', label: 'Score & validate', needsFit: true },
  { id: 'points', label: 'Bedside points card', needsFit: true },
  { id: 'monitor', label: 'Monitor later cases', needsFit: false },
];

export function Nav() {
  const { ctl } = useEnv();
  const view = useApp((s) => s.view);
  const quality = useApp((s) => s.reportText.cautions === 'quality');
  const fitted = useApp((s) => s.fit !== null);
  const hasData = useApp((s) => s.data !== null);
  // Monitoring needs a model: the current fit or a model file opened on the page (which needs no data).
  const modelAtHand = useApp((s) => s.fit !== null || s.openedModel !== null);
  return (
    <nav aria-label="Workbench views" className="side">
      <ul>
        {VIEWS.map((v) => (
          <li key={v.id}>
            <button
              type="button"
              aria-current={view === v.id ? 'page' : undefined}
              disabled={v.id === 'monitor' ? !modelAtHand : (v.needsFit && !fitted) || !hasData}
              onClick={() => ctl.show(v.id)}
            >
              {v.label}
            </button>
          </li>
        ))}
      </ul>
      <p className="caution-mini">
        {quality
          ? 'Not a validated measuring or control system. Follow your quality system and local procedures.'
          : 'Not a medical device. Follow local governance and licensed clinical judgement.'}
      </p>
    </nav>
  );
}
