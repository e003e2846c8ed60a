import { InputError } from '@loopwright/lti';
import type { SimulateOptions } from './types.ts';

const MAX_GRID = 2_000_000;

/** The run's settings, checked once (every bad option is an InputError naming it). */
export interface Settings {
  until: number;
  rtol: number;
  atol: number;
  /** Output grid spacing. */
  dt: number;
  maxSteps: number;
  maxWallMs: number;
  /** Divergence bound on states and signals. */
  bound: number;
  linear: boolean;
  engine: 'auto' | 'exact' | 'odex';
}

function positive(v: number | undefined, fallback: number, name: string, max = Infinity): number {
  if (v === undefined) return fallback;
  if (typeof v !== 'number' || !Number.isFinite(v) || !(v > 0) || v > max) {
    throw new InputError(`simulation option ${name}: ${v} must be a finite number above 0${max < Infinity ? ` and at most ${max}` : ''}`, {
      field: name,
    });
  }
  return v;
}

export function resolveOptions(opts: SimulateOptions): Settings {
  if (opts.until === undefined) throw new InputError('simulation option until: the end time is required', { field: 'until' });
  const until = positive(opts.until, NaN, 'until', 1e9);
  const dt = positive(opts.outputStep, until / 1000, 'outputStep');
  if (until / dt > MAX_GRID)
    throw new InputError(`simulation option outputStep: ${dt} s gives more than ${MAX_GRID} output points`, { field: 'outputStep' });
  const engine = opts.engine ?? 'auto';
  if (engine !== 'auto' && engine !== 'exact' && engine !== 'odex') {
    throw new InputError(`simulation option engine: "${String(engine)}" is not one of auto, exact, odex`, { field: 'engine' });
  }
  return {
    until,
    rtol: positive(opts.rtol, 1e-6, 'rtol', 1),
    atol: positive(opts.atol, 1e-9, 'atol', 1e6),
    dt,
    maxSteps: Math.floor(positive(opts.maxSteps, 200000, 'maxSteps')),
    maxWallMs: positive(opts.maxWallMs, 10000, 'maxWallMs'),
    bound: positive(opts.divergenceBound, 1e9, 'divergenceBound'),
    linear: opts.linear === true,
    engine,
  };
}

/** Numbers in messages: six significant digits, exponent form outside 1e-3 … 1e6. */
export const fmt = (v: number) => (Math.abs(v) >= 1e-3 && Math.abs(v) < 1e6 ? String(+v.toPrecision(6)) : v.toExponential(4));
