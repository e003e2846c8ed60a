import { InputError, assertFinite } from '@loopwright/lti';
import type { DiscreteController } from './controller.ts';
import { runController } from './executor.ts';

/**
 * A test vector for a ported controller: the input sequence e(0), e(1), … and the outputs u(k)
 * expected for it (one per sample, from a zero state whose output starts at `initialOutput`),
 * with optional coefficient changes applied before the step at `atSample`. Plain JSON data.
 * The export (study kind `export`) writes it from a simulation of the block alone; `makeTestVector`
 * writes the same shape from the reference executor.
 */
export interface TestVector {
  format: 'loopwright-test-vector';
  version: 1;
  /** Identifier stem of the controller the vector is for. */
  name: string;
  sampleTime: number;
  /** Computation delay in samples (for the record: the outputs are listed per sample, undelayed). */
  computeDelay: number;
  initialOutput: number;
  input: number[];
  output: number[];
  retunes: { atSample: number; coefficients: DiscreteController['coefficients'] }[];
  /** Agreement a port should reach: |u − expected| ≤ tolerance·max(1, |expected|). */
  tolerance: number;
}

/** Runs the reference executor on `input` and records the outputs as a test vector. */
export function makeTestVector(
  c: DiscreteController,
  input: readonly number[],
  opts: { name?: string; initialOutput?: number; retunes?: TestVector['retunes']; tolerance?: number } = {},
): TestVector {
  assertFinite(input, 'test vector input');
  if (input.length === 0) throw new InputError('test vector input: give at least one sample', { field: 'input' });
  for (const r of opts.retunes ?? []) {
    if (!Number.isInteger(r.atSample) || r.atSample < 0 || r.atSample >= input.length) {
      throw new InputError(`test vector retune: atSample must be a whole number from 0 to ${input.length - 1}, got ${r.atSample}`, {
        field: 'atSample',
      });
    }
  }
  const initialOutput = opts.initialOutput ?? 0;
  const retunes = (opts.retunes ?? []).map((r) => ({ atSample: r.atSample, coefficients: r.coefficients }));
  return {
    format: 'loopwright-test-vector',
    version: 1,
    name: opts.name ?? 'controller',
    sampleTime: c.sampleTime,
    computeDelay: c.computeDelay,
    initialOutput,
    input: [...input],
    output: runController(c, input, { initialOutput, retunes }),
    retunes,
    tolerance: opts.tolerance ?? 1e-9,
  };
}

/** The worst difference between outputs and a vector, relative to max(1, |expected|). */
export function testVectorMismatch(v: TestVector, outputs: readonly number[]): number {
  if (outputs.length !== v.output.length) return Infinity;
  let worst = 0;
  for (let k = 0; k < outputs.length; k++) {
    const d = Math.abs(outputs[k] - v.output[k]) / Math.max(1, Math.abs(v.output[k]));
    worst = Math.max(worst, Number.isNaN(d) ? Infinity : d);
  }
  return worst;
}

/**
 * A deterministic input sequence that exercises a controller: steps of both signs, a ramp and a
 * sinusoid, scaled by `amplitude` (large enough to reach the limits when there are any).
 */
export function exerciseInput(count: number, amplitude = 1): number[] {
  const out: number[] = [];
  for (let k = 0; k < count; k++) {
    const x = k / count;
    let e: number;
    if (x < 0.2) e = 1;
    else if (x < 0.4) e = -0.6;
    else if (x < 0.6) e = 0.2 + 2 * (x - 0.4);
    else if (x < 0.8) e = 0.8 * Math.sin(2 * Math.PI * 6 * x);
    else e = 0.05;
    out.push(amplitude * e);
  }
  return out;
}

/**
 * The test vector as JSON text. JSON has no infinity: an absent output limit (±Infinity) is
 * written as null and read back as −Infinity (umin) or +Infinity (umax).
 */
export function testVectorToJson(v: TestVector): string {
  return JSON.stringify(v, (_k, x) => (x === Infinity || x === -Infinity ? null : x), 1);
}

/** Reads a test vector written by `testVectorToJson` (or by hand), checking its shape; errors name the field. */
export function testVectorFromJson(text: string): TestVector {
  let raw: unknown;
  try {
    raw = JSON.parse(text);
  } catch (err) {
    throw new InputError(`test vector: not valid JSON (${(err as Error).message})`);
  }
  const v = raw as TestVector;
  if (!v || typeof v !== 'object' || v.format !== 'loopwright-test-vector' || v.version !== 1) {
    throw new InputError('test vector: field format must be "loopwright-test-vector" with version 1', { field: 'format' });
  }
  for (const f of ['input', 'output'] as const) {
    if (!Array.isArray(v[f])) throw new InputError(`test vector: field ${f} must be an array of numbers`, { field: f });
    assertFinite(v[f], `test vector ${f}`);
  }
  if (v.input.length !== v.output.length)
    throw new InputError(`test vector: ${v.input.length} inputs but ${v.output.length} outputs`, { field: 'output' });
  for (const f of ['sampleTime', 'computeDelay', 'initialOutput', 'tolerance'] as const) {
    if (typeof v[f] !== 'number' || !Number.isFinite(v[f]))
      throw new InputError(`test vector: field ${f} must be a finite number`, { field: f });
  }
  const retunes = Array.isArray(v.retunes) ? v.retunes : [];
  for (const r of retunes) {
    const c = r.coefficients as { umin: number | null; umax: number | null };
    if (c.umin === null) c.umin = -Infinity;
    if (c.umax === null) c.umax = Infinity;
  }
  return { ...v, retunes };
}
