import { type Diagram, type SignalRef, parseDiagram } from '@loopwright/graph';
import { parseSignalRef } from '@loopwright/study';
import { type Complex, poly } from '@loopwright/lti';
import { UsageError, type CliIo } from '../io.ts';

/** The text of a diagram file, or of standard input for "-"; a missing or unreadable file is a usage error naming it. */
export async function readDiagramText(io: CliIo, path: string): Promise<string> {
  if (path === '-') {
    if (!io.readStdin) throw new UsageError('standard input is not available here: give a FILE');
    return io.readStdin();
  }
  try {
    return await io.readFile(path);
  } catch (err) {
    const code = (err as { code?: string }).code;
    throw new UsageError(
      `cannot read ${path}${code === 'ENOENT' ? ': no such file' : `: ${err instanceof Error ? err.message : String(err)}`}`,
      path,
    );
  }
}

/** Reads and validates a diagram file ("-": standard input). */
export async function readDiagram(io: CliIo, path: string): Promise<Diagram> {
  return parseDiagram(await readDiagramText(io, path));
}

/** A point named on the command line (see study parseSignalRef); `flag` names it in messages. */
export const signalRef = (d: Diagram, text: string, flag: string): SignalRef => parseSignalRef(d, text, `--${flag}`);

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
export const fmtRoots = (roots: readonly Complex[]): string => fmtRootsMarked(roots, []);

/** Words for a root found through a Padé approximant (see study PoleOrigin); nothing for an exact one. */
const ORIGIN_MARK: Record<string, string> = { exact: '', approximated: ' [via Padé]', approximant: ' [Padé artefact]' };

/** Roots as fmtRoots prints them, each marked by how it was found (origin[i] belongs to roots[i]; none: unmarked). */
export function fmtRootsMarked(roots: readonly Complex[], origin: readonly string[]): string {
  if (roots.length === 0) return 'none';
  const out: string[] = [];
  roots.forEach((z, i) => {
    // The lower member of a conjugate pair is said with the upper one.
    const tol = (v: number) => 1e-12 * Math.max(1, Math.abs(v));
    if (z.im < 0 && roots.some((w) => w.im > 0 && Math.abs(w.re - z.re) <= tol(z.re) && Math.abs(w.im + z.im) <= tol(z.im))) return;
    out.push(`${z.im === 0 ? num(z.re) : `${num(z.re)} ± ${num(Math.abs(z.im))}j`}${ORIGIN_MARK[origin[i]] ?? ''}`);
  });
  return out.join(', ');
}

/** A note on Padé marks when any root carries one. */
export function padeLegend(origin: readonly string[]): string | null {
  return origin.some((o) => o !== 'exact')
    ? '[via Padé]: approximates a true root (stays put at a Padé order two higher); [Padé artefact]: belongs to the approximation of a dead time, not to the plant'
    : null;
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
      throw new UsageError(
        `--set ${name}: the diagram has no named parameter "${name}" (known: ${[...known].join(', ') || 'none'})`,
        '--set',
      );
    }
  }
}
