import pg from "pg";
import { Kysely, PostgresDialect } from "kysely";
import type { Database } from "./schema.js";

// date columns stay ISO strings ("2024-01-03"). bigint stays a string (pg's default): warehouse keys are
// 64-bit hashes beyond 2^53, so counts are converted with Number() where they are read.
pg.types.setTypeParser(1082, (v: string) => v);

export type Db = Kysely<Database>;

export function createPool(connectionString: string, max = 10): pg.Pool {
  return new pg.Pool({ connectionString, max });
}

export function createDb(connectionString: string, max = 10): { db: Db; pool: pg.Pool } {
  const pool = createPool(connectionString, max);
  return { db: new Kysely<Database>({ dialect: new PostgresDialect({ pool }) }), pool };
}
