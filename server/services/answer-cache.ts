import type { Request, Response } from "express";
import { LRUCache } from "lru-cache";
import type { Db } from "../db/database.js";
import type { ShopScope } from "../../shared/schemas/me.js";
import { dataVersion } from "../db/queries/data-version.js";
import { PreparedJson } from "../http/prepared-json.js";
import { ResultCache } from "./result-cache.js";

/** Bytes of prepared answers one cache keeps by default (each route has its own cache). */
const DEFAULT_BYTES = 8 * 1024 * 1024;

/**
 * For routes whose single answer can pass 8 MB on a large warehouse: the cluster list and detail carry every
 * repair line of their clusters (tens of MB at ten million lines), and an answer larger than its cache is
 * never kept, so every request would build it again.
 */
export const LARGE_ANSWERS = 96 * 1024 * 1024;

/**
 * Answers a route computes from the warehouse alone, kept per request and data version: the first call
 * after a load computes, later calls with the same key (path, caller's scope, query) get the same answer
 * until the next load or exposure rebuild.
 *
 * - `get` keeps values (at most `max`, least recently used go first), for answers a route builds on;
 * - `send` keeps whole responses, serialised and compressed once ({@link PreparedJson}), bounded in bytes
 *   (`maxBytes`), and writes them; concurrent first calls share one computation.
 */
export class AnswerCache {
  private readonly results: ResultCache<unknown>;
  private readonly prepared: LRUCache<string, { version: string; answer: PreparedJson }>;
  private readonly computing = new Map<string, Promise<PreparedJson>>();

  constructor(
    private readonly db: Db,
    max: number,
    maxBytes = DEFAULT_BYTES,
  ) {
    this.results = new ResultCache<unknown>(max);
    this.prepared = new LRUCache({ maxSize: maxBytes, sizeCalculation: (e) => e.answer.bytes });
  }

  async get<T>(key: unknown, compute: () => Promise<T>): Promise<T> {
    return (await this.results.get(JSON.stringify(key), await dataVersion(this.db), compute)) as T;
  }

  /** The answer to one request, keyed by its path, the caller's shop scope and its query string. */
  forRequest<T>(req: { path: string; query: unknown }, scope: ShopScope, compute: () => Promise<T>): Promise<T> {
    return this.get([req.path, scope, req.query], compute);
  }

  /** The prepared answer for a key at the current data version, computed once however many ask at once. */
  async answer(key: unknown, compute: () => Promise<unknown>): Promise<PreparedJson> {
    const k = JSON.stringify(key);
    const version = await dataVersion(this.db);
    const hit = this.prepared.get(k);
    if (hit && hit.version === version) return hit.answer;
    const flight = `${version}\u0001${k}`;
    let pending = this.computing.get(flight);
    if (!pending) {
      pending = compute().then((value) => new PreparedJson(value));
      this.computing.set(flight, pending);
      pending.then(
        (answer) => {
          this.computing.delete(flight);
          this.prepared.set(k, { version, answer });
        },
        () => this.computing.delete(flight),
      );
    }
    return await pending;
  }

  /** Answers one request (path, scope, query as the key) from the cache, computing it the first time. */
  async send(req: Request, res: Response, scope: ShopScope, compute: () => Promise<unknown>): Promise<void> {
    const answer = await this.answer([req.path, scope, req.query], compute);
    await answer.send(req, res);
  }
}
