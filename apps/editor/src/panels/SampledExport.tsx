/**
 * The code of a sampled controller (Details of a PID, lead–lag, transfer-function or gain block
 * with a sample time): C, Structured Text or the coefficients, each with its test vector, from
 * the same `export` study the command line runs. A one-off, cheap computation on a click, so it
 * runs here rather than in the engine worker.
 */
import { useState } from 'react';
import { runStudy, testVectorToJson } from '@loopwright/study';
import { download } from '../analysis/export.ts';
import { sampleTimeSet, type Block, type Diagram } from '../store/graph-bridge.ts';

const LANGS = [
  ['c', 'C'],
  ['st', 'ST'],
  ['coefficients', 'Coefficients'],
] as const;

export function SampledExport({ diagram, block }: { diagram: Diagram; block: Block }) {
  const [error, setError] = useState<string | null>(null);
  if (!sampleTimeSet(block.params.sampleTime)) return null;
  const run = (lang: (typeof LANGS)[number][0]) => {
    try {
      const res = runStudy(diagram, { kind: 'export', block: block.id, lang });
      setError(null);
      for (const f of res.files) download(f.path, f.text, 'text/plain');
      download(`${res.name}.vector.json`, testVectorToJson(res.testVector) + '\n', 'application/json');
    } catch (err) {
      setError(err instanceof Error ? err.message : String(err));
    }
  };
  return (
    <fieldset className="sampled-export">
      <legend>Code for the drive</legend>
      <div className="row">
        {LANGS.map(([lang, label]) => (
          <button key={lang} type="button" aria-label={`Export ${label} of ${block.id}`} onClick={() => run(lang)}>
            {label}
          </button>
        ))}
      </div>
      <p className="muted small">
        With a test vector (the block alone on a fixed input). Validate on the real machine with limits and interlocks in place.
      </p>
      {error && (
        <p className="error small" role="alert">
          {error}
        </p>
      )}
    </fieldset>
  );
}
