import { promises as fs } from "node:fs";
import path from "node:path";
import { fileURLToPath } from "node:url";
import { FileMigrationProvider, Migrator, type Kysely, type MigrationResultSet } from "kysely";

const migrationFolder = path.resolve(path.dirname(fileURLToPath(import.meta.url)), "../../migrations");

/** Runs every pending migration in migrations/; throws with the failing migration's name. */
// eslint-disable-next-line @typescript-eslint/no-explicit-any
export async function migrateToLatest(db: Kysely<any>): Promise<MigrationResultSet> {
  const migrator = new Migrator({ db, provider: new FileMigrationProvider({ fs, path, migrationFolder }) });
  const result = await migrator.migrateToLatest();
  if (result.error) {
    const failed = result.results?.find((r) => r.status === "Error")?.migrationName ?? "unknown";
    throw new Error(`migration ${failed} failed: ${String((result.error as Error).message ?? result.error)}`);
  }
  return result;
}
