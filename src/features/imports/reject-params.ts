/**
 * The rejects page's reason filter and position as the URL holds them (invalid values fall back to the
 * defaults), and the query strings the API reads: one page of rejects, and the CSV of every reject that the
 * filter keeps.
 */
export const REJECT_PAGE_SIZES = [50, 100, 200, 500] as const;

export interface RejectParams {
  reason: string;
  offset: number;
  limit: number;
  pageSearch: string;
  csvSearch: string;
}

export function readRejectParams(params: URLSearchParams): RejectParams {
  const reason = (params.get("reason") ?? "").slice(0, 40);
  const limitParam = Number(params.get("limit"));
  const limit = (REJECT_PAGE_SIZES as readonly number[]).includes(limitParam) ? limitParam : 100;
  const offsetParam = Number(params.get("offset"));
  const offset = Number.isSafeInteger(offsetParam) && offsetParam > 0 ? offsetParam : 0;
  const csv = new URLSearchParams();
  if (reason) csv.set("reason", reason);
  const page = new URLSearchParams(csv);
  page.set("offset", String(offset));
  page.set("limit", String(limit));
  return { reason, offset, limit, pageSearch: page.toString(), csvSearch: csv.toString() };
}
