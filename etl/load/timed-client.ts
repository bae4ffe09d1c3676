import pg from "pg";

/**
 * A pg client that prints each statement's duration to stderr (ETL_TIMINGS=1, for tuning). It is handed to
 * pg.Pool through its documented `Client` option, so nothing patches a live client.
 */
export class TimedClient extends pg.Client {
  // pg's query() has many overloads; this forwards them all unchanged and times the promise form.
  override query(...args: unknown[]): never {
    const t0 = Date.now();
    const result = (super.query as (...a: unknown[]) => unknown)(...args);
    if (result instanceof Promise) {
      void result.then(
        () => process.stderr.write(`${Date.now() - t0} ms  ${String(args[0]).replace(/\s+/g, " ").slice(0, 90)}\n`),
        () => undefined,
      );
    }
    return result as never;
  }
}

/** Pool options for the ETL's own pools: the timed client when ETL_TIMINGS is set. */
export function etlPoolConfig(connectionString: string, max: number): pg.PoolConfig {
  return { connectionString, max, ...(process.env.ETL_TIMINGS ? { Client: TimedClient } : {}) };
}
