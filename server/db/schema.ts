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
  last_seen: ColumnType<Date, Date | undefined, Date>;
}

/** Overview visits: the baseline for "new clusters since your last visit" (migrations/0030). */
export interface AppUserVisitTable {
  sub: string;
  last_request_at: Date;
  current_cluster_ids: ColumnType<string[], string[] | undefined, string[]>;
  previous_visit_at: Date | null;
  previous_cluster_ids: string[] | null;
}

// Warehouse tables are declared in warehouse-schema.ts and merged here.
import type { WarehouseTables } from "./warehouse-schema.js";

export interface Database extends WarehouseTables {
  app_session: AppSessionTable;
  app_user: AppUserTable;
  app_user_visit: AppUserVisitTable;
}

export type AppUser = Selectable<AppUserTable>;
export type { Generated };
