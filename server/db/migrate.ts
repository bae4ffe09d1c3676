import { promises as fs } from "node:fs";
import path from "node:path";
import { fileURLToPath, pathToFileURL } from "node:url";
import { Migrator, type Kysely, type Migration, type MigrationProvider, type MigrationResultSet } from "kysely";

const migrationFolder = path.resolve(path.dirname(fileURLToPath(import.meta.url)), "../../migrations");

/**
 * Reads migrations/NNNN_*.ts. Our own provider rather than Kysely's FileMigrationProvider so that the
 * dynamic import runs through whatever loader runs this module (tsx in the CLI and server, Vite in tests).
 */
class FolderMigrationProvider implements MigrationProvider {
  async getMigrations(): Promise<Record<string, Migration>> {
    const files = (await fs.readdir(migrationFolder)).filter((f) => /^\d{4}_.+\.ts$/.test(f)).sort();
    const out: Record<string, Migration> = {};
    for (const f of files) {
      const mod = (await import(/* @vite-ignore */ pathToFileURL(path.join(migrationFolder, f)).href)) as Migration;
      out[f.replace(/\.ts$/, "")] = mod;
    }
    return out;
  }
}

/** Runs every pending migration in migrations/; throws with the failing migration's name. */
export async function migrateToLatest(db: Kysely<any>): Promise<MigrationResultSet> {
  // Parallel work lands migrations out of number order; each still runs once, in name order.
  const migrator = new Migrator({ db, provider: new FolderMigrationProvider(), allowUnorderedMigrations: true });
  const result = await migrator.migrateToLatest();
  if (result.error) {
    const failed = result.results?.find((r) => r.status === "Error")?.migrationName ?? "unknown";
    throw new Error(`migration ${failed} failed: ${String((result.error as Error).message ?? result.error)}`);
  }
  return result;
}
