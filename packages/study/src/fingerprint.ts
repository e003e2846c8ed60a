/**
 * The diagram fingerprint: what the engine sees of a diagram — parameters, blocks (kind,
 * label, parameters), wires, cuts, sweeps and simulation settings — and not its layout, title,
 * description or view. Two diagrams with the same fingerprint give the same results, so the
 * apps key caches and "has anything changed" on it.
 */
import type { Diagram } from '@loopwright/graph';

/**
 * The analysis's view of a diagram as a canonical text (exact: use it as a cache key), without
 * the simulation settings (no locus or margin depends on them); `without` leaves one
 * parameter's value out.
 */
export function engineText(d: Diagram, without?: string): string {
  if (without !== undefined || memo === null) return textOf(d, without);
  let text = memo.get(d);
  if (text === undefined) memo.set(d, (text = textOf(d)));
  return text;
}

/**
 * Texts of the diagrams seen during the current `withTextMemo` call, by object (null outside
 * one). A slider step keys half a dozen caches on the same diagram's text, 30–40 µs each to write.
 */
let memo: WeakMap<Diagram, string> | null = null;

/**
 * Runs `fn` with each diagram's engine text written once per object: for one request, during
 * which no diagram is changed in place (nested calls share the outer memo).
 */
export function withTextMemo<T>(fn: () => T): T {
  if (memo !== null) return fn();
  memo = new WeakMap();
  try {
    return fn();
  } finally {
    memo = null;
  }
}

function textOf(d: Diagram, without?: string): string {
  return JSON.stringify([
    d.parameters.map((p) => [p.name, p.name === without ? null : p.value, p.min ?? null, p.max ?? null, p.scale ?? null, p.unit ?? null]),
    d.blocks.map((b) => [b.id, b.kind, b.label ?? null, b.params]),
    d.wires.map((w) => [w.id, w.from.block, w.from.port, w.to.block, w.to.port]),
    d.cuts.map((c) => [c.id, c.wire, c.label ?? null]),
    d.sweeps.map((s) => [s.id, s.parameter, s.min, s.max, s.scale]),
  ]);
}

/**
 * Everything the engine sees, simulation settings included, and which blocks have fit records
 * (the checks warn about records of missing blocks; a document without records keeps its old
 * fingerprint).
 */
export const fingerprintText = (d: Diagram): string =>
  `${engineText(d)}|${JSON.stringify(d.simulation ?? {})}${d.fits?.length ? `|${JSON.stringify(d.fits.map((f) => f.block))}` : ''}`;

/** cyrb53: a fast 53-bit string hash (public domain, bryc) — short identities, not security. */
function hash53(text: string): number {
  let h1 = 0xdeadbeef;
  let h2 = 0x41c6ce57;
  for (let i = 0; i < text.length; i++) {
    const ch = text.charCodeAt(i);
    h1 = Math.imul(h1 ^ ch, 2654435761);
    h2 = Math.imul(h2 ^ ch, 1597334677);
  }
  h1 = Math.imul(h1 ^ (h1 >>> 16), 2246822507) ^ Math.imul(h2 ^ (h2 >>> 13), 3266489909);
  h2 = Math.imul(h2 ^ (h2 >>> 16), 2246822507) ^ Math.imul(h1 ^ (h1 >>> 13), 3266489909);
  return 4294967296 * (2097151 & h2) + (h1 >>> 0);
}

/** A short identity of what the engine sees (14 hex digits). Equal diagrams, equal fingerprints. */
export function diagramFingerprint(d: Diagram): string {
  return hash53(fingerprintText(d)).toString(16).padStart(14, '0');
}
