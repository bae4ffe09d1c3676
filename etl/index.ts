/**
 * The ETL's public seam: the one module of etl/ that the server (and scripts) may import. Loading a file,
 * the shop register, the derived tables a load leaves stale (kept up to date incrementally), and the invented demo world.
 * The ETL imports nothing of the server (.dependency-cruiser.cjs keeps both directions).
 */
export { loadFile, type BatchSummary, type HeaderNotes, type LoadFileOptions, type LoadPreview, type LoadProgress } from "./load/load-file.js";
export { EtlFatalError } from "./errors.js";
export { layouts } from "./layouts.js";
export { requiredColumns } from "./sources/row-schemas.js";
export { upsertShops, type ShopInput } from "./shops/upsert-shops.js";
export { readShopRegister } from "./shops/read-register.js";
export { listProfiles } from "./profiles/registry.js";
export { currentProfiles, storedProfile, saveProfileVersion, DEFAULTS_AUTHOR, type VersionedProfile } from "./profiles/profile-store.js";
export { rebuildExposureIfCleared, refreshExposure, type ExposureRefresh } from "./derived/refresh-exposure.js";
export { GENERATOR_VERSION, generateDemo, type Manifest } from "./demo/generate.js";
export { shops as demoShops } from "./demo/scenario.js";
export { rejectedLineKey } from "./load/reject-keys.js";
