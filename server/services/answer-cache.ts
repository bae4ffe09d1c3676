import type { Db } from "../db/database.js";
import type { ShopScope } from "../../shared/schemas/me.js";
import { dataVersion } from "../db/queries/data-version.js";
import { ResultCache } from "./result-cache.js";

/**
 * Answers a route computes from the warehouse alone, kept per request and data version: the first call
 * after a load computes, later calls with the same key (path, caller's scope, query) get the same answer
 * until the next load or exposure rebuild. At most `max` answers are kept (least recently used go first).
 */
export class AnswerCache {
  private readonly results: ResultCache<unknown>;

  constructor(
    private readonly db: Db,
    max: number,
  ) {
    this.results = new ResultCache<unknown>(max);
  }

  async get<T>(key: unknown, compute: () => Promise<T>): Promise<T> {
    return (await this.results.get(JSON.stringify(key), await dataVersion(this.db), compute)) as T;
  }

  /** The answer to one request, keyed by its path, the caller's shop scope and its query string. */
  forRequest<T>(req: { path: string; query: unknown }, scope: ShopScope, compute: () => Promise<T>): Promise<T> {
    return this.get([req.path, scope, req.query], compute);
  }
}
