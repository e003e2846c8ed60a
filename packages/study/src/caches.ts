/**
 * The study package keeps slider-independent work (loci, characteristic-polynomial splits,
 * compiled models, findings) in small LRU caches. Each cache registers here so that a caller
 * can drop them all: to free memory, or to make two callers compute afresh (agreement tests).
 */
import type { Lru } from './cache.ts';

const registry: Lru<unknown>[] = [];

export function registerCache<V>(c: Lru<V>): Lru<V> {
  registry.push(c as Lru<unknown>);
  return c;
}

export function clearCaches(): void {
  for (const c of registry) c.clear();
}
