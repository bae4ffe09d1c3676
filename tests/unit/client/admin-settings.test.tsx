// @vitest-environment happy-dom
import { afterEach, beforeEach, describe, expect, it, vi } from "vitest";
import { cleanup, fireEvent, render, screen, waitFor } from "@testing-library/react";
import { QueryClientProvider } from "@tanstack/react-query";
import { createMemoryRouter, RouterProvider } from "react-router-dom";
import { routes } from "@/app/router";
import { createQueryClient } from "@/app/query-client";
import { apiPaths } from "@shared/api-paths";
import type { AdminSettings } from "@shared/schemas/settings";

// The group settings page on the real route table, the API answered here: while no currency is set the page
// says so; a saved currency is what every page's money is shown in from then on. Expected money strings are
// CLDR's en-US currency pattern ("¤#,##0.00"; the euro sign for EUR), the locale happy-dom's navigator reports.

const admin = { sub: "u-admin", name: "Test Admin", email: null, roles: ["admin"], scope: { kind: "all" } };
const unset: AdminSettings = { settings: { currency: "USD", currencySet: false, currencySetAt: null, currencySetBy: null }, history: [] };
const euro: AdminSettings = {
  settings: { currency: "EUR", currencySet: true, currencySetAt: "2026-03-05T14:30:00.000Z", currencySetBy: "Test Admin" },
  history: [{ at: "2026-03-05T14:30:00.000Z", actorName: "Test Admin", sentence: "Test Admin set the group's currency to EUR." }],
};

let sent: { path: string; method: string; body: unknown }[];
beforeEach(() => {
  sent = [];
  vi.stubGlobal("fetch", async (path: string, init?: RequestInit) => {
    const method = init?.method ?? "GET";
    sent.push({ path, method, body: typeof init?.body === "string" ? JSON.parse(init.body) : undefined });
    const body =
      path === apiPaths.session() ? { user: admin } : path === apiPaths.settings() ? unset.settings : path === apiPaths.adminSettings() ? (method === "PUT" ? euro : unset) : null;
    return new Response(JSON.stringify(body ?? { error: { code: "unexpected", message: path, requestId: "r" } }), { status: body ? 200 : 599, headers: { "content-type": "application/json" } });
  });
  vi.spyOn(console, "error").mockImplementation(() => {});
});
afterEach(() => {
  cleanup();
  vi.unstubAllGlobals();
  vi.restoreAllMocks();
});

describe("/admin/settings", () => {
  it("says the currency is not set, sends the code typed, and shows money in the saved currency", async () => {
    const qc = createQueryClient();
    render(
      <QueryClientProvider client={qc}>
        <RouterProvider router={createMemoryRouter(routes(qc), { initialEntries: ["/admin/settings"] })} />
      </QueryClientProvider>,
    );
    await screen.findByRole("heading", { name: "Group settings" }, { timeout: 10_000 });
    expect(screen.getByRole("note").textContent).toMatch(/No currency is set yet: money is shown in USD/);
    expect(screen.getByText(/An amount of 1234.5 reads/).textContent).toContain("$1,234.50");
    fireEvent.change(screen.getByLabelText("Currency (ISO 4217 code)"), { target: { value: "eur" } });
    fireEvent.click(screen.getByRole("button", { name: "Save" }));
    await screen.findByText("Test Admin set the group's currency to EUR.");
    expect(sent.filter((s) => s.method === "PUT")).toEqual([{ path: apiPaths.adminSettings(), method: "PUT", body: { currency: "eur" } }]);
    await waitFor(() => expect(screen.getByText(/An amount of 1234.5 reads/).textContent).toContain("€1,234.50"));
    expect(screen.queryByRole("note")).toBeNull();
  });
});
