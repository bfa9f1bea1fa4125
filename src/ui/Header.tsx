import { useApp } from './context';
import { WorkspaceBar } from './WorkspaceBar';

export function Header() {
  const source = useApp((s) => s.data?.source ?? null);
  return (
    <header className="top">
      <a className="skip" href="#main">
        Skip to content
      </a>
      <h1>Fulcra</h1>
      <span className="tagline">risk models on your own spreadsheet</span>
      {source && (
        <span className="source" data-testid="source" title={source.name}>
          {source.name}
        </span>
      )}
      {source?.kind === 'demo' && <strong className="invented">invented data</strong>}
      <WorkspaceBar />
      <span className="local" title="All calculations run in a Web Worker in this tab; nothing is uploaded.">
        Runs only on this computer
      </span>
    </header>
  );
}
