import { LRUCache } from "lru-cache";

/**
 * A small in-process cache for expensive analytics results, keyed by request and valid for one data
 * version (see dataVersion): a new load or rebuild makes every entry stale. lru-cache keeps the most
 * recently used `max` entries; a computation in flight is shared by concurrent callers, and one that fails
 * is forgotten so the next call tries again.
 */
export class ResultCache<T> {
  private readonly entries: LRUCache<string, { version: string; value: Promise<T> }>;
  constructor(max = 100) {
    this.entries = new LRUCache({ max });
  }

  async get(key: string, version: string, compute: () => Promise<T>): Promise<T> {
    const hit = this.entries.get(key);
    if (hit && hit.version === version) return await hit.value;
    const entry = { version, value: compute() };
    this.entries.set(key, entry);
    entry.value.catch(() => {
      if (this.entries.peek(key) === entry) this.entries.delete(key);
    });
    return await entry.value;
  }
}
