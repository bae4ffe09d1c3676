import { sql, type Kysely } from "kysely";

// Stock on hand of a part number at a shop, as a user counted it for the winter stock advice: one row per
// shop and part number, and every change kept in winter_stock_event with who made it and when.
export async function up(db: Kysely<any>): Promise<void> {
  await sql`
    CREATE TABLE winter_stock (
      shop_code       text NOT NULL,
      part_number     text NOT NULL,
      quantity        integer NOT NULL CHECK (quantity >= 0),
      updated_by_sub  text NOT NULL,
      updated_by_name text NOT NULL,
      updated_at      timestamptz NOT NULL DEFAULT now(),
      PRIMARY KEY (shop_code, part_number)
    )
  `.execute(db);
  await sql`
    CREATE TABLE winter_stock_event (
      event_id     bigint GENERATED ALWAYS AS IDENTITY PRIMARY KEY,
      shop_code    text NOT NULL,
      part_number  text NOT NULL,
      old_quantity integer,
      new_quantity integer NOT NULL CHECK (new_quantity >= 0),
      actor_sub    text NOT NULL,
      actor_name   text NOT NULL,
      at           timestamptz NOT NULL DEFAULT now()
    )
  `.execute(db);
  await sql`CREATE INDEX winter_stock_event_by_part ON winter_stock_event (shop_code, part_number, at DESC, event_id DESC)`.execute(db);
}

export async function down(db: Kysely<any>): Promise<void> {
  await sql`DROP TABLE winter_stock_event`.execute(db);
  await sql`DROP TABLE winter_stock`.execute(db);
}
