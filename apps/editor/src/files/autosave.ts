/**
 * Autosave: every document change is written to browser storage, so a reload or a crash loses
 * nothing. On start the saved diagram is restored if it still validates. One that does not (a
 * newer format version, damaged text) is never thrown away or overwritten: it is moved to a
 * slot of its own ("kept aside") before anything else is saved, the demo opens meanwhile, and
 * a notice offers to download or discard it. Should even the move fail (storage full), the
 * text stays where it was and autosave pauses until the user downloads or discards it.
 */
import { create } from 'zustand';
import { loadDocument, useDiagramStore } from '../store/diagram-store.ts';
import { defaultDemo, parseDocument, serializeDocument } from '../store/graph-bridge.ts';

export const AUTOSAVE_KEY = 'loopwright.autosave';
/** Kept-aside texts live under `${KEPT_PREFIX}${time kept, ms}`, exactly as they were saved. */
export const KEPT_PREFIX = 'loopwright.autosave.kept.';
const REASON_SUFFIX = '.reason';

/** What autosave needs of browser storage (localStorage; an in-memory one in unit tests). */
export type StorageLike = Pick<Storage, 'getItem' | 'setItem' | 'removeItem' | 'key' | 'length'>;

export interface KeptAutosave {
  /** The storage key holding the text (a kept slot, or the autosave key itself if the move failed). */
  key: string;
  /** Why it could not be loaded (the document reader's message). */
  reason: string;
  /** When it was kept aside (ms since 1970), null when unknown. */
  keptAt: number | null;
  /** Its length in characters. */
  size: number;
}

interface KeptState {
  items: KeptAutosave[];
  /** True while unreadable text still sits under the autosave key: nothing may be saved there. */
  paused: boolean;
}

export const useKeptAutosaves = create<KeptState>()(() => ({ items: [], paused: false }));

let storage: StorageLike | null = null;

function browserStorage(): StorageLike | null {
  try {
    return typeof localStorage === 'undefined' ? null : localStorage;
  } catch {
    return null; // storage disabled
  }
}

/** The kept-aside texts in storage, oldest first, plus the autosave key itself while paused. */
function scanKept(s: StorageLike, paused: boolean, pausedReason: string): KeptAutosave[] {
  const out: KeptAutosave[] = [];
  for (let i = 0; i < s.length; i++) {
    const k = s.key(i);
    if (!k || !k.startsWith(KEPT_PREFIX) || k.endsWith(REASON_SUFFIX)) continue;
    const text = s.getItem(k) ?? '';
    const t = Number(k.slice(KEPT_PREFIX.length));
    out.push({
      key: k,
      reason: s.getItem(k + REASON_SUFFIX) ?? 'it could not be read',
      keptAt: Number.isFinite(t) ? t : null,
      size: text.length,
    });
  }
  out.sort((a, b) => (a.keptAt ?? 0) - (b.keptAt ?? 0));
  if (paused) out.push({ key: AUTOSAVE_KEY, reason: pausedReason, keptAt: null, size: s.getItem(AUTOSAVE_KEY)?.length ?? 0 });
  return out;
}

let pausedReason = '';
function refresh(): void {
  const paused = useKeptAutosaves.getState().paused;
  useKeptAutosaves.setState({ items: storage ? scanKept(storage, paused, pausedReason) : [] });
}

/** Moves unreadable autosave text to a kept slot; false when storage refused (then it stays put). */
function keepAside(s: StorageLike, text: string, reason: string, now: number): boolean {
  let key = `${KEPT_PREFIX}${now}`;
  for (let n = now + 1; s.getItem(key) !== null; n++) key = `${KEPT_PREFIX}${n}`;
  try {
    s.setItem(key, text);
    if (s.getItem(key) !== text) throw new Error('storage did not keep the text');
    s.setItem(key + REASON_SUFFIX, reason);
  } catch {
    try {
      s.removeItem(key);
      s.removeItem(key + REASON_SUFFIX);
    } catch {
      // nothing more to undo
    }
    return false;
  }
  s.removeItem(AUTOSAVE_KEY);
  return true;
}

/** The first line of a reader's error, as a reason a user can act on. */
function reasonOf(err: unknown): string {
  const e = err as Error & { problems?: string[] };
  const first = Array.isArray(e?.problems) && e.problems.length ? e.problems[0] : String(e?.message ?? err);
  return first.length > 400 ? `${first.slice(0, 400)}…` : first;
}

/**
 * Loads the autosaved diagram (or the demo) and starts saving every change (the returned
 * function stops it). `s` defaults to the browser's localStorage; `now` stamps a kept-aside text.
 */
export function bootDocument(s: StorageLike | null = browserStorage(), now: number = Date.now()): () => void {
  storage = s;
  let restored = false;
  let paused = false;
  const text = s ? safeGet(s, AUTOSAVE_KEY) : null;
  if (s && text) {
    try {
      loadDocument(parseDocument(text));
      restored = true;
    } catch (err) {
      const reason = reasonOf(err);
      if (!keepAside(s, text, reason, now)) {
        paused = true;
        pausedReason = reason;
      }
    }
  }
  if (!restored) loadDocument(defaultDemo());
  useKeptAutosaves.setState({ paused });
  refresh();
  let last = useDiagramStore.getState().diagram;
  return useDiagramStore.subscribe((st) => {
    if (st.diagram === last) return;
    last = st.diagram;
    if (!storage || useKeptAutosaves.getState().paused) return;
    try {
      storage.setItem(AUTOSAVE_KEY, serializeDocument(st.diagram));
    } catch {
      // Storage full or disabled: the editor keeps working; saving to a file still works.
    }
  });
}

function safeGet(s: StorageLike, key: string): string | null {
  try {
    return s.getItem(key);
  } catch {
    return null;
  }
}

/** The kept text, exactly as it was saved. */
export function keptText(item: KeptAutosave): string | null {
  return storage ? safeGet(storage, item.key) : null;
}

/** Deletes a kept text for good; if it was the paused autosave itself, autosave resumes and saves the current diagram. */
export function discardKept(item: KeptAutosave): void {
  if (!storage) return;
  storage.removeItem(item.key);
  storage.removeItem(item.key + REASON_SUFFIX);
  if (item.key === AUTOSAVE_KEY) {
    useKeptAutosaves.setState({ paused: false });
    try {
      storage.setItem(AUTOSAVE_KEY, serializeDocument(useDiagramStore.getState().diagram));
    } catch {
      // storage full: the next edit tries again
    }
  }
  refresh();
}

/** A file name for downloading a kept text: `unreadable-autosave-2025-01-31-1405.loop.json`. */
export function keptFileName(item: KeptAutosave): string {
  const d = item.keptAt === null ? new Date() : new Date(item.keptAt);
  const p = (n: number) => String(n).padStart(2, '0');
  return `unreadable-autosave-${d.getFullYear()}-${p(d.getMonth() + 1)}-${p(d.getDate())}-${p(d.getHours())}${p(d.getMinutes())}.loop.json`;
}
