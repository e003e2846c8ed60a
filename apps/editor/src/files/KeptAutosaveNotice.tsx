/**
 * The notice for an autosave that could not be loaded and is kept aside: why, and what to do
 * with it — download it (byte for byte, to open in a newer Loopwright or repair by hand) or
 * discard it (after a second click). "Later" hides the notice for this session only; the text
 * stays kept and the notice returns on the next start.
 */
import { useState } from 'react';
import { AUTOSAVE_KEY, discardKept, keptFileName, keptText, useKeptAutosaves, type KeptAutosave } from './autosave.ts';
import { downloadText } from './file-actions.ts';

function sizeText(n: number): string {
  return n < 1000 ? `${n} characters` : `${(n / 1000).toFixed(n < 10_000 ? 1 : 0)} k characters`;
}

export function KeptAutosaveNotice() {
  const items = useKeptAutosaves((s) => s.items);
  const paused = useKeptAutosaves((s) => s.paused);
  const [hidden, setHidden] = useState<string[]>([]);
  const [confirming, setConfirming] = useState<string | null>(null);
  const item: KeptAutosave | undefined = items.find((x) => !hidden.includes(x.key));
  if (!item) return null;
  const more = items.length - 1;
  return (
    <div className="notice warning kept-notice" role="alertdialog" aria-label="Unreadable autosave kept aside" data-kept-key={item.key}>
      <div className="notice-title">The diagram saved in this browser could not be opened.</div>
      <p className="small">Reason: {item.reason}</p>
      <p className="small">
        It is kept aside unchanged ({sizeText(item.size)}
        {item.keptAt !== null && `, kept ${new Date(item.keptAt).toLocaleString()}`}) and nothing will overwrite it.
        {paused && item.key === AUTOSAVE_KEY
          ? ' Autosave is paused until you download or discard it.'
          : ' The demo is open meanwhile; your edits are saved as usual.'}
        {more > 0 && ` ${more} more kept text${more > 1 ? 's' : ''} after this one.`}
      </p>
      <div className="kept-buttons">
        <button
          type="button"
          className="primary"
          aria-label="Download the unreadable autosave"
          onClick={() => {
            const text = keptText(item);
            if (text !== null) downloadText(text, keptFileName(item));
          }}
        >
          Download it
        </button>
        {confirming === item.key ? (
          <>
            <span className="small">Delete it for good?</span>
            <button
              type="button"
              className="danger"
              aria-label="Confirm discarding the unreadable autosave"
              onClick={() => {
                setConfirming(null);
                discardKept(item);
              }}
            >
              Discard for good
            </button>
            <button type="button" aria-label="Keep the unreadable autosave" onClick={() => setConfirming(null)}>
              Keep it
            </button>
          </>
        ) : (
          <button type="button" aria-label="Discard the unreadable autosave" onClick={() => setConfirming(item.key)}>
            Discard…
          </button>
        )}
        <button
          type="button"
          aria-label="Decide later"
          title="Hide this notice until the next start; the text stays kept"
          onClick={() => setHidden((h) => [...h, item.key])}
        >
          Later
        </button>
      </div>
    </div>
  );
}
