import { type Complex, cabs, poly, polyRoots, polyRootsDetailed } from '@loopwright/lti';
import type { Finding } from '../checks/finding.ts';
import type { CompiledGraph } from './linear-graph.ts';
import { flowGraph, simpleCycles } from './mason.ts';
import { type ReduceOptions, characteristicPolynomial } from './reduce.ts';

/**
 * Hidden modes found from the whole diagram, by structure: a pole p of a block that lies on a
 * feedback loop and is still a root of the closed-loop characteristic polynomial (Π D_v · Δ, every
 * block's modes included, nothing cancelled) is a mode that no loop moves — the loops through the
 * block neither see it nor drive it. Typically a zero of another block on those loops cancels
 * it; a cancelled pole in the closed right half-plane makes the diagram internally unstable,
 * whatever the outputs show (Skogestad & Postlethwaite, Sec. 4.7 (from memory)). Probes have no
 * dynamics and no node of their own, and fan-outs and disturbance junctions only add paths, so
 * none of them can hide such a mode from this test — unlike a search for cancellations between
 * blocks in series.
 */
export interface HiddenMode {
  pole: Complex;
  /** The block whose pole it is. */
  block: string;
  /** Blocks on the loops through `block` with a zero at the pole (empty: no single block cancels it). */
  cancelledBy: string[];
  /** Re p ≥ 0 (within tolerance): the diagram is internally unstable. */
  unstable: boolean;
}

const TOL = 1e-6;

export function hiddenModes(c: CompiledGraph, opts: ReduceOptions = {}): HiddenMode[] {
  const n = c.ids.length;
  // Nodes on loops, and for each node the nodes sharing a loop with it.
  const fg = flowGraph(n, c.num, c.den, c.branches);
  const cycles = simpleCycles(fg, undefined, opts.deadline);
  const mates: Set<number>[] = Array.from({ length: n }, () => new Set<number>());
  for (const cy of cycles) for (const v of cy.nodes) for (const u of cy.nodes) mates[v].add(u);
  const chi = polyRootsDetailed(characteristicPolynomial(c, undefined, opts).poly);
  const near = (a: Complex, b: Complex, slack: number) =>
    Math.hypot(a.re - b.re, a.im - b.im) <= Math.max(TOL * Math.max(1, cabs(a)), slack);
  const out: HiddenMode[] = [];
  const zerosOf = new Map<number, Complex[] | 'all'>();
  const zeros = (v: number) => {
    let z = zerosOf.get(v);
    if (!z) {
      z = poly.isZero(c.num[v]) ? 'all' : poly.degree(c.num[v]) > 0 ? polyRoots(c.num[v]) : [];
      zerosOf.set(v, z);
    }
    return z;
  };
  const used = new Array<boolean>(chi.roots.length).fill(false);
  for (let v = 0; v < n; v++) {
    if (c.kinds[v] !== 'transfer' || mates[v].size === 0 || poly.degree(c.den[v]) < 1) continue;
    const seen: Complex[] = [];
    for (const p of polyRoots(c.den[v])) {
      if (p.im < 0 || seen.some((q) => q.re === p.re && q.im === p.im)) continue;
      seen.push(p);
      // A closed-loop root at p (each used once: two blocks with the same pole need two copies).
      const j = chi.roots.findIndex((r, i) => !used[i] && near(r, p, Math.min(4 * chi.errors[i], 1e-3 * Math.max(1, cabs(p)))));
      if (j < 0) continue;
      used[j] = true;
      if (p.im > 0) {
        const k = chi.roots.findIndex((r, i) => !used[i] && r.re === chi.roots[j].re && r.im === -chi.roots[j].im);
        if (k >= 0) used[k] = true;
      }
      const cancelledBy: string[] = [];
      for (const u of mates[v]) {
        if (u === v || c.kinds[u] !== 'transfer') continue;
        const z = zeros(u);
        if (z === 'all' || z.some((q) => near(q, p, 0))) cancelledBy.push(c.ids[u]);
      }
      out.push({ pole: p, block: c.ids[v], cancelledBy: cancelledBy.sort(), unstable: p.re >= -TOL * Math.max(1, cabs(p)) });
    }
  }
  return out;
}

const fmtC = (z: Complex) =>
  Math.abs(z.im) < 1e-12 ? `${+z.re.toPrecision(6)}` : `${+z.re.toPrecision(6)}${z.im < 0 ? '-' : '+'}${+Math.abs(z.im).toPrecision(6)}j`;

/** Hidden modes as check findings: an unstable one is an error naming its block and the cancelling blocks. */
export function hiddenModeFindings(c: CompiledGraph, opts: ReduceOptions = {}): Finding[] {
  return hiddenModes(c, opts).map((h) => {
    const by = h.cancelledBy.length
      ? `is cancelled by a zero of block ${h.cancelledBy.join(', ')} on the loop through it`
      : 'stays a closed-loop pole: no loop through the block moves it';
    return h.unstable
      ? {
          severity: 'error' as const,
          code: 'unstable-cancellation',
          message: `the pole ${fmtC(h.pole)} of block ${h.block} ${by}: an unstable mode hidden from the feedback — the diagram is internally unstable`,
          blocks: [h.block, ...h.cancelledBy],
        }
      : {
          severity: 'info' as const,
          code: 'pole-zero-cancellation',
          message: `the pole ${fmtC(h.pole)} of block ${h.block} ${by} (a stable hidden mode)`,
          blocks: [h.block, ...h.cancelledBy],
        };
  });
}
