/** The block-heater fitting list as a CSV file. */
import { stringify } from "csv-stringify/sync";
import type { FittingRow } from "../../../shared/schemas/fitting-list.js";
import { csvCell } from "../../../shared/csv-cell.js";

/** Raw numbers in the cells, the unit in the header: months end "_months", engine hours "_h", dates are ISO 8601. */
export const fittingCsvColumns = [
  "shop", "shop_name", "serial", "model_line", "engine_family", "delivery_date", "age_months", "hour_meter_h",
  "cold_start_part", "cold_start_part_fitted", "cold_start_part_age_h", "priority", "why_listed",
] as const;

/** The list in its order (RFC 4180 via csv-stringify), one row per machine; hours rounded to whole hours. */
export function fittingListCsv(rows: readonly FittingRow[]): string {
  const whole = (n: number | null) => (n === null ? null : Math.round(n));
  const body = rows.map((r) =>
    [
      r.shopCode, r.shopName, r.serial, r.modelLine, r.engineFamily, r.deliveryDate, r.ageMonths, whole(r.hourMeter),
      r.coldStartPartName, r.coldStartPartFitted, whole(r.coldStartPartHours), r.priority, r.why,
    ].map(csvCell),
  );
  return stringify([[...fittingCsvColumns], ...body], { record_delimiter: "\r\n" });
}
