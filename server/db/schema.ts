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

// Warehouse tables are declared in warehouse-schema.ts and merged here.
import type { WarehouseTables } from "./warehouse-schema.js";

export interface Database extends WarehouseTables {
  app_session: AppSessionTable;
  app_user: AppUserTable;
}

export type AppUser = Selectable<AppUserTable>;
export type { Generated };
