/**
 * The test vector of a sampled controller block, from the simulator: the block alone (its own
 * fields, the diagram's named parameters) driven by a fixed input built from sources — a step, a
 * step of the other sign, a ramp, then a sinusoid — every edge on a sample instant; the input is
 * read and the output recorded at each instant k·T. The run is made without the computation
 * delay, which the generated code does not add either (it is when the hardware applies the
 * output): the outputs are listed per sample, as the code gives them.
 */
import { DIAGRAM_FORMAT, DIAGRAM_VERSION, type Block, type Diagram } from '@loopwright/graph';
import { InputError } from '@loopwright/lti';
import { compileModel, simulate } from '@loopwright/sim';
import type { DiscreteController, TestVector } from '@loopwright/sampled';

/** Amplitude of the input: 1, or enough to drive the output 1.5 times past its largest limit. */
function amplitudeFor(c: DiscreteController): number {
  const k = c.coefficients;
  const limits = [k.umin, k.umax].filter((v) => Number.isFinite(v)).map(Math.abs);
  const direct = Math.abs(c.differenceEquation.b[0] ?? 0);
  return limits.length && direct > 0 ? (1.5 * Math.max(...limits)) / direct : 1;
}

/** The block-alone diagram: five sources summed into a copy of the block (computation delay 0). */
export function testBenchDiagram(d: Pick<Diagram, 'parameters'>, block: Block, c: DiscreteController, samples: number): Diagram {
  const T = c.sampleTime;
  const A = amplitudeFor(c);
  const at = (f: number) => Math.round(f * samples) * T; // every edge on a sample instant
  const span = samples * T;
  const pos = { x: 0, y: 0 };
  const src = (id: string, params: Record<string, number | string>): Block => ({
    id,
    kind: 'source',
    position: pos,
    params: { offset: 0, ...params },
  });
  return {
    format: DIAGRAM_FORMAT,
    version: DIAGRAM_VERSION,
    title: `test bench of ${block.id}`,
    description: '',
    parameters: d.parameters,
    blocks: [
      src('s1', { shape: 'step', amplitude: A, start: 0 }),
      src('s2', { shape: 'step', amplitude: -1.6 * A, start: at(0.2) }),
      src('s3', { shape: 'ramp', amplitude: (2 * A) / span, start: at(0.4) }),
      src('s4', { shape: 'ramp', amplitude: (-2 * A) / span, start: at(0.6) }),
      src('s5', { shape: 'sinusoid', amplitude: 0.8 * A, omega: (2 * Math.PI * 6) / span, start: at(0.8) }),
      { id: 'e', kind: 'summing-junction', position: pos, params: { signs: '+++++' } },
      { ...block, id: 'controller', params: { ...block.params, computeDelay: 0 } },
      { id: 'in', kind: 'probe', position: pos, params: {} },
      { id: 'out', kind: 'probe', position: pos, params: {} },
    ],
    wires: [
      ...['s1', 's2', 's3', 's4', 's5'].map((s, i) => ({
        id: `w${s}`,
        from: { block: s, port: 'out' },
        to: { block: 'e', port: `in${i + 1}` },
      })),
      { id: 'we', from: { block: 'e', port: 'out' }, to: { block: 'controller', port: 'in' } },
      { id: 'win', from: { block: 'e', port: 'out' }, to: { block: 'in', port: 'in' } },
      { id: 'wout', from: { block: 'controller', port: 'out' }, to: { block: 'out', port: 'in' } },
    ],
    cuts: [],
    sweeps: [],
    view: {},
  };
}

/** Runs the block alone in the simulator and records input and output at each of `samples` instants. */
export function simulatedTestVector(
  d: Pick<Diagram, 'parameters'>,
  block: Block,
  c: DiscreteController,
  name: string,
  overrides: Record<string, number> = {},
  samples = 400,
): TestVector {
  if (!Number.isInteger(samples) || samples < 2 || samples > 100000)
    throw new InputError(`samples: ${samples} must be a whole number from 2 to 100000`, { field: 'samples' });
  const T = c.sampleTime;
  const bench = testBenchDiagram(d, block, c, samples);
  const run = simulate(compileModel(bench), { until: samples * T, outputStep: T, overrides, maxSteps: 20 * samples + 1000 });
  if (run.status !== 'ok')
    throw new InputError(`block ${block.id}: the test-vector run stopped: ${run.message}`, { field: `blocks.${block.id}` });
  const input: number[] = [];
  const output: number[] = [];
  let i = 0;
  for (let k = 0; k < samples; k++) {
    const t = k * T;
    while (i < run.time.length && run.time[i] < t - 1e-9 * T) i++;
    if (i >= run.time.length || Math.abs(run.time[i] - t) > 1e-9 * T)
      throw new Error(`test vector: the run has no output at the instant ${t} s`);
    input.push(run.traces.in[i]);
    output.push(run.traces.out[i]);
  }
  return {
    format: 'loopwright-test-vector',
    version: 1,
    name,
    sampleTime: T,
    computeDelay: c.computeDelay,
    initialOutput: 0,
    input,
    output,
    retunes: [],
    tolerance: 1e-9,
  };
}
