import { type BudgetOptions, type Complex, InputError, cabs, poly, polyRoots } from '@loopwright/lti';
import type { ParameterOverrides } from '../resolve.ts';
import type { Finding } from './finding.ts';
import { type CompiledGraph, feedthroughOf } from '../analysis/linear-graph.ts';
import { determinantPoly, flowGraph, simpleCycles } from '../analysis/mason.ts';
import { type Linearisable, closedLoopPoles, compiledOf } from '../analysis/reduce.ts';
import { hiddenModeFindings } from '../analysis/hidden-modes.ts';

/** Analytical findings have the shape of every check's findings. */
export type AnalyticFinding = Finding;

const fmtC = (z: Complex) =>
  Math.abs(z.im) < 1e-12 ? `${+z.re.toPrecision(6)}` : `${+z.re.toPrecision(6)}${z.im < 0 ? '-' : '+'}${+Math.abs(z.im).toPrecision(6)}j`;

/**
 * Algebraic loops: loops on which every block passes its input straight through at s → ∞
 * (direct feedthrough; a dead time breaks the loop). Each is reported with its blocks; when
 * 1 − (loop gain at s → ∞) — over all of them together, the determinant of I − D·W — is zero
 * the diagram is ill-posed (no solution for the signals): an error.
 */
export function algebraicLoopFindings(c: CompiledGraph, deadline?: number): AnalyticFinding[] {
  const ft = c.ids.map((_, v) => (c.delay[v] > 0 ? 0 : feedthroughOf(c.num[v], c.den[v])));
  const keep = ft.map((x) => x !== 0);
  const map: number[] = [];
  const nodes: number[] = [];
  keep.forEach((k, i) => {
    map[i] = k ? nodes.length : -1;
    if (k) nodes.push(i);
  });
  const fg = flowGraph(
    nodes.length,
    nodes.map((v) => (Number.isFinite(ft[v]) ? [ft[v]] : [1])),
    nodes.map(() => [1]),
    c.branches
      .filter((b) => b.to >= 0 && map[b.from] >= 0 && map[b.to] >= 0)
      .map((b) => ({ from: map[b.from], to: map[b.to], weight: b.weight })),
  );
  const cycles = simpleCycles(fg, undefined, deadline);
  if (cycles.length === 0) return [];
  const out: AnalyticFinding[] = [];
  for (const cyc of cycles) {
    const blocks = cyc.nodes.map((i) => c.ids[nodes[i]]);
    const improper = cyc.nodes.some((i) => !Number.isFinite(ft[nodes[i]]));
    const gain = cyc.weight * cyc.nodes.reduce((p, i) => p * ft[nodes[i]], 1);
    out.push({
      severity: improper ? 'error' : 'warning',
      code: 'algebraic-loop',
      message: improper
        ? 'algebraic loop (blocks in loop order) with an improper block (gain growing without bound at high frequency): the loop is ill-posed'
        : `algebraic loop (blocks in loop order): every block on it passes its input straight through (loop gain at s → ∞ = ${+gain.toPrecision(6)}); the signals are found by solving it`,
      blocks,
    });
  }
  const delta = determinantPoly(fg, cycles)[0] ?? 0;
  if (Math.abs(delta) <= 1e-12 && !out.some((f) => f.severity === 'error')) {
    const blocks = [...new Set(cycles.flatMap((cy) => cy.nodes.map((i) => c.ids[nodes[i]])))];
    out.push({
      severity: 'error',
      code: 'ill-posed-algebraic-loop',
      message: 'ill-posed algebraic loop: 1 − (loop gain at s → ∞) = 0, so no signal values satisfy it',
      blocks,
    });
  }
  return out;
}

/** Roots of a node's numerator and denominator (cached per check run). */
function rootsOf(p: readonly number[]): Complex[] {
  return poly.degree(p) > 0 ? polyRoots(p) : [];
}

const CANCEL_TOL = 1e-6;

/**
 * Pole–zero cancellations between blocks in series (a chain of transfer blocks, each feeding
 * only the next): a pole of one block equal to a zero of another. Cancelling a pole in the
 * closed right half-plane hides an unstable mode that no output shows: internally unstable.
 */
export function cancellationFindings(c: CompiledGraph): AnalyticFinding[] {
  const out: AnalyticFinding[] = [];
  const n = c.ids.length;
  const succ: number[][] = Array.from({ length: n }, () => []);
  const outWires: string[][] = Array.from({ length: n }, () => []);
  const inDeg = new Array<number>(n).fill(0);
  for (const b of c.branches) {
    outWires[b.from].push(b.wire);
    if (b.to >= 0) {
      succ[b.from].push(b.to);
      inDeg[b.to]++;
    }
  }
  const zeros = new Map<number, Complex[]>();
  const poles = new Map<number, Complex[]>();
  const Z = (v: number) => zeros.get(v) ?? (zeros.set(v, rootsOf(c.num[v])), zeros.get(v)!);
  const Pp = (v: number) => poles.get(v) ?? (poles.set(v, rootsOf(c.den[v])), poles.get(v)!);
  const transfer = (v: number) => c.kinds[v] === 'transfer' && !poly.isZero(c.num[v]);
  const report = (pole: Complex, poleBlock: number, zeroBlock: number, chainWires: string[]) => {
    const unstable = pole.re >= -CANCEL_TOL * Math.max(1, cabs(pole));
    out.push({
      severity: unstable ? 'error' : 'info',
      code: unstable ? 'unstable-cancellation' : 'pole-zero-cancellation',
      message: unstable
        ? `the pole ${fmtC(pole)} of block ${c.ids[poleBlock]} is cancelled by a zero of block ${c.ids[zeroBlock]} in series: an unstable mode hidden from the output — the diagram is internally unstable`
        : `the pole ${fmtC(pole)} of block ${c.ids[poleBlock]} is cancelled by a zero of block ${c.ids[zeroBlock]} in series (a stable hidden mode)`,
      blocks: [c.ids[poleBlock], c.ids[zeroBlock]],
      wires: chainWires,
    });
  };
  const match = (ps: Complex[], zs: Complex[]) =>
    ps.filter((p) => zs.some((z) => cabs({ re: p.re - z.re, im: p.im - z.im }) <= CANCEL_TOL * Math.max(1, cabs(p))));
  for (let a = 0; a < n; a++) {
    if (!transfer(a)) continue;
    // Walk the series chain downstream of a.
    let v = a;
    const wires: string[] = [];
    const seen = new Set<number>([a]);
    while (succ[v].length === 1 && outWires[v].length === 1) {
      const b = succ[v][0];
      if (seen.has(b) || inDeg[b] !== 1 || !transfer(b)) break;
      seen.add(b);
      wires.push(outWires[v][0]);
      for (const p of match(Pp(a), Z(b))) if (p.im >= 0) report(p, a, b, wires.slice());
      for (const p of match(Pp(b), Z(a))) if (p.im >= 0) report(p, b, a, wires.slice());
      v = b;
    }
  }
  return out;
}

/** Closed-loop poles in the right half-plane (warning) or on the imaginary axis (info). */
export function stabilityFindings(c: CompiledGraph, deadline?: number): AnalyticFinding[] {
  const poles = closedLoopPoles(c, undefined, deadline !== undefined ? { deadline } : {});
  const scale = Math.max(1, ...poles.map(cabs));
  const tol = 1e-9 * scale;
  const rhp = poles.filter((p) => p.re > tol);
  const axis = poles.filter((p) => Math.abs(p.re) <= tol);
  const out: AnalyticFinding[] = [];
  if (rhp.length) {
    out.push({
      severity: 'warning',
      code: 'closed-loop-unstable',
      message: `closed loop unstable: ${rhp.length} pole(s) in the right half-plane (${rhp.map(fmtC).join(', ')})`,
    });
  }
  if (axis.length) {
    out.push({
      severity: 'info',
      code: 'closed-loop-marginal',
      message: `closed-loop pole(s) on the imaginary axis (${axis.map(fmtC).join(', ')}): marginally stable at best`,
    });
  }
  return out;
}

/**
 * The analytical checks of a diagram: algebraic loops, series pole–zero cancellations and
 * closed-loop stability. A diagram whose linear model cannot be built (unknown block, bad
 * field) gives one error finding here; the structural checks name the details.
 */
export function checkAnalytic(d: Linearisable, overrides?: ParameterOverrides, opts: BudgetOptions = {}): AnalyticFinding[] {
  let c: CompiledGraph;
  try {
    c = compiledOf(d, overrides);
  } catch (err) {
    if (err instanceof InputError)
      return [
        {
          severity: 'error',
          code: 'linear-model',
          message: `no linear model: ${err.message}`,
          ...(err.details.field ? { field: err.details.field } : {}),
        },
      ];
    throw err;
  }
  const out = [...algebraicLoopFindings(c, opts.deadline), ...cancellationFindings(c)];
  if (!out.some((f) => f.code === 'ill-posed-algebraic-loop' || (f.code === 'algebraic-loop' && f.severity === 'error'))) {
    try {
      // Hidden modes from the whole diagram (probes, fan-outs and junctions cannot hide them);
      // a cancellation the series check already reported is not repeated.
      const same = (a: AnalyticFinding, b: AnalyticFinding) =>
        a.code === b.code && [...(a.blocks ?? [])].sort().join() === [...(b.blocks ?? [])].sort().join();
      for (const f of hiddenModeFindings(c, opts)) if (!out.some((g) => same(f, g))) out.push(f);
      out.push(...stabilityFindings(c, opts.deadline));
    } catch (err) {
      if (!(err instanceof InputError)) throw err;
      out.push({ severity: 'error', code: 'closed-loop-poles', message: `closed-loop poles not found: ${err.message}` });
    }
  }
  return out;
}
