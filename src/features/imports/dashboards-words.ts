import type { BatchDashboards } from "@shared/schemas/imports";

/** The time of day an ISO instant falls at, hh:mm in the viewer's clock (the full date when it is not today). */
export function clockTime(iso: string, now = new Date()): string {
  const d = new Date(iso);
  if (Number.isNaN(d.getTime())) return iso;
  const sameDay = d.toDateString() === now.toDateString();
  return sameDay
    ? d.toLocaleTimeString("en-GB", { hour: "2-digit", minute: "2-digit" })
    : d.toLocaleString("en-GB", { dateStyle: "medium", timeStyle: "short" });
}

/** What the page says of whether the dashboards show a batch; null when the server cannot say. */
export function dashboardsInWords(d: BatchDashboards | null | undefined, now = new Date()): string | null {
  if (!d) return null;
  if (d.state === "current") return d.asOf ? `Dashboards current as of ${clockTime(d.asOf, now)}` : "Dashboards current";
  return "Dashboards updating…";
}

/** How often the page asks again while the dashboards are updating. */
export const DASHBOARDS_POLL_MS = 2000;
