/** Chart colours for the light and dark themes (the canvas theme decides which). */
export interface Palette {
  dark: boolean;
  background: string;
  text: string;
  muted: string;
  grid: string;
  axis: string;
  guide: string;
  series: string[];
  pole: string;
  zero: string;
  current: string;
  pinned: string;
  limit: string;
  /** The swept part of the locus (slider range). */
  sweep: string;
}

const SERIES_LIGHT = ['#2f6fb0', '#c2572b', '#2e8b57', '#8a4fbf', '#b08a16', '#1c8c9c', '#b0407a', '#5a6b2f'];
const SERIES_DARK = ['#6fa8e8', '#f08a5d', '#5cc98b', '#b88ae8', '#e0c050', '#4fc3d1', '#e07ab0', '#a3b86c'];

export function palette(dark: boolean): Palette {
  return dark
    ? {
        dark,
        background: '#1b1f24',
        text: '#e4e7eb',
        muted: '#9aa3ad',
        grid: '#2c333b',
        axis: '#77818c',
        guide: '#3d4650',
        series: SERIES_DARK,
        pole: '#e4e7eb',
        zero: '#e4e7eb',
        current: '#ff5a5a',
        pinned: '#9aa3ad',
        limit: '#e0a030',
        sweep: 'rgba(255, 179, 102, 0.35)',
      }
    : {
        dark,
        background: '#ffffff',
        text: '#1d2329',
        muted: '#5d6670',
        grid: '#e8ebee',
        axis: '#8a949e',
        guide: '#c9d0d6',
        series: SERIES_LIGHT,
        pole: '#1d2329',
        zero: '#1d2329',
        current: '#d62828',
        pinned: '#7d8790',
        limit: '#c77c00',
        sweep: 'rgba(230, 140, 40, 0.30)',
      };
}
