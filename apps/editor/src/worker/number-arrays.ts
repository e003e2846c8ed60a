/**
 * Long arrays of numbers cross the worker boundary as Float64Arrays, moved rather than copied,
 * and are plain arrays again on the page. A structured clone reads a JS array element by
 * element: a slider step's response reply (two runs, about 16,000 trace samples) took 2.5 ms of
 * the page's main thread to read in Chromium, where one typed array is one block of memory.
 * Nothing else about a message changes: the page gets the same shapes and values (NaN and ±∞
 * included) as the worker posted.
 */

/** The wrapper key of a packed array (no result field is named like this). */
const KEY = '\u0000f64';
/** Shorter arrays are not worth a buffer of their own. */
const MIN_LENGTH = 32;

function allNumbers(a: unknown[]): boolean {
  for (let i = 0; i < a.length; i++) if (typeof a[i] !== 'number') return false;
  return true;
}

const isPlain = (v: unknown): v is Record<string, unknown> =>
  v !== null && typeof v === 'object' && Object.getPrototypeOf(v) === Object.prototype;

function pack(v: unknown, transfer: ArrayBuffer[]): unknown {
  if (Array.isArray(v)) {
    if (v.length >= MIN_LENGTH && allNumbers(v)) {
      const f = Float64Array.from(v as number[]);
      transfer.push(f.buffer);
      return { [KEY]: f };
    }
    // copied where something inside changed: the worker's caches may hold the original
    let out: unknown[] | null = null;
    for (let i = 0; i < v.length; i++) {
      const p = pack(v[i], transfer);
      if (!Object.is(p, v[i])) (out ??= v.slice())[i] = p;
    }
    return out ?? v;
  }
  if (isPlain(v)) {
    let out: Record<string, unknown> | null = null;
    for (const k in v) {
      const p = pack(v[k], transfer);
      if (!Object.is(p, v[k])) (out ??= { ...v })[k] = p;
    }
    return out ?? v;
  }
  return v;
}

/** A message with its long number arrays packed, and the buffers to transfer with it (the message's own objects are left as they are). */
export function packNumberArrays<T>(message: T): { message: T; transfer: ArrayBuffer[] } {
  const transfer: ArrayBuffer[] = [];
  return { message: pack(message, transfer) as T, transfer };
}

/** The message as it was before packing (unpacked in place: it is the receiver's own copy). */
export function unpackNumberArrays<T>(message: T): T {
  return unpack(message) as T;
}

function unpack(v: unknown): unknown {
  if (Array.isArray(v)) {
    for (let i = 0; i < v.length; i++) v[i] = unpack(v[i]);
    return v;
  }
  if (isPlain(v)) {
    const f = v[KEY];
    if (f instanceof Float64Array) {
      const a: number[] = [];
      for (let i = 0; i < f.length; i++) a.push(f[i]);
      return a;
    }
    for (const k in v) v[k] = unpack(v[k]);
  }
  return v;
}
