// Table interfaces for the star schema (dimensions dim_*, facts fact_*, ETL bookkeeping etl_*).
// Filled in by the warehouse migrations; keep in step with migrations/.
export interface WarehouseTables {}
