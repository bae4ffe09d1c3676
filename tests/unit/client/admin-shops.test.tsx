// @vitest-environment happy-dom
import { afterEach, beforeEach, describe, expect, it, vi } from "vitest";
import { cleanup, fireEvent, render, screen, waitFor, within } from "@testing-library/react";
import { QueryClientProvider } from "@tanstack/react-query";
import { createMemoryRouter, RouterProvider } from "react-router-dom";
import { routes } from "@/app/router";
import { createQueryClient } from "@/app/query-client";
import { apiPaths } from "@shared/api-paths";
import type { AdminShop, AdminShopList } from "@shared/schemas/shops-admin";

// The shop register page on the real route table in a memory router, with the API answered here: the form
// checks a shop by the shared rules before anything is sent, sends what it checked, and shows a refusal in words.

const admin = { sub: "u-admin", name: "Test Admin", email: null, roles: ["admin"], scope: { kind: "all" } };

type Answer = { status: number; body: unknown };
interface Sent {
  path: string;
  method: string;
  body: unknown;
}

let answers: Map<string, Answer | (() => Answer)>;
let sent: Sent[];
const ok = (body: unknown, status = 200): Answer => ({ status, body });
const fail = (status: number, code: string, message: string): Answer => ({ status, body: { error: { code, message, requestId: "req-1" } } });

const tarnby: AdminShop = {
  code: "S4", name: "Tarnby service shop", region: "Central", town: "Tarnby", lat: 58.1, lon: 12.3, climateZone: "cool continental",
  timeZone: "Europe/Stockholm", weatherStation: "TRN-01", exportProfile: "generic-jobs", machines: 42, repairLines: 1234,
};
const list = (shops: AdminShop[]): AdminShopList => ({
  shops,
  profiles: [{ id: "generic-jobs", kind: "jobs" }, { id: "generic-machines", kind: "machines" }],
});

beforeEach(() => {
  sent = [];
  answers = new Map<string, Answer | (() => Answer)>([
    [`GET ${apiPaths.session()}`, ok({ user: admin })],
    [`GET ${apiPaths.shops()}`, ok({ shops: [] })],
    [`GET ${apiPaths.adminShops()}`, ok(list([tarnby]))],
  ]);
  vi.stubGlobal("fetch", async (path: string, init?: RequestInit) => {
    const method = init?.method ?? "GET";
    sent.push({ path, method, body: typeof init?.body === "string" ? JSON.parse(init.body) : undefined });
    const a = answers.get(`${method} ${path}`);
    const answer = (typeof a === "function" ? a() : a) ?? fail(599, "unexpected", `The test did not expect ${method} ${path}.`);
    return new Response(JSON.stringify(answer.body), { status: answer.status, headers: { "content-type": "application/json" } });
  });
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
  render(
    <QueryClientProvider client={qc}>
      <RouterProvider router={createMemoryRouter(routes(qc), { initialEntries: [path] })} />
    </QueryClientProvider>,
  );
}

const writes = () => sent.filter((s) => s.method !== "GET");
const type = (form: HTMLElement, label: string, value: string) => fireEvent.input(within(form).getByLabelText(label, { exact: false }), { target: { value } });

describe("/admin/shops", () => {
  it("lists the registered shops with their counts", async () => {
    visit("/admin/shops");
    const table = await screen.findByRole("table", { name: "Registered shops" }, { timeout: 10_000 });
    const row = within(table).getByText("Tarnby service shop").closest("tr")!;
    expect(within(row).getByText("S4")).toBeTruthy();
    expect(within(row).getByText("1,234")).toBeTruthy();
    expect(within(row).getByText("58.1, 12.3")).toBeTruthy();
    expect(within(screen.getByRole("navigation", { name: "Main" })).getByRole("link", { name: "Shops" }).getAttribute("href")).toBe("/admin/shops");
  });

  it("shows each problem in words beside its field and sends nothing", async () => {
    visit("/admin/shops");
    fireEvent.click(await screen.findByRole("button", { name: "Add a shop" }, { timeout: 10_000 }));
    const form = screen.getByRole("form", { name: "Add a shop" });
    type(form, "Code", "S/9!");
    type(form, "Latitude", "95");
    type(form, "Time zone", "Mars/Olympus");
    fireEvent.click(within(form).getByRole("button", { name: "Add shop" }));

    const code = within(form).getByLabelText("Code", { exact: false });
    await waitFor(() => expect(code.getAttribute("aria-invalid")).toBe("true"));
    const errorOf = (input: HTMLElement) => document.getElementById(input.getAttribute("aria-describedby")!.split(" ").find((i) => i.endsWith("-error"))!)?.textContent;
    expect(errorOf(code)).toBe("code must be 1–16 letters, digits, spaces, - or _");
    expect(errorOf(within(form).getByLabelText("Name", { exact: false }))).toBe("name is blank");
    expect(errorOf(within(form).getByLabelText("Latitude"))).toBe("latitude must lie between -90 and 90");
    expect(errorOf(within(form).getByLabelText("Time zone"))).toBe("time zone is not an IANA name such as Europe/Oslo");
    expect(within(form).getByLabelText("Longitude").getAttribute("aria-invalid")).toBe("false");
    expect(writes()).toEqual([]);
  });

  it("submits a new shop as checked: code in capitals, blanks as null, coordinates as numbers", async () => {
    const added: AdminShop = { ...tarnby, code: "Q7", name: "Quarry Bend", region: null, town: null, lat: 61.5, lon: null, climateZone: null, timeZone: "Europe/Oslo", weatherStation: null, exportProfile: "generic-machines", machines: 0, repairLines: 0 };
    answers.set(`POST ${apiPaths.adminShops()}`, () => {
      answers.set(`GET ${apiPaths.adminShops()}`, ok(list([added, tarnby])));
      return ok(added, 201);
    });
    visit("/admin/shops");
    fireEvent.click(await screen.findByRole("button", { name: "Add a shop" }, { timeout: 10_000 }));
    const form = screen.getByRole("form", { name: "Add a shop" });
    type(form, "Code", " q7 ");
    type(form, "Name", "Quarry Bend");
    type(form, "Latitude", "61.5");
    type(form, "Time zone", "Europe/Oslo");
    fireEvent.change(within(form).getByLabelText("Export profile"), { target: { value: "generic-machines" } });
    fireEvent.click(within(form).getByRole("button", { name: "Add shop" }));

    expect(await screen.findByText("Shop Q7 (Quarry Bend) is saved.")).toBeTruthy();
    expect(writes()).toEqual([
      {
        path: apiPaths.adminShops(),
        method: "POST",
        body: { code: "Q7", name: "Quarry Bend", region: null, town: null, lat: 61.5, lon: null, climateZone: null, timeZone: "Europe/Oslo", weatherStation: null, exportProfile: "generic-machines" },
      },
    ]);
    expect(screen.queryByRole("form", { name: "Add a shop" })).toBeNull();
    expect(await screen.findByText("Quarry Bend")).toBeTruthy();
  });

  it("edits a shop without sending its code, and shows the server's refusal in words", async () => {
    answers.set(`PUT ${apiPaths.adminShop("S4")}`, fail(400, "validation_failed", "The shop was not saved: export profile is not one of etl/profiles."));
    visit("/admin/shops");
    fireEvent.click(await screen.findByRole("button", { name: "Edit shop S4" }, { timeout: 10_000 }));
    const form = screen.getByRole("form", { name: "Edit shop S4" });
    expect((within(form).getByLabelText("Code") as HTMLInputElement).readOnly).toBe(true);
    expect((within(form).getByLabelText("Time zone") as HTMLInputElement).value).toBe("Europe/Stockholm");
    type(form, "Name", "Tarnby North");
    type(form, "Town", "");
    fireEvent.click(within(form).getByRole("button", { name: "Save changes" }));

    expect(await within(form).findByText("The shop was not saved: export profile is not one of etl/profiles.")).toBeTruthy();
    expect(writes()).toEqual([
      {
        path: apiPaths.adminShop("S4"),
        method: "PUT",
        body: { name: "Tarnby North", region: "Central", town: null, lat: 58.1, lon: 12.3, climateZone: "cool continental", timeZone: "Europe/Stockholm", weatherStation: "TRN-01", exportProfile: "generic-jobs" },
      },
    ]);
    // still open, with what was typed
    expect((within(form).getByLabelText("Name", { exact: false }) as HTMLInputElement).value).toBe("Tarnby North");
  });
});
