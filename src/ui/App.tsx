import { notify, workerLost } from '../state/actions';
import { createAutosave } from '../state/autosave';
import { createController, type Controller } from '../state/controller';
import { createStore } from '../state/store';
import { EnvContext, useApp, type Env } from './context';
import { Header } from './Header';
import { JobBar } from './JobBar';
import { Nav } from './Nav';
import { NoticeArea } from './NoticeArea';
import { CutoffPanel } from './panels/CutoffPanel';
import { DataPanel } from './panels/DataPanel';
import { ModelPanel } from './panels/ModelPanel';
import { ModelsPanel } from './panels/ModelsPanel';
import { InfluencePanel } from './panels/InfluencePanel';
import { PerformancePanel } from './panels/PerformancePanel';
import { MonitorPanel } from './panels/MonitorPanel';
import { ScorePanel } from './panels/ScorePanel';
import { ShapePanel } from './panels/ShapePanel';
import { StartPanel } from './panels/StartPanel';
import { SubgroupPanel } from './panels/SubgroupPanel';
import { PointsPanel } from './panels/PointsPanel';
import { FULCRA_VERSION } from '../report/version';
import { createWorkerClient } from '../bridge/workerClient';

/**
 * One store, one worker, one controller and one autosave for the page's lifetime (created once, also under
 * StrictMode). On start the work kept in this browser is restored, then every change is kept again.
 */
let pageEnv: Env | null = null;
function getPageEnv(): Env {
  if (!pageEnv) {
    const store = createStore();
    let ctl: Controller | null = null;
    const client = createWorkerClient({
      onError: (text, suggestion) => store.apply(notify, { kind: 'error', text, suggestion }),
      onCrash: (text) => {
        if (ctl) void ctl.recover(text);
        else store.apply(workerLost, text);
      },
    });
    ctl = createController(store, client);
    pageEnv = { store, ctl };
    const autosave = createAutosave(store, ctl, { version: FULCRA_VERSION });
    void autosave.restore().finally(() => autosave.start());
    document.addEventListener('visibilitychange', () => {
      if (document.visibilityState === 'hidden') void autosave.flush();
    });
    if (new URLSearchParams(location.search).has('testhooks')) {
      (window as unknown as { fulcraTestHooks: unknown }).fulcraTestHooks = {
        crashEngine: () => client.call((api) => api.crashForTest()),
      };
    }
  }
  return pageEnv;
}

export function App() {
  return (
    <EnvContext.Provider value={getPageEnv()}>
      <Shell />
    </EnvContext.Provider>
  );
}

function Shell() {
  const hasData = useApp((s) => s.data !== null);
  const view = useApp((s) => s.view);
  // A model file opened without data can still monitor later cases.
  const opened = useApp((s) => s.openedModel !== null);
  const monitorOnly = !hasData && opened && view === 'monitor';
  return (
    <div className="app">
      <Header />
      <div className="body">
        {(hasData || opened) && <Nav />}
        <main id="main" tabIndex={-1}>
          <NoticeArea />
          <JobBar />
          {!hasData && !monitorOnly && <StartPanel />}
          {hasData && view === 'data' && <DataPanel />}
          {hasData && view === 'model' && <ModelPanel />}
          {hasData && view === 'models' && <ModelsPanel />}
          {hasData && view === 'influence' && <InfluencePanel />}
          {hasData && view === 'shape' && <ShapePanel />}
          {hasData && view === 'performance' && <PerformancePanel />}
          {hasData && view === 'subgroups' && <SubgroupPanel />}
          {hasData && view === 'cutoff' && <CutoffPanel />}
          {hasData && view === 'score' && <ScorePanel />}
          {hasData && view === 'points' && <PointsPanel />}
          {(hasData || monitorOnly) && view === 'monitor' && <MonitorPanel />}
        </main>
      </div>
    </div>
  );
}
