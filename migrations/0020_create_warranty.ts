import { sql, type Kysely } from "kysely";

// Warranty claims: the policy per engine family (filing days, where the packet goes), claims and their
// repair lines, an append-only audit trail, evidence attachments kept in object storage, and every
// attempt to e-mail a packet. Claim-day and retention defaults are common practice, no source; the
// addresses are on a reserved domain (.invalid) and stand in for the maker's claim desks.

const POLICIES = [
  { engine_family: "K18-3G", claim_days: 30, part_retention_days: 60, warranty_email: "claims-k18@warranty.ironledger.invalid" },
  { engine_family: "K26-4R", claim_days: 30, part_retention_days: 60, warranty_email: "claims-k26@warranty.ironledger.invalid" },
  { engine_family: "K38-4H", claim_days: 30, part_retention_days: 60, warranty_email: "claims-k38@warranty.ironledger.invalid" },
  // fallback for an engine family with no row of its own
  { engine_family: "*", claim_days: 30, part_retention_days: 60, warranty_email: "claims@warranty.ironledger.invalid" },
];

export async function up(db: Kysely<any>): Promise<void> {
  await sql`
    CREATE TABLE warranty_policy (
      engine_family       text PRIMARY KEY,
      claim_days          integer NOT NULL CHECK (claim_days BETWEEN 1 AND 365),
      part_retention_days integer NOT NULL CHECK (part_retention_days BETWEEN 0 AND 365),
      warranty_email      text NOT NULL CHECK (warranty_email LIKE '%_@_%'),
      updated_at          timestamptz NOT NULL DEFAULT now()
    )
  `.execute(db);
  await db.insertInto("warranty_policy").values(POLICIES).execute();

  await sql`CREATE SEQUENCE warranty_claim_number_seq`.execute(db);
  await sql`
    CREATE TABLE warranty_claim (
      claim_id         bigint GENERATED ALWAYS AS IDENTITY PRIMARY KEY,
      claim_number     text NOT NULL UNIQUE,
      kind             text NOT NULL CHECK (kind IN ('repair','campaign')),
      status           text NOT NULL DEFAULT 'draft' CHECK (status IN ('draft','submitted','accepted','rejected','credited')),
      title            text NOT NULL,
      -- null for a campaign case whose repair lines span several shops
      shop_code        text,
      engine_family    text NOT NULL,
      -- the RO close date the deadline counts from
      closed_date      date NOT NULL,
      claim_days       integer NOT NULL,
      deadline         date NOT NULL,
      amount_claimed   numeric(12,2),
      amount_credited  numeric(12,2),
      reason           text,
      note             text,
      cluster_id       text,
      cluster_snapshot jsonb,
      created_by       text NOT NULL,
      created_by_name  text NOT NULL,
      created_at       timestamptz NOT NULL DEFAULT now(),
      updated_at       timestamptz NOT NULL DEFAULT now(),
      submitted_at     timestamptz,
      decided_at       timestamptz,
      credited_at      timestamptz,
      CONSTRAINT warranty_claim_campaign_has_cluster CHECK (kind = 'repair' OR cluster_id IS NOT NULL),
      CONSTRAINT warranty_claim_rejected_has_reason CHECK (status <> 'rejected' OR reason IS NOT NULL),
      CONSTRAINT warranty_claim_credited_has_amount CHECK (status <> 'credited' OR amount_credited IS NOT NULL)
    )
  `.execute(db);
  await sql`CREATE INDEX warranty_claim_deadline_idx ON warranty_claim (deadline)`.execute(db);
  await sql`CREATE INDEX warranty_claim_shop_idx ON warranty_claim (shop_code)`.execute(db);

  await sql`
    CREATE TABLE warranty_claim_line (
      claim_id         bigint NOT NULL REFERENCES warranty_claim ON DELETE CASCADE,
      repair_line_key  bigint NOT NULL,
      shop_code        text NOT NULL,
      PRIMARY KEY (claim_id, repair_line_key)
    )
  `.execute(db);
  await sql`CREATE INDEX warranty_claim_line_repair_idx ON warranty_claim_line (repair_line_key)`.execute(db);

  await sql`
    CREATE TABLE warranty_claim_audit (
      audit_id    bigint GENERATED ALWAYS AS IDENTITY PRIMARY KEY,
      claim_id    bigint NOT NULL REFERENCES warranty_claim ON DELETE CASCADE,
      at          timestamptz NOT NULL DEFAULT now(),
      actor_sub   text NOT NULL,
      actor_name  text NOT NULL,
      action      text NOT NULL,
      changes     jsonb NOT NULL DEFAULT '{}'::jsonb
    )
  `.execute(db);
  await sql`CREATE INDEX warranty_claim_audit_claim_idx ON warranty_claim_audit (claim_id, at)`.execute(db);

  await sql`
    CREATE TABLE warranty_attachment (
      attachment_id bigint GENERATED ALWAYS AS IDENTITY PRIMARY KEY,
      claim_id      bigint NOT NULL REFERENCES warranty_claim ON DELETE CASCADE,
      s3_key        text NOT NULL UNIQUE,
      content_type  text NOT NULL,
      extension     text NOT NULL,
      size_bytes    integer NOT NULL CHECK (size_bytes > 0),
      original_name text NOT NULL,
      uploaded_by   text NOT NULL,
      uploaded_at   timestamptz NOT NULL DEFAULT now()
    )
  `.execute(db);
  await sql`CREATE INDEX warranty_attachment_claim_idx ON warranty_attachment (claim_id)`.execute(db);

  await sql`
    CREATE TABLE warranty_send (
      send_id       bigint GENERATED ALWAYS AS IDENTITY PRIMARY KEY,
      claim_id      bigint NOT NULL REFERENCES warranty_claim ON DELETE CASCADE,
      to_address    text NOT NULL,
      status        text NOT NULL CHECK (status IN ('sending','queued','sent','failed')),
      attempts      integer NOT NULL DEFAULT 0,
      last_error    text,
      message_id    text,
      requested_by  text NOT NULL,
      requested_at  timestamptz NOT NULL DEFAULT now(),
      updated_at    timestamptz NOT NULL DEFAULT now(),
      sent_at       timestamptz
    )
  `.execute(db);
  await sql`CREATE INDEX warranty_send_claim_idx ON warranty_send (claim_id, requested_at)`.execute(db);
}

export async function down(db: Kysely<any>): Promise<void> {
  for (const t of ["warranty_send", "warranty_attachment", "warranty_claim_audit", "warranty_claim_line", "warranty_claim", "warranty_policy"]) {
    await sql`DROP TABLE IF EXISTS ${sql.table(t)}`.execute(db);
  }
  await sql`DROP SEQUENCE IF EXISTS warranty_claim_number_seq`.execute(db);
}
