import { AnalysisArea } from './views/AnalysisArea.tsx';

/**
 * The editor layout: top bar, Parts (left), canvas (centre), Details / Parameters / findings
 * (right), the analysis views (bottom, filled by views/AnalysisArea) and a footer.
 */
export function App() {
  return (
    <div className="app">
      <header className="topbar" role="toolbar" aria-label="Diagram commands">
        <span className="brand">Loopwright</span>
      </header>
      <aside className="parts panel" aria-label="Parts"></aside>
      <main className="canvas" aria-label="Diagram canvas"></main>
      <aside className="side" aria-label="Inspector"></aside>
      <section className="analysis" aria-label="Analysis">
        <AnalysisArea />
      </section>
      <footer className="footer"></footer>
    </div>
  );
}
