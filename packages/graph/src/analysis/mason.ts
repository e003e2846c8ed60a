import { InputError, deadlineTicker, poly } from '@loopwright/lti';

/**
 * Exact signal-flow reduction by Mason's gain formula, carried out on polynomials so that no
 * division ever happens (Mason, "Feedback theory — further properties of signal flow graphs",
 * Proc. IRE 44 (1956) (from memory)). With node gains G_v = N_v/D_v, multiplying Mason's graph
 * determinant Δ by Π D_v turns every term into a plain product:
 *
 *   Π D_v · Δ = Σ over sets S of pairwise disjoint loops (−1)^|S| · Π w(S) · Π_{v∈S} N_v · Π_{v∉S} D_v
 *
 * This polynomial is the determinant of the interconnection (the characteristic polynomial of
 * the closed loops, hidden modes included), and it is multilinear in each block's coefficients:
 * a gain that enters one block once enters it affinely, which is what the exact sweep relies on.
 */
export interface FlowGraph {
  n: number;
  num: readonly (readonly number[])[];
  den: readonly (readonly number[])[];
  /** Merged parallel branches: adj[v] lists (to, weight) with weight ≠ 0. */
  adj: readonly { to: number; w: number }[][];
}

export interface Cycle {
  nodes: number[];
  weight: number;
}

export interface Path {
  nodes: number[];
  weight: number;
}

/** Bounds that keep enumeration finite on pathological diagrams (refused with a clear message). */
export const MAX_LOOPS = 4000;
export const MAX_PATHS = 4000;
const MAX_TERMS = 200000;

export function flowGraph(
  n: number,
  num: readonly (readonly number[])[],
  den: readonly (readonly number[])[],
  branches: readonly { from: number; to: number; weight: number }[],
): FlowGraph {
  const merged: Map<number, number>[] = Array.from({ length: n }, () => new Map());
  for (const b of branches) {
    if (b.to < 0) continue;
    const m = merged[b.from];
    m.set(b.to, (m.get(b.to) ?? 0) + b.weight);
  }
  const adj = merged.map((m) => [...m].filter(([, w]) => w !== 0).map(([to, w]) => ({ to, w })));
  return { n, num, den, adj };
}

/** Strongly connected component id of each node (Tarjan). */
export function components(g: FlowGraph): number[] {
  const idx = new Array<number>(g.n).fill(-1);
  const low = new Array<number>(g.n).fill(0);
  const comp = new Array<number>(g.n).fill(-1);
  const stack: number[] = [];
  const on = new Array<boolean>(g.n).fill(false);
  let counter = 0;
  let nComp = 0;
  const visit = (v: number) => {
    idx[v] = low[v] = counter++;
    stack.push(v);
    on[v] = true;
    for (const { to } of g.adj[v]) {
      if (idx[to] < 0) {
        visit(to);
        low[v] = Math.min(low[v], low[to]);
      } else if (on[to]) low[v] = Math.min(low[v], idx[to]);
    }
    if (low[v] === idx[v]) {
      let x: number;
      do {
        x = stack.pop()!;
        on[x] = false;
        comp[x] = nComp;
      } while (x !== v);
      nComp++;
    }
  };
  for (let v = 0; v < g.n; v++) if (idx[v] < 0) visit(v);
  return comp;
}

/**
 * Every simple cycle, each found once from its lowest-numbered node; the search stays inside
 * that node's strongly connected component.
 */
export function simpleCycles(g: FlowGraph, comp = components(g), deadline?: number): Cycle[] {
  const ticker = deadlineTicker(deadline, 'reduction (loop enumeration)', 256);
  const cycles: Cycle[] = [];
  const onPath = new Array<boolean>(g.n).fill(false);
  const path: number[] = [];
  for (let s = 0; s < g.n; s++) {
    const dfs = (v: number, weight: number) => {
      ticker.tick();
      for (const { to, w } of g.adj[v]) {
        if (to === s) {
          cycles.push({ nodes: path.slice(), weight: weight * w });
          if (cycles.length > MAX_LOOPS) {
            throw new InputError(`the diagram has more than ${MAX_LOOPS} feedback loops: too interconnected for exact reduction`);
          }
        } else if (to > s && !onPath[to] && comp[to] === comp[s]) {
          onPath[to] = true;
          path.push(to);
          dfs(to, weight * w);
          path.pop();
          onPath[to] = false;
        }
      }
    };
    onPath[s] = true;
    path.push(s);
    dfs(s, 1);
    path.pop();
    onPath[s] = false;
  }
  return cycles;
}

/** Every simple path from `from` to `to` (the node lists include both ends). */
export function forwardPaths(g: FlowGraph, from: number, to: number, deadline?: number): Path[] {
  const ticker = deadlineTicker(deadline, 'reduction (path enumeration)', 256);
  const out: Path[] = [];
  const on = new Array<boolean>(g.n).fill(false);
  const path: number[] = [from];
  on[from] = true;
  const dfs = (v: number, weight: number) => {
    ticker.tick();
    if (v === to) {
      out.push({ nodes: path.slice(), weight });
      if (out.length > MAX_PATHS)
        throw new InputError(`more than ${MAX_PATHS} signal paths between the two points: too interconnected for exact reduction`);
      return;
    }
    for (const { to: x, w } of g.adj[v]) {
      if (on[x]) continue;
      on[x] = true;
      path.push(x);
      dfs(x, weight * w);
      path.pop();
      on[x] = false;
    }
  };
  dfs(from, 1);
  return out;
}

/**
 * Π_{v not excluded} D_v · Δ(excluded): the graph determinant of the subgraph without the
 * excluded nodes (Mason's Δ_k for a forward path when the path's nodes are excluded).
 */
export function determinantPoly(g: FlowGraph, cycles: readonly Cycle[], excluded?: readonly boolean[], deadline?: number): number[] {
  const ticker = deadlineTicker(deadline, 'reduction (determinant)', 256);
  const allowed = excluded ? cycles.filter((c) => !c.nodes.some((v) => excluded[v])) : cycles.slice();
  const inLoop = new Array<boolean>(g.n).fill(false);
  for (const c of allowed) for (const v of c.nodes) inLoop[v] = true;
  let common: number[] = [1];
  const loopNodes: number[] = [];
  for (let v = 0; v < g.n; v++) {
    if (excluded && excluded[v]) continue;
    if (inLoop[v]) loopNodes.push(v);
    else common = poly.mul(common, g.den[v]);
  }
  if (common.length === 0) return [];
  const used = new Array<boolean>(g.n).fill(false);
  const acc = new SignedSum();
  let terms = 0;
  const addTerm = (sign: number) => {
    let p: number[] = [sign];
    let pa: number[] = [1];
    for (const v of loopNodes) {
      const f = used[v] ? g.num[v] : g.den[v];
      p = poly.mul(p, f);
      if (p.length === 0) return;
      pa = poly.mul(pa, f.map(Math.abs));
    }
    acc.add(p, pa);
  };
  const choose = (start: number, sign: number) => {
    ticker.tick();
    if (++terms > MAX_TERMS) throw new InputError('too many combinations of non-touching loops: too interconnected for exact reduction');
    addTerm(sign);
    for (let i = start; i < allowed.length; i++) {
      const c = allowed[i];
      if (c.nodes.some((v) => used[v])) continue;
      for (const v of c.nodes) used[v] = true;
      choose(i + 1, -sign * c.weight);
      for (const v of c.nodes) used[v] = false;
    }
  };
  choose(0, 1);
  return poly.mul(common, acc.value());
}

/**
 * A sum of polynomial terms that also sums their coefficient magnitudes, so that a coefficient
 * which cancels to round-off (e.g. 1000 − 1000 giving 1e−13) is set to exactly zero: anything
 * below a few ulps of the magnitudes that formed it carries no information.
 */
class SignedSum {
  private sum: number[] = [];
  private mag: number[] = [];
  add(p: readonly number[], pAbs: readonly number[]): void {
    for (let i = 0; i < p.length; i++) {
      this.sum[i] = (this.sum[i] ?? 0) + p[i];
      this.mag[i] = (this.mag[i] ?? 0) + (pAbs[i] ?? Math.abs(p[i]));
    }
  }
  value(): number[] {
    return poly.trim(this.sum.map((c, i) => (Math.abs(c) <= 1e-12 * this.mag[i] ? 0 : c)));
  }
}

/**
 * Transmission from node `from` to node `to` as num/den polynomials (not normalised, not
 * cancelled): den = Π D_v · Δ over the given graph, num = Σ_k P_k · Π D_v · Δ_k.
 */
export function transmission(
  g: FlowGraph,
  from: number,
  to: number,
  cycles = simpleCycles(g),
  deadline?: number,
): { num: number[]; den: number[] } {
  const den = determinantPoly(g, cycles, undefined, deadline);
  const acc = new SignedSum();
  for (const p of forwardPaths(g, from, to, deadline)) {
    const excluded = new Array<boolean>(g.n).fill(false);
    let gain: number[] = [p.weight];
    for (const v of p.nodes) {
      excluded[v] = true;
      gain = poly.mul(gain, g.num[v]);
    }
    if (gain.length === 0) continue;
    const term = poly.mul(gain, determinantPoly(g, cycles, excluded, deadline));
    acc.add(term, term.map(Math.abs));
  }
  return { num: acc.value(), den };
}
