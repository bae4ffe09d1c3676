/**
 * The mapping profile's schema is shared with the client (the admin's profile form validates with it):
 * shared/schemas/profiles.ts. The ETL names it from here.
 */
export { profileSchema, type Profile } from "../../shared/schemas/profiles.js";
export { exportKindSchema, type ExportKindName as ExportKind } from "../../shared/schemas/imports.js";
