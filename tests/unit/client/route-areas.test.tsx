// @vitest-environment happy-dom
import { afterEach, beforeEach, describe, expect, it, vi } from "vitest";
import { cleanup, render, screen, within } from "@testing-library/react";
import { QueryClientProvider } from "@tanstack/react-query";
import { createMemoryRouter, RouterProvider } from "react-router-dom";
import { routes } from "@/app/router";
import { createQueryClient } from "@/app/query-client";
import { apiPaths } from "@shared/api-paths";

// The route areas' error boundaries, on the real route table in a memory router with the API answered here:
// 401/403/404 are explained inside the area (the layout stays, no retry), anything else reaches the root boundary.

const clerk = { sub: "u-clerk", name: "Test Clerk", email: null, roles: ["clerk"], scope: { kind: "all" } };
type Answer = { status: number; body: unknown; delayMs?: number };
let answers: Record<string, Answer> = {};
const fail = (status: number, code: string, message: string): Answer => ({ status, body: { error: { code, message, requestId: "req-1" } } });

beforeEach(() => {
  answers = { [apiPaths.session()]: { status: 200, body: { user: clerk } } };
  vi.stubGlobal("fetch", async (path: string) => {
    const a = answers[path] ?? fail(599, "unexpected", `The test did not expect a request to ${path}.`);
    if (a.delayMs) await new Promise((r) => setTimeout(r, a.delayMs));
    return new Response(JSON.stringify(a.body), { status: a.status, headers: { "content-type": "application/json" } });
  });
  // React and React Router report errors a boundary caught; the assertions below look at what the page shows
  vi.spyOn(console, "error").mockImplementation(() => {});
  vi.spyOn(console, "warn").mockImplementation(() => {});
});

afterEach(() => {
  cleanup();
  vi.unstubAllGlobals();
  vi.restoreAllMocks();
});

function visit(path: string) {
  const qc = createQueryClient();
  const router = createMemoryRouter(routes(qc), { initialEntries: [path] });
  render(
    <QueryClientProvider client={qc}>
      <RouterProvider router={router} />
    </QueryClientProvider>,
  );
}

const retryButtons = () => screen.queryAllByRole("button", { name: /retry|reload/i });

describe("route area error boundaries", { timeout: 20_000 }, () => {
  it("says a missing claim was not found, inside the layout, with no retry", async () => {
    answers[apiPaths.claim("42")] = fail(404, "not_found", "Claim 42 was not found.");
    visit("/claims/42");
    await screen.findByRole("heading", { name: /not found/i }, { timeout: 10_000 });
    expect(screen.getByText("Claim 42 was not found.")).toBeTruthy();
    expect(screen.getByRole("link", { name: "All claims" }).getAttribute("href")).toBe("/claims");
    expect(screen.getByRole("navigation", { name: "Main" })).toBeTruthy();
    expect(retryButtons()).toEqual([]);
  });

  it("says a cluster the page itself could not find was not found (the error thrown while rendering)", async () => {
    answers[apiPaths.cluster("c0ffee", "unit=C")] = fail(404, "cluster_not_found", "That cluster is not in the current scan.");
    visit("/clusters/c0ffee");
    await screen.findByRole("heading", { name: /not found/i }, { timeout: 10_000 });
    expect(screen.getByText("That cluster is not in the current scan.")).toBeTruthy();
    expect(screen.getByRole("link", { name: "All clusters" })).toBeTruthy();
    expect(retryButtons()).toEqual([]);
  });

  it("tells someone without the role that they do not have access, with no retry", async () => {
    answers[apiPaths.adminUsers()] = fail(403, "forbidden", "Your role does not allow access to this page.");
    visit("/admin/users");
    await screen.findByText("You do not have access to the administration pages.", {}, { timeout: 10_000 });
    expect(screen.getByRole("navigation", { name: "Main" })).toBeTruthy();
    expect(within(screen.getByRole("alert")).getByRole("link", { name: "Overview" }).getAttribute("href")).toBe("/");
    expect(retryButtons()).toEqual([]);
  });

  it("offers sign-in when the session ended, returning to the same page", async () => {
    answers[apiPaths.claim("7")] = fail(401, "unauthorized", "Sign in to use Ironledger.");
    visit("/claims/7");
    const link = await screen.findByRole("link", { name: "Sign in" }, { timeout: 10_000 });
    expect(link.getAttribute("href")).toBe(apiPaths.login("/claims/7"));
    expect(retryButtons()).toEqual([]);
  });

  it("passes any other failure up to the root boundary, which offers a reload", { timeout: 15_000 }, async () => {
    answers[apiPaths.claim("7")] = fail(500, "internal", "The database did not answer.");
    visit("/claims/7");
    // the query client retries a server error twice (after 1 s and 2 s) before the loader gives up
    await screen.findByRole("heading", { name: "The server could not answer" }, { timeout: 8000 });
    expect(screen.getByText("The database did not answer.")).toBeTruthy();
    expect(retryButtons()).toHaveLength(1);
    expect(screen.queryByRole("navigation", { name: "Main" })).toBeNull();
  });

});

describe("route loaders", { timeout: 20_000 }, () => {
  it("have the claim list in the cache before the page renders, so the page never shows its skeleton", async () => {
    const none = { count: 0, amount: 0 };
    answers[apiPaths.claims()] = { status: 200, body: { today: "2025-06-02", claims: [], buckets: { toFile: none, waiting: none, rejected: none, closed: none } }, delayMs: 300 };
    answers[apiPaths.claimCandidates("page=1&pageSize=25&sort=deadline&dir=asc")] = { status: 200, body: { total: 0, page: 1, pageSize: 25, rows: [], elsewhere: [] } };
    const zero = { key: "all", claims: 0, claimed: 0, paid: 0, writtenOff: 0, open: 0 };
    answers[apiPaths.claimMoney()] = { status: 200, body: { basis: "", byMonth: [], byEngineFamily: [], total: zero } };
    visit("/claims");
    await screen.findByRole("heading", { name: "Warranty claims", level: 1 }, { timeout: 10_000, interval: 20 });
    expect(screen.queryByRole("status", { name: "Loading claims" })).toBeNull();
    expect(screen.getByText("No claims yet")).toBeTruthy();
  });
});
