import { LRUCache } from "lru-cache";

/** An answer with the data version it was computed for. */
export interface Served<T> {
  value: T;
  /** the data version read before the computation started: the answer reflects at least that data */
  version: string;
  /** when that computation started */
  computedAt: Date;
  /** computed for the data version current when this request read it (or a later one) */
  current: boolean;
}

interface Kept<T> {
  value: T;
  version: string;
  computedAt: Date;
  /** order of the version read behind it, so an answer for older data never replaces one for newer data */
  seq: number;
}

/**
 * Stale-while-revalidate per key: after the data version changes, a caller gets the answer kept for the
 * previous version at once, marked not current (`current: false`, with the version and time it was computed
 * for), while the new one is computed in the background, once however many ask. A caller that asks for a
 * fresh answer (`fresh`), or a key with nothing kept yet, waits for the new computation. A failed
 * computation is forgotten (the kept answer stays, and the next call tries again).
 *
 * Honesty: an answer is labelled with the version read *before* its computation started, so it holds at
 * least the data of that version; `current` is true only when that is the version the caller read.
 */
export class RevalidatingCache<T> {
  private readonly kept: LRUCache<string, Kept<T>>;
  private readonly flights = new Map<string, Promise<Kept<T>>>();
  private seq = 0;

  constructor(
    private readonly readVersion: () => Promise<string>,
    max = 50,
    private readonly onBackgroundError: (err: unknown) => void = () => undefined,
  ) {
    this.kept = new LRUCache({ max });
  }

  async get(key: string, compute: () => Promise<T>, o: { fresh?: boolean } = {}): Promise<Served<T>> {
    const seq = ++this.seq;
    const version = await this.readVersion();
    const kept = this.kept.get(key);
    // kept for this version, or for data read after ours (it holds at least what we read)
    if (kept && (kept.version === version || kept.seq > seq)) return { value: kept.value, version: kept.version, computedAt: kept.computedAt, current: true };
    const flight = this.flight(key, version, seq, compute);
    if (kept && !o.fresh) {
      flight.catch(this.onBackgroundError);
      return { value: kept.value, version: kept.version, computedAt: kept.computedAt, current: false };
    }
    const done = await flight;
    return { value: done.value, version: done.version, computedAt: done.computedAt, current: true };
  }

  /** The answer kept for `key`, without computing anything. */
  peek(key: string): Omit<Served<T>, "current"> | undefined {
    const k = this.kept.peek(key);
    return k && { value: k.value, version: k.version, computedAt: k.computedAt };
  }

  private flight(key: string, version: string, seq: number, compute: () => Promise<T>): Promise<Kept<T>> {
    const id = `${version}\u0001${key}`;
    let pending = this.flights.get(id);
    if (!pending) {
      const computedAt = new Date();
      pending = compute().then((value) => ({ value, version, computedAt, seq }));
      this.flights.set(id, pending);
      pending.then(
        (done) => {
          this.flights.delete(id);
          const now = this.kept.peek(key);
          if (!now || now.seq < done.seq) this.kept.set(key, done);
        },
        () => this.flights.delete(id),
      );
    }
    return pending;
  }
}

/**
 * The request header that asks a stale-while-revalidate route to wait for an answer computed for the current
 * data (the answer warm-up sends it, so its "warmed" means computed, not served from before).
 */
export const FRESH_HEADER = "x-answer-fresh";
export const wantsFresh = (req: { get(name: string): string | undefined }): boolean => req.get(FRESH_HEADER) === "1";
