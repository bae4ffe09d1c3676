import type { z } from "zod";
import { ApiError, toApiError } from "./api-error";

/** The one typed fetch wrapper: sends cookies, parses the response with the shared zod schema. */
export async function apiGet<S extends z.ZodType>(path: string, schema: S, signal?: AbortSignal): Promise<z.output<S>> {
  let res: Response;
  try {
    res = await fetch(path, { credentials: "same-origin", headers: { accept: "application/json" }, signal });
  } catch (err) {
    if ((err as Error).name === "AbortError") throw err;
    throw new ApiError(0, "network", "Ironledger's server could not be reached. Check your connection and retry.");
  }
  if (!res.ok) throw await toApiError(res);
  return schema.parse(await res.json());
}

export async function apiSend<S extends z.ZodType>(
  method: "POST" | "PUT" | "PATCH" | "DELETE",
  path: string,
  body: unknown,
  schema: S,
): Promise<z.output<S>> {
  let res: Response;
  try {
    res = await fetch(path, {
      method,
      credentials: "same-origin",
      headers: body instanceof FormData ? { accept: "application/json" } : { "content-type": "application/json", accept: "application/json" },
      body: body instanceof FormData ? body : JSON.stringify(body),
    });
  } catch {
    throw new ApiError(0, "network", "Ironledger's server could not be reached. Check your connection and retry.");
  }
  if (!res.ok) throw await toApiError(res);
  return schema.parse(await res.json());
}
