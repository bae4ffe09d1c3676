/**
 * A small in-process cache for expensive analytics results, keyed by request and valid for one data
 * version (see dataVersion): a new load or rebuild makes every entry stale. Least recently used entries go first.
 */
export class ResultCache<T> {
  private entries = new Map<string, { version: string; value: Promise<T> }>();
  constructor(private readonly max = 100) {}

  async get(key: string, version: string, compute: () => Promise<T>): Promise<T> {
    const hit = this.entries.get(key);
    if (hit && hit.version === version) {
      this.entries.delete(key);
      this.entries.set(key, hit);
      return await hit.value;
    }
    const value = compute();
    this.entries.set(key, { version, value });
    value.catch(() => this.entries.delete(key));
    while (this.entries.size > this.max) this.entries.delete(this.entries.keys().next().value!);
    return await value;
  }
}
