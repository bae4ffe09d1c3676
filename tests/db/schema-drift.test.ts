import { execFile } from "node:child_process";
import { mkdtempSync, rmSync, writeFileSync } from "node:fs";
import path from "node:path";
import { promisify } from "node:util";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { freshTestDb, type TestDb } from "../helpers/test-db.js";

/**
 * server/db/schema.ts is written by hand (narrower types than a generator can know: status unions, bigint
 * keys as strings, computed columns that are never written). This test keeps it honest: kysely-codegen reads
 * the migrated database, and the TypeScript compiler checks, table by table and column by column, that the
 * hand-written types have the same tables, the same columns, the same nullability, the same kind of value
 * and the same insert-optional columns. A drift fails with the table and column named in the compiler's words.
 */
const exec = promisify(execFile);
const root = path.resolve(import.meta.dirname, "../..");

const CHECK = `
import type { ColumnType } from "kysely";
import type { DB } from "./generated.js";
import type { Database } from "../../server/db/schema.js";

type Sel<X> = X extends ColumnType<infer S, any, any> ? S : X;
type Ins<X> = X extends ColumnType<any, infer I, any> ? I : X;
type Kind<X> = [X] extends [never] ? "never" : [X] extends [string] ? "string" : [X] extends [number] ? "number"
  : [X] extends [boolean] ? "boolean" : [X] extends [Date] ? "Date" : [X] extends [readonly unknown[]] ? "array" : "json";
type Nullable<X> = null extends Sel<X> ? "nullable" : "not null";
type Optional<X> = [Ins<X>] extends [never] ? "optional" : undefined extends Ins<X> ? "optional" : "required";
type Shared = keyof DB & keyof Database;
// Columns NOT NULL without a default that a BEFORE INSERT trigger fills when an insert leaves them out: the
// database does not require them on insert, though an introspection cannot see it (migration 0063).
type TRIGGER_FILLED = "warranty_claim.policy_version_id";
// A view's columns read as nullable to any introspection: views are checked for columns and value kinds only.
type Tables = Exclude<Shared, VIEWS>;
type Cols<T extends Shared> = keyof DB[T] & keyof Database[T];
type Each<T extends Shared, F> = { [C in Cols<T>]: F extends "kind"
  ? Kind<NonNullable<Sel<DB[T][C]>>> extends Kind<NonNullable<Sel<Database[T][C]>>> ? never : \`\${T & string}.\${C & string}: database \${Kind<NonNullable<Sel<DB[T][C]>>>}, schema.ts \${Kind<NonNullable<Sel<Database[T][C]>>>}\`
  : F extends "null"
  ? Nullable<DB[T][C]> extends Nullable<Database[T][C]> ? never : \`\${T & string}.\${C & string}: database \${Nullable<DB[T][C]>}, schema.ts \${Nullable<Database[T][C]>}\`
  : Nullable<DB[T][C]> extends "nullable" ? never
  : \`\${T & string}.\${C & string}\` extends TRIGGER_FILLED ? never
  : Optional<DB[T][C]> extends Optional<Database[T][C]> ? never : \`\${T & string}.\${C & string}: on insert database \${Optional<DB[T][C]>}, schema.ts \${Optional<Database[T][C]>}\`;
}[Cols<T>];
type Drift<F> = { [T in (F extends "kind" ? Shared : Tables)]: Each<T, F> }[F extends "kind" ? Shared : Tables];

// The template literal makes the compiler print the offending names rather than the alias.
type Report<X extends string> = [X] extends [never] ? "in step" : \`\${X}\`;
export const tablesMissingFromSchema: Report<Exclude<keyof DB, keyof Database>> = "in step";
export const tablesNotInDatabase: Report<Exclude<keyof Database, keyof DB>> = "in step";
export const columnsMissingFromSchema: Report<{ [T in Shared]: \`\${T & string}.\${Exclude<keyof DB[T], keyof Database[T]> & string}\` }[Shared]> = "in step";
export const columnsNotInDatabase: Report<{ [T in Shared]: \`\${T & string}.\${Exclude<keyof Database[T], keyof DB[T]> & string}\` }[Shared]> = "in step";
export const nullability: Report<Drift<"null"> & string> = "in step";
export const valueKinds: Report<Drift<"kind"> & string> = "in step";
export const insertOptional: Report<Drift<"insert"> & string> = "in step";
`;

let t: TestDb;
let dir: string;
beforeAll(async () => {
  t = await freshTestDb();
  dir = mkdtempSync(path.join(root, ".data", "schema-drift-"));
});
afterAll(async () => {
  await t?.drop();
  if (dir) rmSync(dir, { recursive: true, force: true });
});

describe("server/db/schema.ts against the migrated database", () => {
  it("has the tables, columns, nullability, value kinds and insert-optional columns kysely-codegen reads", async () => {
    await exec(
      "npx",
      ["kysely-codegen", "--url", t.url, "--dialect", "postgres", "--date-parser", "string", "--numeric-parser", "string",
        "--exclude-pattern", "kysely_*", "--out-file", path.join(dir, "generated.ts"), "--log-level", "error"],
      { cwd: root },
    );
    const views = await t.pool.query<{ table_name: string }>(
      "SELECT table_name FROM information_schema.views WHERE table_schema = 'public' ORDER BY 1",
    );
    const viewUnion = views.rows.map((v) => JSON.stringify(v.table_name)).join(" | ") || "never";
    writeFileSync(path.join(dir, "check.ts"), CHECK.replace("VIEWS", viewUnion));
    writeFileSync(
      path.join(dir, "tsconfig.json"),
      JSON.stringify({ extends: path.join(root, "tsconfig.json"), compilerOptions: { noEmit: true }, include: ["check.ts"] }),
    );
    const result = await exec("npx", ["tsc", "-p", path.join(dir, "tsconfig.json")], { cwd: root }).then(
      () => "",
      (e: { stdout?: string; stderr?: string }) => `${e.stdout ?? ""}${e.stderr ?? ""}`,
    );
    expect(result).toBe("");
  });
});
