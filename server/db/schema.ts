import type { ColumnType, Generated, Selectable } from "kysely";

export interface AppSessionTable {
  sid: string;
  sess: unknown;
  expire: Date;
}

export interface AppUserTable {
  sub: string;
  name: string;
  email: string | null;
  roles: string[];
  shops: string[];
  first_seen: ColumnType<Date, Date | undefined, never>;
  /** the time of the last sign-in (written at each sign-in only) */
  last_seen: ColumnType<Date, Date | undefined, Date>;
  /** roles and shops an admin set in Ironledger, replacing the provider's (migrations/0064); null: the claims apply */
  access_roles: ColumnType<string[] | null, string[] | null | undefined, string[] | null>;
  access_shops: ColumnType<string[] | null, string[] | null | undefined, string[] | null>;
  access_set_at: ColumnType<Date | null, Date | null | undefined, Date | null>;
  access_set_by: ColumnType<string | null, string | null | undefined, string | null>;
  deactivated_at: ColumnType<Date | null, Date | null | undefined, Date | null>;
  deactivated_by: ColumnType<string | null, string | null | undefined, string | null>;
}

/** An admin's change to a user's access, as a sentence (migrations/0064). */
export interface AppUserEventTable {
  event_id: Generated<string>;
  sub: string;
  at: Generated<Date>;
  kind: "access" | "provider" | "deactivated" | "reactivated";
  actor_sub: string;
  actor_name: string;
  sentence: string;
}

/** Group-wide settings an administrator sets once, one row per key (migrations/0065). */
export interface AppSettingTable {
  key: "currency";
  value: string;
  set_at: Generated<Date>;
  set_by_sub: string;
  set_by_name: string;
}

/** Every change of a setting, as a sentence with who made it (migrations/0065). */
export interface AppSettingEventTable {
  event_id: Generated<string>;
  key: string;
  at: Generated<Date>;
  old_value: string | null;
  new_value: string;
  actor_sub: string;
  actor_name: string;
  sentence: string;
}

/** Stock on hand of a part number at a shop, entered for the winter stock advice (migrations/0066). */
export interface WinterStockTable {
  shop_code: string;
  part_number: string;
  quantity: number;
  updated_by_sub: string;
  updated_by_name: string;
  updated_at: Generated<Date>;
}

/** Every change of a winter stock count, with who made it (migrations/0066). */
export interface WinterStockEventTable {
  event_id: Generated<string>;
  shop_code: string;
  part_number: string;
  old_quantity: number | null;
  new_quantity: number;
  actor_sub: string;
  actor_name: string;
  at: Generated<Date>;
}

/** Every saved version of an engine family's own compression figures; never updated (migrations/0069). */
export interface EngineSpecVersionTable {
  spec_version_id: Generated<string>;
  engine_family: string;
  version: number;
  entered_unit: "psi" | "kPa" | "bar";
  /** numeric: pg returns it as a string */
  target_min_psi: ColumnType<string, number | string, never>;
  target_max_psi: ColumnType<string, number | string, never>;
  allowable_min_psi: ColumnType<string, number | string, never>;
  plug_healthy_max_ohm: ColumnType<string | null, number | string | null, never>;
  source: string;
  saved_by: string;
  saved_at: ColumnType<Date, Date | undefined, never>;
  note: string;
}

/** Overview visits: the baseline for "new clusters since your last visit" (migrations/0030). */
export interface AppUserVisitTable {
  sub: string;
  last_request_at: Date;
  current_cluster_ids: ColumnType<string[], string[] | undefined, string[]>;
  previous_visit_at: Date | null;
  previous_cluster_ids: string[] | null;
}

/** A finding worked from new to closed, known by its key from load to load (migrations/0056). */
export interface FindingStateTable {
  finding_key: string;
  status: ColumnType<"new" | "investigating" | "confirmed" | "dismissed", "new" | "investigating" | "confirmed" | "dismissed" | undefined, "new" | "investigating" | "confirmed" | "dismissed">;
  owner: string | null;
  dismissed_reason: string | null;
  dismissed_at_observed: number | null;
  description: string;
  first_seen_at: Generated<Date>;
  changed_at: Generated<Date>;
  seen_version: string;
  observed: number;
  expected: number;
  lower: number;
  prev_version: string | null;
  prev_observed: number | null;
  prev_expected: number | null;
  prev_lower: number | null;
  figures_changed_at: Generated<Date>;
}

/** Who changed what on a finding, and why. */
export interface FindingEventTable {
  event_id: Generated<string>;
  finding_key: string;
  at: Generated<Date>;
  actor: string;
  actor_sub: string | null;
  kind: "found" | "status" | "owner" | "note" | "figures";
  from_value: string | null;
  to_value: string | null;
  note: string | null;
}

/** A user's weekly digest choice: on or off and its ISO weekday, 1 = Monday (migrations/0067). */
export interface DigestPreferenceTable {
  sub: string;
  enabled: Generated<boolean>;
  weekday: Generated<number>;
  updated_at: Generated<Date>;
}

/** One row per user and ISO week ("2025-W28") once that week's digest has gone (migrations/0067). */
export interface DigestSentTable {
  sub: string;
  week: string;
  sent_at: Generated<Date>;
  message_id: string | null;
}

// Warehouse tables are declared in warehouse-schema.ts and merged here.
import type { WarehouseTables } from "./warehouse-schema.js";

export interface Database extends WarehouseTables {
  app_session: AppSessionTable;
  app_setting: AppSettingTable;
  app_setting_event: AppSettingEventTable;
  app_user: AppUserTable;
  app_user_event: AppUserEventTable;
  app_user_visit: AppUserVisitTable;
  digest_preference: DigestPreferenceTable;
  digest_sent: DigestSentTable;
  engine_spec_version: EngineSpecVersionTable;
  finding_state: FindingStateTable;
  finding_event: FindingEventTable;
  winter_stock: WinterStockTable;
  winter_stock_event: WinterStockEventTable;
}

export type AppUser = Selectable<AppUserTable>;
export type { Generated };
