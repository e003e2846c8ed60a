/** A small least-recently-used cache keyed by strings (results that do not depend on the live slider value). */
export class Lru<V> {
  private readonly map = new Map<string, V>();
  constructor(private readonly size: number) {}
  get(key: string): V | undefined {
    const v = this.map.get(key);
    if (v !== undefined) {
      this.map.delete(key);
      this.map.set(key, v);
    }
    return v;
  }
  set(key: string, v: V): V {
    this.map.delete(key);
    this.map.set(key, v);
    while (this.map.size > this.size) this.map.delete(this.map.keys().next().value as string);
    return v;
  }
  clear(): void {
    this.map.clear();
  }
}

/** Looks key up, or computes and keeps the value. */
export function cached<V>(cache: Lru<V>, key: string, compute: () => V): V {
  return cache.get(key) ?? cache.set(key, compute());
}
