import type { BatchDashboards } from "@shared/schemas/imports";

const browserLocale = () => (typeof navigator !== "undefined" && navigator.language) || "en-US";

/** The time of day an ISO instant falls at in the viewer's clock and locale (the full date when it is not today). */
export function clockTime(iso: string, now = new Date(), locale = browserLocale()): string {
  const d = new Date(iso);
  if (Number.isNaN(d.getTime())) return iso;
  const sameDay = d.toDateString() === now.toDateString();
  return sameDay ? new Intl.DateTimeFormat(locale, { timeStyle: "short" }).format(d) : new Intl.DateTimeFormat(locale, { dateStyle: "medium", timeStyle: "short" }).format(d);
}

/** What the page says of whether the dashboards show a batch; null when the server cannot say. */
export function dashboardsInWords(d: BatchDashboards | null | undefined, now = new Date(), locale = browserLocale()): string | null {
  if (!d) return null;
  if (d.state === "current") return d.asOf ? `Dashboards current as of ${clockTime(d.asOf, now, locale)}` : "Dashboards current";
  return "Dashboards updating…";
}

/** How often the page asks again while the dashboards are updating. */
export const DASHBOARDS_POLL_MS = 2000;
