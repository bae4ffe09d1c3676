import { sql, type Kysely } from "kysely";

// An engine family's own compression figures, as an administrator types them from the maker's service manual:
// the target range and the allowable minimum (kept in psi, the warehouse's canonical pressure unit, beside the
// unit they were typed in) and, optionally, the heater plug's healthy maximum resistance in ohms, with the
// source in words. Versioned as warranty policies are (0063): a save is a new version and never changes an old
// one, so a verdict can always be traced to the figures that decided it. A family without a row keeps the
// generic bands.
export async function up(db: Kysely<any>): Promise<void> {
  await sql`
    CREATE TABLE engine_spec_version (
      spec_version_id      bigint GENERATED ALWAYS AS IDENTITY PRIMARY KEY,
      engine_family        text NOT NULL CHECK (engine_family ~ '^[A-Za-z0-9][A-Za-z0-9._-]{0,39}$'),
      version              integer NOT NULL CHECK (version >= 1),
      entered_unit         text NOT NULL CHECK (entered_unit IN ('psi', 'kPa', 'bar')),
      target_min_psi       numeric NOT NULL CHECK (target_min_psi > 0),
      target_max_psi       numeric NOT NULL CHECK (target_max_psi <= 2000),
      allowable_min_psi    numeric NOT NULL CHECK (allowable_min_psi > 0),
      plug_healthy_max_ohm numeric CHECK (plug_healthy_max_ohm > 0 AND plug_healthy_max_ohm <= 10),
      source               text NOT NULL CHECK (length(btrim(source)) BETWEEN 3 AND 200),
      saved_by             text NOT NULL,
      saved_at             timestamptz NOT NULL DEFAULT now(),
      note                 text NOT NULL,
      UNIQUE (engine_family, version),
      CHECK (allowable_min_psi <= target_min_psi AND target_min_psi <= target_max_psi)
    )
  `.execute(db);
}

export async function down(db: Kysely<any>): Promise<void> {
  await sql`DROP TABLE engine_spec_version`.execute(db);
}
