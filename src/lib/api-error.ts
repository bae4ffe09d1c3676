import { errorEnvelopeSchema } from "@shared/schemas/error";

/** An API failure in words: the server's envelope, or a plain description of a network failure. */
export class ApiError extends Error {
  constructor(
    readonly status: number,
    readonly code: string,
    message: string,
    readonly requestId?: string,
  ) {
    super(message);
    this.name = "ApiError";
  }
}

export async function toApiError(res: Response): Promise<ApiError> {
  const text = await res.text();
  try {
    const parsed = errorEnvelopeSchema.safeParse(JSON.parse(text));
    if (parsed.success) {
      const e = parsed.data.error;
      return new ApiError(res.status, e.code, e.message, e.requestId);
    }
  } catch {
    /* not JSON */
  }
  return new ApiError(res.status, "http_" + res.status, `The server answered ${res.status} ${res.statusText}.`);
}

/** Answers a page explains in words instead of offering a retry: signed out, no access, nothing there. */
const PAGE_STATUSES: ReadonlySet<number> = new Set([401, 403, 404]);

/** True for an API error whose status the route areas' error boundaries explain (see src/routes/area-error.tsx). */
export function isPageStatus(error: unknown): error is ApiError {
  return error instanceof ApiError && PAGE_STATUSES.has(error.status);
}

/**
 * True when trying again can change the answer: the server could not be reached, or failed (5xx), or the error
 * is not an API answer at all. A refusal or a missing thing (4xx) stays the same however often it is asked.
 */
export function isRetryable(error: unknown): boolean {
  if (!(error instanceof ApiError)) return true;
  return error.status === 0 || error.status >= 500 || error.status === 408 || error.status === 429;
}
