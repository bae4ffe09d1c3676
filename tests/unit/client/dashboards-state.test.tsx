// @vitest-environment happy-dom
import { afterEach, describe, expect, it, vi } from "vitest";
import { cleanup, render, screen, waitFor } from "@testing-library/react";
import { QueryClientProvider } from "@tanstack/react-query";
import { createQueryClient } from "@/app/query-client";
import { DashboardsState } from "@/features/imports/components/dashboards-state";
import { clockTime, dashboardsInWords } from "@/features/imports/dashboards-words";
import { overviewQueries } from "@/features/overview/api/overview-queries";
import { apiPaths } from "@shared/api-paths";
import type { BatchDashboards } from "@shared/schemas/imports";

afterEach(() => {
  cleanup();
  vi.unstubAllGlobals();
  vi.useRealTimers();
});

describe("dashboardsInWords(d)", () => {
  const now = new Date(2026, 11, 2, 15, 0);
  it("says current with the time of day, or updating, or nothing when the server cannot say", () => {
    const at = new Date(2026, 11, 2, 14, 5).toISOString();
    // CLDR short times: en-GB "HH:mm", de-DE "HH:mm", en-US "h:mm a" (U+202F or a space before PM, by CLDR version)
    expect(dashboardsInWords({ state: "current", asOf: at }, now, "en-GB")).toBe("Dashboards current as of 14:05");
    expect(dashboardsInWords({ state: "current", asOf: at }, now, "en-US")).toMatch(/^Dashboards current as of 2:05[ \u202f]PM$/);
    expect(dashboardsInWords({ state: "updating", asOf: null }, now)).toBe("Dashboards updating…");
    expect(dashboardsInWords(null, now)).toBeNull();
    expect(dashboardsInWords(undefined, now)).toBeNull();
  });
  it("gives the date too when the time is not today's", () => {
    // CLDR medium dates: en-GB "d MMM y", de-DE "dd.MM.y"
    expect(clockTime(new Date(2026, 10, 30, 9, 7).toISOString(), now, "en-GB")).toMatch(/30 Nov 2026.*09:07/);
    expect(clockTime(new Date(2026, 10, 30, 9, 7).toISOString(), now, "de-DE")).toBe("30.11.2026, 09:07");
  });
});

describe("<DashboardsState batch>", () => {
  it("asks again while the dashboards are updating, then says current and marks the Overview held here stale", async () => {
    const at = "2026-12-02T14:05:00Z";
    let answer: BatchDashboards = { state: "updating", asOf: null };
    const asked: string[] = [];
    vi.stubGlobal("fetch", async (path: string) => {
      const url = new URL(path, "http://ironledger.test");
      asked.push(url.pathname + url.search);
      if (url.pathname + url.search !== apiPaths.batchRejects("17", "limit=1")) return new Response("{}", { status: 599 });
      const batch = { id: "17", fileName: "f.csv", kind: "jobs", profile: "generic-jobs", profileVersion: 1, shop: "S1", loadedBy: "T", startedAt: at, durationMs: 1, status: "loaded", read: 1, inserted: 1, updated: 0, unchanged: 0, rejected: 0, importId: null, dashboards: answer };
      return new Response(JSON.stringify({ batch, total: 0, reasons: [], columns: [], rows: [] }), { status: 200, headers: { "content-type": "application/json" } });
    });
    const qc = createQueryClient();
    qc.setQueryData(overviewQueries.current().queryKey, { loads: [] } as never);
    render(
      <QueryClientProvider client={qc}>
        <DashboardsState batch={{ id: "17", dashboards: { state: "updating", asOf: null } }} />
      </QueryClientProvider>,
    );
    expect(screen.getByRole("status").textContent).toBe("Dashboards updating…");
    await waitFor(() => expect(asked.length).toBeGreaterThanOrEqual(1));
    expect(qc.getQueryState(overviewQueries.current().queryKey)?.isInvalidated).toBe(false);
    answer = { state: "current", asOf: at };
    await waitFor(() => expect(screen.getByRole("status").textContent).toBe(`Dashboards current as of ${clockTime(at)}`), { timeout: 5000 });
    expect(qc.getQueryState(overviewQueries.current().queryKey)?.isInvalidated).toBe(true);
    const n = asked.length;
    await new Promise((r) => setTimeout(r, 2500));
    expect(asked.length).toBe(n); // current: no more asking
  }, 15_000);

  it("asks nothing and says current for a batch the dashboards already show; nothing for one they cannot", () => {
    vi.stubGlobal("fetch", async () => new Response("{}", { status: 599 }));
    const qc = createQueryClient();
    const { container } = render(
      <QueryClientProvider client={qc}>
        <DashboardsState batch={{ id: "17", dashboards: { state: "current", asOf: "2026-12-02T14:05:00Z" } }} />
        <DashboardsState batch={{ id: "18", dashboards: null }} />
      </QueryClientProvider>,
    );
    expect(screen.getAllByRole("status")).toHaveLength(1);
    expect(container.textContent).toMatch(/^Dashboards current as of /);
  });
});
