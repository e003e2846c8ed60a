/**
 * UI state of the analysis area: which view is open, the sweep target and its live slider
 * value, display options, and a pinned snapshot for comparison (the run's end time and the
 * probes shown are simulation settings of the document). None of this is part of the
 * document or its undo history; the live sweep value reaches the document only when the user
 * applies it (SweepBar → setParameterValue / updateBlockParams).
 */
import { create } from 'zustand';
import type { SweepRange } from './sweep.ts';
import type { AnalysisSnapshot } from './snapshot.ts';

export type AnalysisViewId = 'locus' | 'response' | 'frequency' | 'loops' | 'closed-loop' | 'compare' | 'fit' | 'tune';

export interface AnalysisUiState {
  view: AnalysisViewId;
  /** targetKey() of the swept quantity, or null before one is chosen. */
  sweepKey: string | null;
  /** The live slider value; null = follow the document value. */
  liveValue: number | null;
  /** Range edits made in the sweep bar, by target key (the document's range otherwise). */
  ranges: Record<string, SweepRange>;
  negativeLocus: boolean;
  showDampingGuides: boolean;
  showFrequencyGuides: boolean;
  /** Cut shown in the Frequency view (null = the document's active cut or first cut). */
  cutId: string | null;
  pinned: AnalysisSnapshot | null;
  /** > 0 while something needs every result at once (pinning, the report): hidden views are computed too. */
  needAll: number;
  /** The two points of the Closed loop view ("block:ID" or "wire:ID"; null: the first source / probe). */
  closedLoopFrom: string | null;
  closedLoopTo: string | null;

  setView(v: AnalysisViewId): void;
  setSweepKey(key: string | null): void;
  setLiveValue(v: number | null): void;
  setRange(key: string, r: SweepRange): void;
  setOptions(
    patch: Partial<
      Pick<AnalysisUiState, 'negativeLocus' | 'showDampingGuides' | 'showFrequencyGuides' | 'cutId' | 'closedLoopFrom' | 'closedLoopTo'>
    >,
  ): void;
  pin(s: AnalysisSnapshot | null): void;
  setNeedAll(delta: number): void;
}

export const useAnalysisStore = create<AnalysisUiState>()((set) => ({
  view: 'locus',
  sweepKey: null,
  liveValue: null,
  ranges: {},
  negativeLocus: false,
  showDampingGuides: true,
  showFrequencyGuides: false,
  cutId: null,
  pinned: null,
  needAll: 0,
  closedLoopFrom: null,
  closedLoopTo: null,

  setView: (view) => set({ view }),
  setSweepKey: (sweepKey) => set({ sweepKey, liveValue: null }),
  setLiveValue: (liveValue) => set({ liveValue }),
  setRange: (key, r) => set((s) => ({ ranges: { ...s.ranges, [key]: r } })),
  setOptions: (patch) => set(patch),
  pin: (pinned) => set({ pinned }),
  setNeedAll: (delta) => set((s) => ({ needAll: Math.max(0, s.needAll + delta) })),
}));
