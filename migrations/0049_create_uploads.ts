import { sql, type Kysely } from "kysely";

// Export files fed from the browser. An upload keeps its original bytes (archived in object storage under
// its sha256, and a local copy the jobs read), the choices of kind, profile and shop (null = detect from the
// header), where it stands (checking → ready → queued → loading → loaded, or refused / failed / cancelled),
// the dry run's preview, the load's progress, and the ETL batch it became. The uploader's shop scope is kept
// so that the checks run with it even when the job runs later. The batch's header goes into its notes.
export async function up(db: Kysely<any>): Promise<void> {
  await sql`
    CREATE TABLE etl_upload (
      upload_id        bigint GENERATED ALWAYS AS IDENTITY PRIMARY KEY,
      file_name        text NOT NULL,
      size_bytes       bigint NOT NULL CHECK (size_bytes >= 0),
      sha256           text NOT NULL CHECK (sha256 ~ '^[0-9a-f]{64}$'),
      object_key       text,
      spool_path       text NOT NULL,
      uploaded_by      text NOT NULL,
      uploaded_by_sub  text NOT NULL,
      uploaded_at      timestamptz NOT NULL DEFAULT now(),
      scope_shops      text[],
      kind             text CHECK (kind IN ('machines','jobs','measurements','weather','hours')),
      profile          text,
      shop_code        text,
      status           text NOT NULL DEFAULT 'checking'
                       CHECK (status IN ('checking','ready','refused','queued','loading','loaded','failed','cancelled')),
      message          text,
      preview          jsonb,
      progress         jsonb,
      batch_id         bigint REFERENCES etl_batch (batch_id),
      cancel_requested boolean NOT NULL DEFAULT false,
      updated_at       timestamptz NOT NULL DEFAULT now()
    )
  `.execute(db);
  await sql`CREATE INDEX etl_upload_recent_idx ON etl_upload (uploaded_at DESC)`.execute(db);
  await sql`CREATE INDEX etl_upload_batch_idx ON etl_upload (batch_id) WHERE batch_id IS NOT NULL`.execute(db);
}

export async function down(db: Kysely<any>): Promise<void> {
  await sql`DROP TABLE etl_upload`.execute(db);
}
