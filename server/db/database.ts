import pg from "pg";
import { Kysely, PostgresDialect } from "kysely";
import type { Database } from "./schema.js";
import { logger } from "../logger.js";

// date columns stay ISO strings ("2024-01-03"). bigint stays a string (pg's default): warehouse keys are
// 64-bit hashes beyond 2^53, so counts are converted with Number() where they are read.
pg.types.setTypeParser(1082, (v: string) => v);

export type Db = Kysely<Database>;

export function createPool(connectionString: string, max = 10): pg.Pool {
  const pool = new pg.Pool({ connectionString, max });
  // An idle client whose server connection ends (restart, database dropped) must not crash the process;
  // the pool discards it and the next query opens a new connection.
  pool.on("error", (err) => logger.warn({ err: err.message }, "idle database connection closed"));
  // A connection the server ends (stop, restart) between two queries of a checked-out client emits 'error'
  // with nobody listening (the pool listens only to idle ones), which would end the process: log it instead;
  // the pool discards the client and the next query connects anew.
  pool.on("connect", (client) => client.on("error", (err) => logger.warn({ err: err.message }, "database connection closed")));
  return pool;
}

export function createDb(connectionString: string, max = 10): { db: Db; pool: pg.Pool } {
  const pool = createPool(connectionString, max);
  return { db: new Kysely<Database>({ dialect: new PostgresDialect({ pool }) }), pool };
}
