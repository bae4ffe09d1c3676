import { queryOptions } from "@tanstack/react-query";
import { apiGet, apiSend } from "@/lib/api-client";
import { ApiError, toApiError } from "@/lib/api-error";
import { errorEnvelopeSchema } from "@shared/schemas/error";
import {
  benchLineDetailSchema,
  benchSaveResponseSchema,
  benchSearchResponseSchema,
  benchSheetPaths,
  benchSheetRefusalSchema,
  type BenchCreateLine,
  type BenchRefusal,
  type BenchSaveResponse,
  type BenchSheet,
} from "@shared/schemas/bench-sheet";

export const benchSheetQueries = {
  all: () => ["bench-sheet"] as const,
  search: (q: string) =>
    queryOptions({
      queryKey: [...benchSheetQueries.all(), "search", q] as const,
      queryFn: ({ signal }) => apiGet(benchSheetPaths.search(q), benchSearchResponseSchema, signal),
      enabled: q.trim().length >= 2,
    }),
  line: (id: string) =>
    queryOptions({
      queryKey: [...benchSheetQueries.all(), "line", id] as const,
      queryFn: ({ signal }) => apiGet(benchSheetPaths.line(id), benchLineDetailSchema, signal),
      enabled: id !== "",
    }),
};

export const createBenchLine = (body: BenchCreateLine) => apiSend("POST", benchSheetPaths.lines(), body, benchLineDetailSchema);

/** How a save ended: taken, refused value by value, or not sent (no connection), kept for later. */
export type SaveOutcome =
  | { kind: "saved"; answer: BenchSaveResponse }
  | { kind: "refused"; message: string; refused: BenchRefusal[] }
  | { kind: "offline"; message: string }
  | { kind: "failed"; error: ApiError };

/**
 * PUT the whole sheet. The idempotency key travels in a header so a save the server took but whose answer was lost
 * is recognised when sent again; the sheet is a whole replacement, so even a server that ignores the key stores it once.
 */
export async function saveBenchSheet(lineId: string, sheet: BenchSheet, idempotencyKey: string): Promise<SaveOutcome> {
  let res: Response;
  try {
    res = await fetch(benchSheetPaths.sheet(lineId), {
      method: "PUT",
      credentials: "same-origin",
      headers: { "content-type": "application/json", accept: "application/json", "idempotency-key": idempotencyKey },
      body: JSON.stringify(sheet),
    });
  } catch {
    return { kind: "offline", message: "No connection: the sheet was not sent." };
  }
  if (res.ok) return { kind: "saved", answer: benchSaveResponseSchema.parse(await res.json()) };
  if (res.status === 422) {
    const body = errorEnvelopeSchema.safeParse(await res.clone().json().catch(() => null));
    const details = body.success ? benchSheetRefusalSchema.safeParse(body.data.error.details) : null;
    if (body.success && details?.success) return { kind: "refused", message: body.data.error.message, refused: details.data.refused };
  }
  const error = await toApiError(res);
  if (error.status >= 500 || error.status === 0) return { kind: "offline", message: `${error.message} The sheet is kept on this device.` };
  return { kind: "failed", error };
}
