import { sql, type Kysely } from "kysely";

// Findings worked from new to closed. A finding is known by a key that outlives the scan that found it (its
// part and lot, or its part and the cells that lead it: server/analytics/finding-key.ts), so its status, owner and
// notes stay with it from load to load. The figures it had at the last two loads that changed the warehouse
// are kept, so the list can say a later load strengthened or weakened it; a dismissed finding keeps the count it
// was dismissed at, and comes back when it grows past it. Every change is an event: who, when, what, why.
export async function up(db: Kysely<any>): Promise<void> {
  await sql`
    CREATE TABLE finding_state (
      finding_key      text PRIMARY KEY,
      status           text NOT NULL DEFAULT 'new' CHECK (status IN ('new', 'investigating', 'confirmed', 'dismissed')),
      owner            text,
      dismissed_reason text,
      dismissed_at_observed integer,
      description      text NOT NULL,
      first_seen_at    timestamptz NOT NULL DEFAULT now(),
      changed_at       timestamptz NOT NULL DEFAULT now(),
      seen_version     text NOT NULL,
      observed         integer NOT NULL,
      expected         double precision NOT NULL,
      lower            double precision NOT NULL,
      prev_version     text,
      prev_observed    integer,
      prev_expected    double precision,
      prev_lower       double precision,
      figures_changed_at timestamptz NOT NULL DEFAULT now()
    )
  `.execute(db);
  await sql`
    CREATE TABLE finding_event (
      event_id     bigint GENERATED ALWAYS AS IDENTITY PRIMARY KEY,
      finding_key  text NOT NULL REFERENCES finding_state (finding_key) ON DELETE CASCADE,
      at           timestamptz NOT NULL DEFAULT now(),
      actor        text NOT NULL,
      actor_sub    text,
      kind         text NOT NULL CHECK (kind IN ('found', 'status', 'owner', 'note', 'figures')),
      from_value   text,
      to_value     text,
      note         text
    )
  `.execute(db);
  await sql`CREATE INDEX finding_event_key_idx ON finding_event (finding_key, at DESC)`.execute(db);
}

export async function down(db: Kysely<any>): Promise<void> {
  await sql`DROP TABLE finding_event`.execute(db);
  await sql`DROP TABLE finding_state`.execute(db);
}
