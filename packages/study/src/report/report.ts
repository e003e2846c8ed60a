/**
 * The design report study: every result the report shows, computed here (findings, the locus
 * of the sweep in force, the closed-loop poles, the loops table with each loop's frequency
 * data, a run with the linear overlay), then the HTML. The editor's Report button (through its
 * worker) and `loopwright report` both call it, so a design reads the same in both; each part
 * fails on its own (an unstable loop must not blank the rest).
 */
import type { Diagram } from '@loopwright/graph';
import { diagramFingerprint } from '../fingerprint.ts';
import { locusStudy } from '../locus.ts';
import { loopsStudy } from '../loops.ts';
import { part } from '../part.ts';
import { polesStudy } from '../poles.ts';
import { responseStudy, type RunContext } from '../run.ts';
import { resolveSweep } from '../sweep-target.ts';
import type { LiveValue, SweepRange } from '../types.ts';
import { checkStudy } from '../validate.ts';
import { designReportHtml } from './html.ts';

export interface ReportRequest {
  /** Values of named parameters that replace the diagram's (CLI --set). */
  overrides?: Record<string, number>;
  /** The swept quantity by target key (`param:K`, `block:g.k`); default: the diagram's preferred one. */
  sweep?: string | null;
  /** A value held for the swept quantity (the editor's live slider value); default: the document's. */
  live?: LiveValue | null;
  /** The slider range of the sweep (default: the diagram's). */
  range?: SweepRange | null;
  padeOrder?: number;
  /** When the report says it was made (ISO text); default: now. */
  generatedAt?: string;
  /** Wall-time budget of the run, ms. */
  maxWallMs?: number;
}

export interface ReportData {
  html: string;
  title: string;
  fingerprint: string;
  /** Parts that could not be computed, in words (the report shows them too). */
  problems: string[];
}

/** Shares of the work for progress: check, locus, poles, loops, run, writing. */
const STAGES = [0, 0.05, 0.25, 0.3, 0.6, 0.95, 1];

export function reportStudy(d: Diagram, req: ReportRequest = {}, ctx: RunContext = {}): ReportData {
  const overrides = req.overrides ?? {};
  const key = req.sweep ?? null;
  const sw = resolveSweep(d, { key, liveValue: req.live?.value ?? null, ranges: {} });
  const live = req.live ?? sw.live;
  const range = req.range ?? sw.range;
  const padeOrder = req.padeOrder;
  const pade = padeOrder !== undefined ? { padeOrder } : {};
  const stage = (i: number) => ctx.onProgress?.(STAGES[i]);
  stage(0);
  const check = part(() => checkStudy(d, overrides));
  stage(1);
  const locus =
    sw.choice && range && Number.isFinite(sw.value)
      ? part(() => locusStudy(d, { target: sw.choice!.target, value: live?.value ?? sw.value, range, overrides, ...pade }))
      : null;
  stage(2);
  const poles = part(() => polesStudy(d, { overrides, live, ...pade }));
  stage(3);
  const loops = part(() => loopsStudy(d, { overrides, live, frequency: true, ...pade }));
  stage(4);
  const runCtx: RunContext = { ...ctx, onProgress: (f) => ctx.onProgress?.(STAGES[4] + f * (STAGES[5] - STAGES[4])) };
  const response = part(() =>
    responseStudy(
      d,
      { overrides, live, linearOverlay: true, ...(req.maxWallMs !== undefined ? { maxWallMs: req.maxWallMs } : {}) },
      runCtx,
    ),
  );
  stage(5);
  const fingerprint = diagramFingerprint(d);
  const html = designReportHtml({
    diagram: d,
    sweep: sw.choice ? { label: sw.choice.label, value: live?.value ?? sw.value } : null,
    check,
    locus,
    poles,
    loops,
    response,
    generatedAt: req.generatedAt ?? new Date().toISOString(),
    fingerprint,
  });
  stage(6);
  const problems = (
    [
      ['findings', check],
      ['locus', locus],
      ['closed-loop poles', poles],
      ['loops', loops],
      ['simulation', response],
    ] as const
  ).flatMap(([what, p]) => (p && !p.ok ? [`${what}: ${p.error}`] : []));
  return { html, title: d.title, fingerprint, problems };
}
