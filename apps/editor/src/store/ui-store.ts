/**
 * UI state that is not part of the document (never in undo history or the saved file):
 * the colour theme, a request to fit the view, the message banner, a connection waiting for
 * confirmation, the About dialog.
 */
import { create } from 'zustand';

export type Theme = 'light' | 'dark';
export const THEME_KEY = 'loopwright.theme';

/** A wire the user drew onto an input that already has one: waiting for Replace or Cancel. */
export interface PendingConnection {
  from: { block: string; port: string };
  to: { block: string; port: string };
  /** The wire now driving that input. */
  existing: string;
}

export interface Notice {
  kind: 'error' | 'info';
  title: string;
  problems?: string[];
}

interface UiState {
  theme: Theme;
  setTheme(t: Theme): void;
  fitRequest: number;
  requestFit(): void;
  notice: Notice | null;
  notify(n: Notice | null): void;
  pendingConnection: PendingConnection | null;
  setPendingConnection(p: PendingConnection | null): void;
  aboutOpen: boolean;
  setAboutOpen(v: boolean): void;
  /** Height of the analysis area in px (null: the layout default). */
  analysisHeight: number | null;
  setAnalysisHeight(h: number | null): void;
  analysisCollapsed: boolean;
  setAnalysisCollapsed(v: boolean): void;
}

function initialTheme(): Theme {
  try {
    const t = localStorage.getItem(THEME_KEY);
    if (t === 'light' || t === 'dark') return t;
  } catch {
    // storage unavailable
  }
  return typeof matchMedia === 'function' && matchMedia('(prefers-color-scheme: dark)').matches ? 'dark' : 'light';
}

export const useUiStore = create<UiState>()((set, get) => ({
  theme: initialTheme(),
  setTheme: (theme) => {
    try {
      localStorage.setItem(THEME_KEY, theme);
    } catch {
      // storage unavailable: the theme still changes for this session
    }
    // Set before React renders, so views that read data-theme while rendering see the new one.
    if (typeof document !== 'undefined') document.documentElement.dataset.theme = theme;
    set({ theme });
  },
  fitRequest: 0,
  requestFit: () => set({ fitRequest: get().fitRequest + 1 }),
  notice: null,
  notify: (notice) => set({ notice }),
  pendingConnection: null,
  setPendingConnection: (pendingConnection) => set({ pendingConnection }),
  aboutOpen: false,
  setAboutOpen: (aboutOpen) => set({ aboutOpen }),
  analysisHeight: null,
  setAnalysisHeight: (analysisHeight) => set({ analysisHeight }),
  analysisCollapsed: false,
  setAnalysisCollapsed: (analysisCollapsed) => set({ analysisCollapsed }),
}));
