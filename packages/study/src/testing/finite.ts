/**
 * The first NaN inside a result (its path), or null: results hold finite numbers, or ±Infinity
 * and null where their types document it, never NaN. For fuzz tests.
 */
export function firstNaN(x: unknown, path = 'result'): string | null {
  if (typeof x === 'number') return Number.isNaN(x) ? path : null;
  if (Array.isArray(x) || ArrayBuffer.isView(x)) {
    const a = x as ArrayLike<unknown>;
    for (let i = 0; i < a.length; i++) {
      const bad = firstNaN(a[i], `${path}[${i}]`);
      if (bad) return bad;
    }
    return null;
  }
  if (x && typeof x === 'object') {
    for (const [k, v] of Object.entries(x)) {
      const bad = firstNaN(v, `${path}.${k}`);
      if (bad) return bad;
    }
  }
  return null;
}
