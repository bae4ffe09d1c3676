/** A claim's repair lines as a CSV file, the attachment sent with the packet and the claim page's download. */
import { stringify } from "csv-stringify/sync";
import type { RepairLineEvidence } from "../../../shared/schemas/claims.js";
import { csvCell } from "../../../shared/csv-cell.js";

export const lineCsvColumns = [
  "claim_number", "shop", "ro_number", "line_no", "opened", "closed", "serial", "model_line", "engine_family", "delivery_date",
  "hour_meter", "component", "complaint", "cause", "correction", "part_number", "supplier_lot", "labor_op", "standard_hours",
  "actual_hours", "parts_cost", "labor_cost", "eligibility", "eligibility_summary", "deadline",
] as const;

/** The claim's repair lines as CSV (RFC 4180 via csv-stringify), one row per line. */
export function claimLinesCsv(claimNumber: string, lines: readonly RepairLineEvidence[]): string {
  const rows = lines.map((l) =>
    [
      claimNumber, l.shopCode, l.roNumber, l.lineNo, l.openedDate, l.closedDate, l.machine.serial, l.machine.modelLine, l.machine.engineFamily,
      l.machine.deliveryDate, l.hourMeter, l.component.name, l.complaint, l.cause, l.correction, l.partNumber, l.supplierLot, l.laborOp,
      l.standardHours, l.laborHours, l.partsCost, l.laborCost, l.eligibility.verdict, l.eligibility.summary, l.deadline?.deadline ?? null,
    ].map(csvCell),
  );
  return stringify([[...lineCsvColumns], ...rows], { record_delimiter: "\r\n" });
}
