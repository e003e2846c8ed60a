/**
 * The cascade workflow: tune the innermost loop first, then each loop around it with the real
 * (just tuned) inner loops closed, every loop read inner-first (the loops around it opened), as
 * a cascade is commissioned. Loops are ordered by how many loops enclose them (most first); a
 * loop that cannot be tuned (no PID block, no crossover) fails on its own and keeps its setting.
 * Afterwards the separation ratios of the tuned diagram are read (flagged below 3) with every
 * loop's margins, every other loop closed.
 */
import { DEFAULT_PADE_ORDER, MIN_SEPARATION, analyseLoops, type Diagram } from '@loopwright/graph';
import { InputError, marginFigures } from '@loopwright/lti';
import { TUNE_CAUTION } from '@loopwright/tune';
import { applyControllerPatch, type ControllerPatch } from './controller-block.ts';
import { configureLoop, tableCuts } from './loop-reading.ts';
import { part } from './part.ts';
import { type TuneRequest, tuneStudy } from './tune-study.ts';
import type { CascadeData } from './types.ts';
import { assertAnalysable } from './validate.ts';

export type CascadeRequest = Omit<TuneRequest, 'cut' | 'model' | 'params' | 'block' | 'reading'> & {
  /** The cuts to tune, innermost first (default: every cut of the loops table, ordered by nesting). */
  cuts?: string[];
};

export function cascadeStudy(d: Diagram, req: CascadeRequest): CascadeData {
  const overrides = req.overrides ?? {};
  assertAnalysable(d, overrides);
  const padeOrder = req.padeOrder ?? DEFAULT_PADE_ORDER;
  const table = tableCuts(d, overrides);
  // Depth: how many loops enclose a loop (the cuts an inner-first reading opens).
  const depth = new Map(
    table
      .map((c) => [c.id, part(() => configureLoop(d, c.id, 'inner-first', overrides))] as const)
      .map(([id, p]) => [id, p.ok ? p.value.opened.length : -1]),
  );
  let order: string[];
  if (req.cuts) {
    for (const id of req.cuts)
      if (!table.some((c) => c.id === id))
        throw new InputError(`cut ${id} is not in the diagram (cuts: ${table.map((c) => c.id).join(', ') || 'none'})`, { field: 'cuts' });
    order = [...req.cuts];
  } else {
    order = table
      .map((c) => c.id)
      .filter((id) => depth.get(id)! >= 0)
      .sort((a, b) => depth.get(b)! - depth.get(a)!);
  }
  if (order.length === 0) throw new InputError('the diagram has no feedback loop to tune', { field: 'cut' });
  const label = (id: string) => table.find((c) => c.id === id)?.label ?? id;
  let working = d;
  const apply: ControllerPatch[] = [];
  const steps: CascadeData['steps'] = order.map((cut) => {
    const result = part(() => tuneStudy(working, { ...req, cut, reading: 'inner-first', responses: req.responses ?? false }));
    if (result.ok && result.value.apply) {
      apply.push(result.value.apply);
      working = applyControllerPatch(working, result.value.apply);
    }
    return { cut, label: label(cut), depth: depth.get(cut) ?? 0, result };
  });
  const after = analyseLoops({ ...working, cuts: table }, overrides, { padeOrder });
  const notes = [...after.notes];
  for (const s of after.separations) {
    if (s.flag)
      notes.push(
        `loop ${s.inner} inside ${s.outer}: ${s.ratio === null ? 'separation not computable' : `only ${s.ratio.toFixed(2)}× faster`}; below ${MIN_SEPARATION} the loops interact: slow the outer loop down (e.g. a larger τc or λ) or speed the inner one up`,
      );
  }
  return {
    rule: req.rule,
    steps,
    separations: after.separations.map((s) => ({ ...s })),
    final: after.cuts.map((c) => ({ cut: c.cut, label: c.label, margins: marginFigures(c.margins) })),
    apply,
    notes,
    caution: TUNE_CAUTION,
  };
}
