// Placeholder: the analysis engineer (E2) replaces this with the Locus/Response/Frequency/Loops views.
export function AnalysisArea() {
  return <div className="analysis-placeholder" aria-label="Analysis views">Analysis views</div>;
}
