import { repairSortKeys, type RepairSortKey } from "@shared/schemas/repairs";

/**
 * The repair list's text search, page, page size and sort as the URL holds them (invalid values fall back to
 * the defaults), and the query strings the repairs API reads: one page of the list, and the CSV of all of it.
 */
export interface RepairListParams {
  q: string;
  page: number;
  pageSize: number;
  sort: RepairSortKey;
  dir: "asc" | "desc";
  /** query string for one page of the list */
  listSearch: string;
  /** query string for the CSV download (the same lines, without paging) */
  csvSearch: string;
}

const PAGE_SIZES = [25, 50, 100, 200];

/** `filterSearch` is the shared filters' query string (readFilters). */
export function readRepairListParams(params: URLSearchParams, filterSearch: string): RepairListParams {
  const q = params.get("q") ?? "";
  const page = Math.max(1, Number(params.get("page")) || 1);
  const pageSize = PAGE_SIZES.includes(Number(params.get("pageSize"))) ? Number(params.get("pageSize")) : 25;
  const sortParam = params.get("sort") as RepairSortKey | null;
  const sort: RepairSortKey = sortParam && repairSortKeys.includes(sortParam) ? sortParam : "opened";
  const dir = params.get("dir") === "asc" ? "asc" : "desc";
  const search = new URLSearchParams(filterSearch);
  if (q) search.set("q", q);
  search.set("sort", sort);
  search.set("dir", dir);
  const csvSearch = search.toString();
  search.set("page", String(page));
  search.set("pageSize", String(pageSize));
  return { q, page, pageSize, sort, dir, listSearch: search.toString(), csvSearch };
}
