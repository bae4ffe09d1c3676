// @vitest-environment happy-dom
import { afterEach, beforeEach, describe, expect, it, vi } from "vitest";
import { cleanup, fireEvent, render, screen, within } from "@testing-library/react";
import { QueryClientProvider } from "@tanstack/react-query";
import { createMemoryRouter, RouterProvider } from "react-router-dom";
import { routes } from "@/app/router";
import { createQueryClient } from "@/app/query-client";
import { mayOpen, navFor, navItems, pageAccess, type PageKey } from "@/app/navigation";
import { pagePaths } from "@/app/page-paths";
import { ErrorNotice } from "@/components/ui/states";
import { ApiError } from "@/lib/api-error";
import { apiPaths } from "@shared/api-paths";
import { lifeRoles, rateRoles } from "@shared/roles";

// Pages outside a role's menu are refused by the page itself, before any of its data is asked for, with the
// pages the role can use; refusals and missing things (403/404) offer the way back, never a retry, which stays
// for network and server failures. The real route table in a memory router, the API answered here.

const manager = { sub: "u-manager", name: "Test Manager", email: null, roles: ["manager"], scope: { kind: "shops", shops: ["S5"] } };
type Answer = { status: number; body: unknown };
let answers: Record<string, Answer> = {};
let asked: string[] = [];
const fail = (status: number, code: string, message: string): Answer => ({ status, body: { error: { code, message, requestId: "req-1" } } });

beforeEach(() => {
  asked = [];
  answers = { [apiPaths.session()]: { status: 200, body: { user: manager } } };
  vi.stubGlobal("fetch", async (path: string) => {
    asked.push(path);
    const a = answers[path] ?? fail(599, "unexpected", `The test did not expect a request to ${path}.`);
    return new Response(JSON.stringify(a.body), { status: a.status, headers: { "content-type": "application/json" } });
  });
  vi.spyOn(console, "error").mockImplementation(() => {});
  vi.spyOn(console, "warn").mockImplementation(() => {});
});

afterEach(() => {
  cleanup();
  vi.unstubAllGlobals();
  vi.restoreAllMocks();
});

function visit(entries: string[]) {
  const qc = createQueryClient();
  const router = createMemoryRouter(routes(qc), { initialEntries: entries, initialIndex: entries.length - 1 });
  render(
    <QueryClientProvider client={qc}>
      <RouterProvider router={router} />
    </QueryClientProvider>,
  );
  return router;
}

const retryButtons = () => screen.queryAllByRole("button", { name: /retry|reload/i });
const managerPages = ["Overview", "Clusters", "Rates", "Repairs", "Bench sheet", "Benchmarks", "Winter readiness", "Claims", "Imports"];

describe("the page table", () => {
  it("gives the menu its entries: every menu item has its page's roles", () => {
    for (const item of navItems) {
      const key = (Object.keys(pagePaths) as PageKey[]).find((k) => pagePaths[k] === item.to)!;
      expect(item.roles, item.to).toEqual(pageAccess[key].roles);
    }
    expect(navFor(["manager"]).map((n) => n.label)).toEqual(managerPages);
  });

  it("serves the life curves and the rates to the roles their APIs serve, and the life curves not to a manager or clerk", () => {
    expect(pageAccess.life.roles).toEqual(lifeRoles);
    expect(pageAccess.rates.roles).toEqual(rateRoles);
    expect(mayOpen("rates", ["clerk"])).toBe(false);
    expect(mayOpen("life", ["manager"])).toBe(false);
    expect(mayOpen("life", ["clerk"])).toBe(false);
    expect(mayOpen("life", ["director"])).toBe(true);
    expect(mayOpen("adminUsers", ["manager", "admin"])).toBe(true);
  });
});

describe("a page opened by a role it does not serve", { timeout: 20_000 }, () => {
  for (const [path, subject] of [
    ["/life", "the failure analytics"],
    ["/admin/users", "the administration pages"],
  ] as const) {
    it(`refuses ${path} to a manager inside the layout, lists the pages they can use, and asks the API nothing`, async () => {
      visit([path]);
      const alert = await screen.findByRole("alert", {}, { timeout: 10_000 });
      await within(alert).findByRole("heading", { name: "Not one of your pages" });
      expect(within(alert).getByText(`You do not have access to ${subject}.`)).toBeTruthy();
      const yours = within(alert).getByRole("navigation", { name: "Your pages" });
      expect(within(yours).getAllByRole("link").map((a) => [a.textContent, a.getAttribute("href")])).toEqual(navFor(["manager"]).map((n) => [n.label, n.to]));
      expect(within(alert).getByRole("link", { name: "Your home page (Overview)" }).getAttribute("href")).toBe("/");
      expect(screen.getByRole("navigation", { name: "Main" })).toBeTruthy();
      expect(retryButtons()).toEqual([]);
      expect(asked.filter((p) => p !== apiPaths.session())).toEqual([]);
    });
  }
});

describe("403 and 404 answers", { timeout: 20_000 }, () => {
  it("say no access with the way back to the previous page and the role's home, no retry", async () => {
    answers[apiPaths.claim("9")] = fail(403, "forbidden", "Claim 9 belongs to a shop outside your scope.");
    const router = visit(["/repairs", "/claims/9"]);
    await screen.findByRole("heading", { name: "No access" }, { timeout: 10_000 });
    expect(screen.getByText("Claim 9 belongs to a shop outside your scope.")).toBeTruthy();
    expect(retryButtons()).toEqual([]);
    fireEvent.click(screen.getByRole("button", { name: "Back to the previous page" }));
    await vi.waitFor(() => expect(router.state.location.pathname).toBe("/repairs"));
  });

  it("say not found with the area's list and the role's home; no back button when the page was opened first", async () => {
    answers[apiPaths.claim("8")] = fail(404, "not_found", "Claim 8 was not found.");
    visit(["/claims/8"]);
    await screen.findByRole("heading", { name: "Not found" }, { timeout: 10_000 });
    expect(screen.getByRole("link", { name: "All claims" }).getAttribute("href")).toBe("/claims");
    expect(screen.getByRole("link", { name: "Your home page (Overview)" }).getAttribute("href")).toBe("/");
    expect(screen.queryByRole("button", { name: "Back to the previous page" })).toBeNull();
    expect(retryButtons()).toEqual([]);
  });
});

describe("ErrorNotice", () => {
  const shown = (error: unknown) => {
    render(<ErrorNotice error={error} onRetry={() => {}} />);
    const has = screen.queryByRole("button", { name: "Retry" }) !== null;
    cleanup();
    return has;
  };

  it("offers Retry for a network failure, a server error or a thrown error, and never for 401, 403 or 404", () => {
    expect(shown(new ApiError(0, "network", "Ironledger's server could not be reached."))).toBe(true);
    expect(shown(new ApiError(503, "unavailable", "The database did not answer."))).toBe(true);
    expect(shown(new Error("boom"))).toBe(true);
    expect(shown(new ApiError(401, "unauthorized", "Sign in."))).toBe(false);
    expect(shown(new ApiError(403, "forbidden", "Not yours."))).toBe(false);
    expect(shown(new ApiError(404, "not_found", "Not there."))).toBe(false);
  });
});
