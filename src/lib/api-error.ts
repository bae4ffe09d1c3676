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
