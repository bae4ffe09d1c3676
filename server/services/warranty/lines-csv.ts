/** A claim's repair lines as a CSV file, the attachment sent with the packet and the claim page's download. */
import { stringify } from "csv-stringify/sync";
import type { RepairLineEvidence } from "../../../shared/schemas/claims.js";
import { csvCell } from "../../../shared/csv-cell.js";

/**
 * The header: raw numbers in the cells, the unit in the header (as the benchmark lines CSV writes it): hours
 * end "_h", money ends with the group's currency code in lower case ("parts_cost_usd").
 */
export const lineCsvColumns = (currency: string) => {
  const money = currency.toLowerCase();
  return [
    "claim_number", "shop", "ro_number", "line_no", "opened", "closed", "serial", "model_line", "engine_family", "delivery_date",
    "hour_meter_h", "component", "complaint", "cause", "correction", "part_number", "supplier_lot", "labor_op", "standard_hours_h",
    "actual_hours_h", `parts_cost_${money}`, `labor_cost_${money}`, "eligibility", "eligibility_summary", "deadline",
  ] as const;
};

/** The claim's repair lines as CSV (RFC 4180 via csv-stringify), one row per line; money in `currency` (ISO 4217). */
export function claimLinesCsv(claimNumber: string, lines: readonly RepairLineEvidence[], currency: string): string {
  const rows = lines.map((l) =>
    [
      claimNumber, l.shopCode, l.roNumber, l.lineNo, l.openedDate, l.closedDate, l.machine.serial, l.machine.modelLine, l.machine.engineFamily,
      l.machine.deliveryDate, l.hourMeter, l.component.name, l.complaint, l.cause, l.correction, l.partNumber, l.supplierLot, l.laborOp,
      l.standardHours, l.laborHours, l.partsCost, l.laborCost, l.eligibility.verdict, l.eligibility.summary, l.deadline?.deadline ?? null,
    ].map(csvCell),
  );
  return stringify([[...lineCsvColumns(currency)], ...rows], { record_delimiter: "\r\n" });
}
