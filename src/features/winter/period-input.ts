import { winterForecastQuerySchema } from "@shared/schemas/winter";
import type { ForecastParams } from "./api/winter-queries";

export interface PeriodText {
  from: string;
  to: string;
  serviceLevel: string;
}

export type PeriodErrors = Partial<Record<keyof PeriodText, string>>;

/**
 * The service level as typed: "90", "90 %" or "90,5" read as a percentage, "0.9" as a fraction; empty is the
 * server's default. NaN when it is not a number at all (the schema then says so in words).
 */
export function readServiceLevel(text: string): number | undefined {
  const t = text.trim().replace(/\s*%$/, "").replace(",", ".");
  if (t === "") return undefined;
  const n = /^-?\d+(\.\d+)?$|^-?\.\d+$/.test(t) ? Number(t) : Number.NaN;
  return n > 1 ? n / 100 : n;
}

/** The period and service level as typed, checked by the forecast's own query schema: the params, or each problem in words by field. */
export function readPeriod(text: PeriodText): { params: ForecastParams; errors: null } | { params: null; errors: PeriodErrors } {
  const raw = { from: text.from.trim() || undefined, to: text.to.trim() || undefined, serviceLevel: readServiceLevel(text.serviceLevel) };
  const parsed = winterForecastQuerySchema.safeParse(raw);
  if (parsed.success) return { params: { from: raw.from, to: raw.to, serviceLevel: raw.serviceLevel }, errors: null };
  const errors: PeriodErrors = {};
  for (const issue of parsed.error.issues) {
    const field = issue.path[0];
    if ((field === "from" || field === "to" || field === "serviceLevel") && !errors[field]) errors[field] = issue.message;
  }
  return { params: null, errors };
}
