import { z } from "zod";
import { lineTypes, payTypes } from "../catalog.js";

/** Columns the repair-line list can be sorted by (server-side). */
export const repairSortKeys = [
  "opened", "closed", "shop", "ro", "serial", "model", "engineFamily", "component", "hours", "laborHours", "payType", "lineType",
] as const;
export type RepairSortKey = (typeof repairSortKeys)[number];

/** How deep `page` may reach by number (rows skipped); further on, the list is followed by cursor. */
export const REPAIR_PAGE_MAX_OFFSET = 10_000;

/**
 * GET /api/repairs and /api/repairs.csv: the shared analytics filters (parsed separately with
 * analyticsFiltersSchema) plus these list parameters. `cursor` (a nextCursor or prevCursor the list handed
 * out) takes the place of `page`; page numbers reach only the first REPAIR_PAGE_MAX_OFFSET rows.
 */
export const repairListQuerySchema = z
  .object({
    q: z.string().trim().max(100).optional().transform((s) => (s ? s : undefined)),
    lineType: z.enum(lineTypes).optional(),
    payType: z.enum(payTypes).optional(),
    page: z.coerce.number().int().min(1).default(1),
    pageSize: z.coerce.number().int().min(5).max(200).default(25),
    sort: z.enum(repairSortKeys).default("opened"),
    dir: z.enum(["asc", "desc"]).default("desc"),
    cursor: z.string().min(1).max(2000).optional(),
  })
  .refine((l) => l.cursor !== undefined || (l.page - 1) * l.pageSize <= REPAIR_PAGE_MAX_OFFSET, {
    path: ["page"],
    message: `page numbers reach the first ${REPAIR_PAGE_MAX_OFFSET.toLocaleString("en-US")} lines; follow nextCursor to go further`,
  });
export type RepairListQuery = z.infer<typeof repairListQuerySchema>;

export const repairRowSchema = z.object({
  id: z.string(),
  shopCode: z.string(),
  roNumber: z.string(),
  lineNo: z.number(),
  openedDate: z.string(),
  closedDate: z.string().nullable(),
  serial: z.string(),
  modelLine: z.string(),
  engineFamily: z.string(),
  componentCode: z.string(),
  componentName: z.string(),
  lineType: z.string(),
  payType: z.string(),
  hourMeter: z.number().nullable(),
  laborHours: z.number().nullable(),
  standardHours: z.number().nullable(),
  complaint: z.string().nullable(),
  cause: z.string().nullable(),
  partNumber: z.string().nullable(),
  supplierLot: z.string().nullable(),
  technician: z.string().nullable(),
});
export type RepairRow = z.infer<typeof repairRowSchema>;

/**
 * What a list cursor holds once decoded: the sort it belongs to, whether it leads forward (after) or back
 * (before) from the row whose sort values it carries, the number of the page it leads to, and the total the
 * first page found (both for display; the pages after the first do not count again).
 */
export const repairCursorSchema = z.object({
  sort: z.enum(repairSortKeys),
  dir: z.enum(["asc", "desc"]),
  toward: z.enum(["after", "before"]),
  page: z.number().int().min(1),
  values: z.array(z.string().max(200)).min(2).max(6),
  total: z.number().int().min(0),
  totalIsEstimate: z.boolean(),
});
export type RepairCursor = z.infer<typeof repairCursorSchema>;

/** GET /api/repairs: `total` is exact, or PostgreSQL's estimate when `totalIsEstimate` (broad filters). */
export const repairListSchema = z.object({
  total: z.number(),
  totalIsEstimate: z.boolean(),
  page: z.number(),
  pageSize: z.number(),
  rows: z.array(repairRowSchema),
  /** the page after this one, or null on the last page */
  nextCursor: z.string().nullable(),
  /** the page before this one, or null on the first page */
  prevCursor: z.string().nullable(),
});
export type RepairList = z.infer<typeof repairListSchema>;

/** The CSV columns of /api/repairs.csv, in order (key in RepairRow, header). */
export const repairCsvColumns: readonly { key: keyof RepairRow; label: string }[] = [
  { key: "shopCode", label: "Shop" },
  { key: "roNumber", label: "Repair order" },
  { key: "lineNo", label: "Line" },
  { key: "openedDate", label: "Opened" },
  { key: "closedDate", label: "Closed" },
  { key: "serial", label: "Serial" },
  { key: "modelLine", label: "Model line" },
  { key: "engineFamily", label: "Engine family" },
  { key: "componentCode", label: "Component code" },
  { key: "componentName", label: "Component" },
  { key: "lineType", label: "Line type" },
  { key: "payType", label: "Pay type" },
  { key: "hourMeter", label: "Hour meter (h)" },
  { key: "laborHours", label: "Labour (h)" },
  { key: "standardHours", label: "Standard (h)" },
  { key: "complaint", label: "Complaint" },
  { key: "cause", label: "Cause" },
  { key: "partNumber", label: "Part" },
  { key: "supplierLot", label: "Supplier lot" },
  { key: "technician", label: "Technician" },
  { key: "id", label: "Line id" },
];

const measurementSchema = z.object({
  kind: z.string(),
  position: z.number(),
  attempt: z.number(),
  /** canonical value (psi, ohm, V); null only when the meter showed over-range */
  value: z.number().nullable(),
  unit: z.string(),
  overRange: z.boolean(),
  rawValue: z.string(),
  rawUnit: z.string().nullable(),
  conversionRule: z.string(),
  /** entered on the bench sheet: by whom and when (ISO time); null for a reading from a shop's export */
  sheet: z.object({ by: z.string(), at: z.string() }).nullable(),
});
export type RepairMeasurement = z.infer<typeof measurementSchema>;

/** GET /api/repairs/:id */
export const repairDetailSchema = z.object({
  line: repairRowSchema.extend({
    correction: z.string().nullable(),
    laborOp: z.string().nullable(),
    meterNote: z.string().nullable(),
    partDescription: z.string().nullable(),
    partQty: z.number().nullable(),
    partOrderedDate: z.string().nullable(),
    partReceivedDate: z.string().nullable(),
    backOrdered: z.boolean(),
    partsWaitDays: z.number().nullable(),
    partsCost: z.number().nullable(),
    laborCost: z.number().nullable(),
    ambientTempC: z.number().nullable(),
    failureMode: z.string().nullable(),
    system: z.string(),
    assembly: z.string(),
    shopName: z.string(),
  }),
  machine: z.object({
    serial: z.string(),
    modelCode: z.string(),
    modelLine: z.string(),
    engineFamily: z.string(),
    engineSerial: z.string().nullable(),
    coldStartAid: z.string(),
    buildDate: z.string().nullable(),
    deliveryDate: z.string().nullable(),
    deliveryHours: z.number().nullable(),
    homeShop: z.string().nullable(),
    heaterPlugLot: z.string().nullable(),
    blockHeaterFitted: z.boolean(),
    hoursTrail: z.array(
      z.object({
        date: z.string(),
        hours: z.number(),
        source: z.string(),
        valid: z.boolean(),
        invalidReason: z.string().nullable(),
        meterGeneration: z.number(),
        meterNote: z.string().nullable(),
      }),
    ),
  }),
  faultCodes: z.array(z.object({ spn: z.number(), fmi: z.number(), occurrences: z.number(), fmiMeaning: z.string() })),
  measurements: z.array(measurementSchema),
  /** other repair lines on the same machine that the caller may see, newest first */
  machineHistory: z.array(repairRowSchema.pick({ id: true, shopCode: true, roNumber: true, lineNo: true, openedDate: true, componentName: true, lineType: true, hourMeter: true })),
});
export type RepairDetail = z.infer<typeof repairDetailSchema>;
