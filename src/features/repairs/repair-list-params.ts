import { repairSortKeys, type RepairSortKey } from "@shared/schemas/repairs";

/**
 * The repair list's text search, page size, sort and position as the URL holds them (invalid values fall back
 * to the defaults), and the query strings the repairs API reads: one page of the list, and the CSV of all of it.
 * The position is a cursor the API handed out, kept with `at`, a fingerprint of the list it belongs to: once
 * the filters, search, sort or page size change, the cursor no longer applies and the list starts at the top.
 */
export interface RepairListParams {
  q: string;
  pageSize: number;
  sort: RepairSortKey;
  dir: "asc" | "desc";
  /** fingerprint of the list the URL names, without its position */
  at: string;
  /** query string for one page of the list */
  listSearch: string;
  /** query string for the CSV download (the same lines, without paging) */
  csvSearch: string;
}

export const PAGE_SIZES = [25, 50, 100, 200];

/** FNV-1a of the text, base 36: short enough for the URL, and it changes whenever the text does in practice. */
function fingerprint(text: string): string {
  let h = 0x811c9dc5;
  for (let i = 0; i < text.length; i++) h = Math.imul(h ^ text.charCodeAt(i), 0x01000193);
  return (h >>> 0).toString(36);
}

/** `filterSearch` is the shared filters' query string (readFilters). */
export function readRepairListParams(params: URLSearchParams, filterSearch: string): RepairListParams {
  const q = params.get("q") ?? "";
  const pageSize = PAGE_SIZES.includes(Number(params.get("pageSize"))) ? Number(params.get("pageSize")) : 25;
  const sortParam = params.get("sort") as RepairSortKey | null;
  const sort: RepairSortKey = sortParam && repairSortKeys.includes(sortParam) ? sortParam : "opened";
  const dir = params.get("dir") === "asc" ? "asc" : "desc";
  const search = new URLSearchParams(filterSearch);
  if (q) search.set("q", q);
  search.set("sort", sort);
  search.set("dir", dir);
  const csvSearch = search.toString();
  search.set("pageSize", String(pageSize));
  const at = fingerprint(search.toString());
  const cursor = params.get("cursor");
  if (cursor && params.get("at") === at) search.set("cursor", cursor);
  return { q, pageSize, sort, dir, at, listSearch: search.toString(), csvSearch };
}
