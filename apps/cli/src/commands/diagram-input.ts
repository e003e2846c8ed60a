import { type Diagram, type SignalRef, parseDiagram } from '@loopwright/graph';
import { type Complex, poly } from '@loopwright/lti';
import { UsageError, type CliIo } from '../io.ts';

/** Reads and validates a diagram file; a missing or unreadable file is a usage error naming it. */
export async function readDiagram(io: CliIo, path: string): Promise<Diagram> {
  let text: string;
  try {
    text = await io.readFile(path);
  } catch (err) {
    const code = (err as { code?: string }).code;
    throw new UsageError(`cannot read ${path}${code === 'ENOENT' ? ': no such file' : `: ${err instanceof Error ? err.message : String(err)}`}`);
  }
  return parseDiagram(text);
}

/**
 * A point named on the command line: "block:ID", "wire:ID", or a bare ID that names exactly
 * one block or wire of the diagram.
 */
export function signalRef(d: Diagram, text: string, flag: string): SignalRef {
  const m = /^(block|wire):(.+)$/.exec(text);
  if (m) {
    const ref = m[1] === 'block' ? { block: m[2] } : { wire: m[2] };
    const known = m[1] === 'block' ? d.blocks.some((b) => b.id === m[2]) : d.wires.some((w) => w.id === m[2]);
    if (!known) throw new UsageError(`--${flag} ${text}: the diagram has no ${m[1]} "${m[2]}"`);
    return ref;
  }
  const isBlock = d.blocks.some((b) => b.id === text);
  const isWire = d.wires.some((w) => w.id === text);
  if (isBlock && isWire) throw new UsageError(`--${flag} ${text}: both a block and a wire have this id; write block:${text} or wire:${text}`);
  if (isBlock) return { block: text };
  if (isWire) return { wire: text };
  const hint = d.blocks.filter((b) => b.kind === 'source' || b.kind === 'probe').map((b) => b.id);
  throw new UsageError(`--${flag} ${text}: no block or wire with this id${hint.length ? ` (sources and probes: ${hint.join(', ')})` : ''}`);
}

/** JSON form of results: complex numbers {re, im} become [re, im] (DEVELOPERS.md). */
export function jsonForm(v: unknown): unknown {
  if (Array.isArray(v)) return v.map(jsonForm);
  if (v && typeof v === 'object') {
    const o = v as Record<string, unknown>;
    const keys = Object.keys(o);
    if (keys.length === 2 && typeof o.re === 'number' && typeof o.im === 'number') return [o.re, o.im];
    const out: Record<string, unknown> = {};
    for (const k of keys) out[k] = jsonForm(o[k]);
    return out;
  }
  return v;
}

const num = (x: number, digits = 6) => {
  if (!Number.isFinite(x)) return x > 0 ? 'inf' : x < 0 ? '-inf' : 'n/a';
  const r = Number(x.toPrecision(digits));
  return Object.is(r, -0) ? '0' : String(r);
};
export const fmtNumber = num;

/** Roots for people: conjugate pairs once as "a ± bj". */
export function fmtRoots(roots: readonly Complex[]): string {
  if (roots.length === 0) return 'none';
  const out: string[] = [];
  for (const z of roots) {
    if (z.im < 0 && roots.some((w) => w.im > 0 && Math.abs(w.re - z.re) <= 1e-12 * Math.max(1, Math.abs(z.re)) && Math.abs(w.im + z.im) <= 1e-12 * Math.max(1, Math.abs(z.im)))) continue;
    out.push(z.im === 0 ? num(z.re) : `${num(z.re)} ± ${num(Math.abs(z.im))}j`);
  }
  return out.join(', ');
}

/** A rational function with dead time, highest power first, as the parser reads it back. */
export function fmtTransfer(numAsc: readonly number[], denAsc: readonly number[], delay: number): string {
  const n = poly.format(numAsc);
  const isOne = denAsc.length === 1 && denAsc[0] === 1;
  const body = isOne ? n : `(${n})/(${poly.format(denAsc)})`;
  return delay > 0 ? `${isOne ? `(${body})` : body}*exp(-${num(delay, 12)}*s)` : body;
}

/** Refuses --set names the diagram does not define (a typo would otherwise be silently ignored). */
export function checkSets(d: Diagram, sets: Record<string, number>): void {
  const known = new Set(d.parameters.map((p) => p.name));
  for (const name of Object.keys(sets)) {
    if (!known.has(name)) {
      throw new UsageError(`--set ${name}: the diagram has no named parameter "${name}" (known: ${[...known].join(', ') || 'none'})`);
    }
  }
}
