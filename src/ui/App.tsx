import { notify, workerLost } from '../state/actions';
import { createController } from '../state/controller';
import { createStore } from '../state/store';
import { EnvContext, useApp, type Env } from './context';
import { Header } from './Header';
import { JobBar } from './JobBar';
import { Nav } from './Nav';
import { NoticeArea } from './NoticeArea';
import { CutoffPanel } from './panels/CutoffPanel';
import { DataPanel } from './panels/DataPanel';
import { ModelPanel } from './panels/ModelPanel';
import { PerformancePanel } from './panels/PerformancePanel';
import { ScorePanel } from './panels/ScorePanel';
import { ShapePanel } from './panels/ShapePanel';
import { StartPanel } from './panels/StartPanel';
import { createWorkerClient } from './workerClient';

/** One store, one worker and one controller for the page's lifetime (created once, also under StrictMode). */
let pageEnv: Env | null = null;
function getPageEnv(): Env {
  if (!pageEnv) {
    const store = createStore();
    const client = createWorkerClient({
      onError: (text, suggestion) => store.apply(notify, { kind: 'error', text, suggestion }),
      onCrash: (text) => store.apply(workerLost, text),
    });
    pageEnv = { store, ctl: createController(store, client) };
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
  return (
    <div className="app">
      <Header />
      <div className="body">
        {hasData && <Nav />}
        <main id="main" tabIndex={-1}>
          <NoticeArea />
          <JobBar />
          {!hasData && <StartPanel />}
          {hasData && view === 'data' && <DataPanel />}
          {hasData && view === 'model' && <ModelPanel />}
          {hasData && view === 'shape' && <ShapePanel />}
          {hasData && view === 'performance' && <PerformancePanel />}
          {hasData && view === 'cutoff' && <CutoffPanel />}
          {hasData && view === 'score' && <ScorePanel />}
        </main>
      </div>
    </div>
  );
}
