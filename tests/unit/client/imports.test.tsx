// @vitest-environment happy-dom
import { afterEach, beforeEach, describe, expect, it, vi } from "vitest";
import { cleanup, fireEvent, render, screen, waitFor, within } from "@testing-library/react";
import { QueryClientProvider } from "@tanstack/react-query";
import { createMemoryRouter, RouterProvider } from "react-router-dom";
import { routes } from "@/app/router";
import { createQueryClient } from "@/app/query-client";
import { MAX_IMPORT_BYTES, reasonLabel, screenFiles, secondsInWords, timeLeftInWords } from "@/features/imports/import-words";
import { createFormat } from "@shared/format";
import { readRejectParams } from "@/features/imports/reject-params";
import { apiPaths } from "@shared/api-paths";
import type { Batch, Import, ImportPreview, RejectPage } from "@shared/schemas/imports";

// The Imports page and a batch's rejects page, on the real route table in a memory router, with the API
// answered here. Every request the pages make is recorded, so the tests check what was asked as well as what shows.

const analyst = { sub: "u-analyst", name: "Test Analyst", email: null, roles: ["analyst"], scope: { kind: "all" } };

type Answer = { status: number; body: unknown };
type Handler = (url: URL, init: RequestInit | undefined) => Answer | undefined;
interface Sent {
  url: URL;
  method: string;
  credentials: RequestCredentials | undefined;
  body: BodyInit | null | undefined;
}

/** the last handler added that answers a request wins */
let handlers: Handler[] = [];
let sent: Sent[] = [];
const ok = (body: unknown): Answer => ({ status: 200, body });
const fail = (status: number, code: string, message: string): Answer => ({ status, body: { error: { code, message, requestId: "req-1" } } });
/** answers GET (or the given method on) exactly this path, query string included */
const on = (path: string, answer: Answer | (() => Answer), method = "GET"): Handler => (url, init) =>
  url.pathname + url.search === path && (init?.method ?? "GET") === method ? (typeof answer === "function" ? answer() : answer) : undefined;
const requestsTo = (path: string, method = "GET") => sent.filter((s) => s.url.pathname + s.url.search === path && s.method === method);

beforeEach(() => {
  sent = [];
  handlers = [on(apiPaths.session(), ok({ user: analyst })), on(apiPaths.shops(), ok({ shops: [] }))];
  vi.stubGlobal("fetch", async (path: string, init?: RequestInit) => {
    const url = new URL(path, "http://ironledger.test");
    sent.push({ url, method: init?.method ?? "GET", credentials: init?.credentials, body: init?.body });
    const a = handlers.reduceRight<Answer | undefined>((found, h) => found ?? h(url, init), undefined) ?? fail(599, "unexpected", `The test did not expect ${init?.method ?? "GET"} ${path}.`);
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

function visit(path: string) {
  const qc = createQueryClient();
  const router = createMemoryRouter(routes(qc), { initialEntries: [path] });
  render(
    <QueryClientProvider client={qc}>
      <RouterProvider router={router} />
    </QueryClientProvider>,
  );
  return router;
}

const preview: ImportPreview = {
  read: 1250,
  inserted: 1100,
  updated: 90,
  unchanged: 40,
  rejected: 20,
  header: {
    ignored: [{ column: "Tech Notes", position: 14, reason: "no column of this profile has that name" }],
    absent: ["supplier_lot"],
    encoding: "the profile says UTF-8 but the file's first lines are Windows-1252 text; it was read as Windows-1252",
  },
  mergedLines: [{ first: 40, last: 43 }],
  shops: [{ code: "S1", rows: 1200 }, { code: "S2", rows: 50 }],
  rows: [
    { line: 2, values: { ro_number: "R-100", shop_code: "S1", hour_meter: 1520.5 } },
    { line: 3, values: { ro_number: "R-101", shop_code: "S2", hour_meter: null, complaint: "hard to start when cold" } },
  ],
  rejects: [
    { line: 7, code: "bad_date", reason: 'opened date "2024-13-45" is not a date in this export\'s format (YYYY-MM-DD)', raw: ["R-105", "2024-13-45", "S1"] },
    { line: 41, code: "unbalanced_quote", reason: "a quote on this line is never closed; its quoting ran lines 40–43 together, so each line was read on its own", raw: ['R-140', '"loose'] },
  ],
};

const anImport = (over: Partial<Import> = {}): Import => ({
  id: "imp-1",
  fileName: "north-jobs.csv",
  sizeBytes: 48_213,
  sha256: "ab".repeat(32),
  uploadedBy: "Test Analyst",
  uploadedAt: "2025-03-04T09:15:00Z",
  kind: "jobs",
  profile: "generic-jobs",
  shop: null,
  status: "ready",
  message: null,
  preview,
  progress: null,
  batchId: null,
  ...over,
});

const aBatch = (over: Partial<Batch> = {}): Batch => ({
  id: "17",
  fileName: "north-jobs.csv",
  kind: "jobs",
  profile: "generic-jobs",
  profileVersion: 2,
  shop: "S1",
  loadedBy: "Test Analyst",
  startedAt: "2025-03-04T09:20:00Z",
  durationMs: 95_000,
  status: "loaded",
  read: 1250,
  inserted: 1100,
  updated: 90,
  unchanged: 40,
  rejected: 20,
  importId: "imp-1",
  ...over,
});

/** the Imports page with these uploads and an empty load history */
function visitImports(imports: Import[]) {
  handlers.push(on(apiPaths.imports(), ok({ imports })), on(apiPaths.batches(), ok({ batches: [] })));
  return visit("/imports");
}

const figure = (list: HTMLElement, label: string) => within(list).getByText(label).nextElementSibling?.textContent;

describe("Imports page: the preview of a checked file", { timeout: 20_000 }, () => {
  it("shows the counts, the header notes, the shops, the first rows and the first rejects with their reasons", async () => {
    visitImports([anImport()]);
    const counts = await screen.findByLabelText("What loading north-jobs.csv would do", {}, { timeout: 10_000 });
    expect(figure(counts, "Rows read")).toBe("1,250");
    expect(figure(counts, "Would insert")).toBe("1,100");
    expect(figure(counts, "Would update")).toBe("90");
    expect(figure(counts, "Unchanged")).toBe("40");
    expect(figure(counts, "Rejected")).toBe("20");

    expect(screen.getByText(/column 14/).textContent).toBe("column 14 Tech Notes: no column of this profile has that name");
    expect(screen.getByText(/left as stored/).textContent).toContain("supplier_lot");
    expect(screen.getByText(/^Encoding:/).textContent).toContain("read as Windows-1252");
    expect(screen.getByText("lines 40–43")).toBeTruthy();
    expect(screen.getByText(/Shops named in the rows/).parentElement!.textContent).toBe("Shops named in the rows: S1 (1,200 rows), S2 (50 rows)");

    const rows = screen.getByRole("table", { name: "First rows of north-jobs.csv as they would land" });
    expect(within(rows).getAllByRole("columnheader").map((h) => h.textContent)).toEqual(["Line", "ro_number", "shop_code", "hour_meter", "complaint"]);
    expect(within(rows).getAllByRole("row")[1].textContent).toBe("2R-100S11,520.5");

    const rejects = screen.getByRole("table", { name: "First rejected rows of north-jobs.csv" });
    const [, first, second] = within(rejects).getAllByRole("row");
    expect(within(first).getAllByRole("cell").map((c) => c.textContent)).toEqual(["7", 'opened date "2024-13-45" is not a date in this export\'s format (YYYY-MM-DD)', "R-105", "2024-13-45", "S1"]);
    // the reason in words, never the internal code
    expect(second.textContent).toContain("a quote on this line is never closed");
    expect(second.textContent).not.toContain("unbalanced_quote");
    expect(screen.getByText("First rejected rows (2 of 20)")).toBeTruthy();
  });

  it("loads a ready file with a same-origin POST and then shows it waiting for the loader", async () => {
    handlers.push(on(apiPaths.importLoad("imp-1"), ok(anImport({ status: "queued" })), "POST"));
    handlers.push(on(apiPaths.importItem("imp-1"), ok(anImport({ status: "queued" }))));
    visitImports([anImport()]);
    fireEvent.click(await screen.findByRole("button", { name: "Load north-jobs.csv" }, { timeout: 10_000 }));
    await screen.findByText("Waiting to load");
    const [post] = requestsTo(apiPaths.importLoad("imp-1"), "POST");
    expect(post.credentials).toBe("same-origin");
    expect(screen.getByRole("button", { name: "Cancel loading north-jobs.csv" })).toBeTruthy();
    expect(screen.queryByRole("button", { name: /^Load/ })).toBeNull();
  });
});

describe("Imports page: a refused file", { timeout: 20_000 }, () => {
  const refused = anImport({
    status: "refused",
    kind: null,
    profile: null,
    preview: null,
    message: "No profile recognises this header: the columns ro, dt and amt are not in any layout of Ironledger's.",
  });

  it("shows why in words and offers no Load", async () => {
    visitImports([refused]);
    const alert = await screen.findByText(/No profile recognises this header/, {}, { timeout: 10_000 });
    expect(alert.getAttribute("role")).toBe("alert");
    expect(screen.getByText("Cannot be loaded")).toBeTruthy();
    expect(screen.queryByRole("button", { name: /^Load/ })).toBeNull();
    expect(screen.getByRole("button", { name: "Check again north-jobs.csv" })).toBeTruthy();
  });

  it("checks again with the kind and shop chosen, blank choices sent as null", async () => {
    handlers.push(on(apiPaths.importCheck("imp-1"), ok(anImport({ status: "checking", preview: null, kind: "machines", shop: "S3" })), "POST"));
    handlers.push(on(apiPaths.importItem("imp-1"), ok(anImport({ status: "checking", preview: null, kind: "machines", shop: "S3" }))));
    visitImports([refused]);
    fireEvent.change(await screen.findByLabelText("Kind of export", {}, { timeout: 10_000 }), { target: { value: "machines" } });
    fireEvent.change(screen.getByLabelText("Shop code"), { target: { value: " S3 " } });
    fireEvent.click(screen.getByRole("button", { name: "Check again north-jobs.csv" }));
    await screen.findByText("Checking the file");
    const [post] = requestsTo(apiPaths.importCheck("imp-1"), "POST");
    expect(JSON.parse(String(post.body))).toEqual({ kind: "machines", profile: null, shop: "S3" });
  });

  it("shows the server's own words when a check again is turned away", async () => {
    handlers.push(on(apiPaths.importCheck("imp-1"), fail(400, "validation_failed", "Shop S9 is not in the shop register."), "POST"));
    visitImports([refused]);
    fireEvent.change(await screen.findByLabelText("Shop code", {}, { timeout: 10_000 }), { target: { value: "S9" } });
    fireEvent.click(screen.getByRole("button", { name: "Check again north-jobs.csv" }));
    expect(await screen.findByText("Shop S9 is not in the shop register.")).toBeTruthy();
  });
});

describe("Imports page: a load under way", { timeout: 20_000 }, () => {
  const progress = { rowsRead: 412_000, bytesRead: 21_000_000, totalBytes: 49_000_000, rowsPerSecond: 20_600.4, percent: 42.7, secondsLeft: 125, phase: "reading" as const };

  it("shows the progress bar with its percent, rows read, rows per second and time left", async () => {
    handlers.push(on(apiPaths.importItem("imp-1"), ok(anImport({ status: "loading", progress }))));
    visitImports([anImport({ status: "loading", progress })]);
    const bar = await screen.findByRole("progressbar", { name: "Loading north-jobs.csv" }, { timeout: 10_000 });
    expect(bar.getAttribute("aria-valuenow")).toBe("42");
    expect(bar.getAttribute("aria-valuetext")).toBe("42 %, about 2 min 5 s left");
    expect(screen.getByText("42 %")).toBeTruthy();
    expect(screen.getByText("412,000 rows read")).toBeTruthy();
    expect(screen.getByText("20,600 rows/s")).toBeTruthy();
    expect(screen.getByText("about 2 min 5 s left")).toBeTruthy();
    expect(screen.getByRole("button", { name: "Cancel loading north-jobs.csv" })).toBeTruthy();
  });

  it("cancels with a same-origin POST and says nothing of the file was kept", async () => {
    handlers.push(on(apiPaths.importItem("imp-1"), ok(anImport({ status: "loading", progress }))));
    handlers.push(on(apiPaths.importCancel("imp-1"), ok(anImport({ status: "cancelled", progress: null })), "POST"));
    visitImports([anImport({ status: "loading", progress })]);
    fireEvent.click(await screen.findByRole("button", { name: "Cancel loading north-jobs.csv" }, { timeout: 10_000 }));
    await screen.findByText("The load was cancelled; nothing of this file was kept.");
    expect(requestsTo(apiPaths.importCancel("imp-1"), "POST")[0].credentials).toBe("same-origin");
    expect(screen.getByText("Cancelled")).toBeTruthy();
    expect(screen.queryByRole("progressbar")).toBeNull();
  });

  it("asks for the import every second while it loads, shows the batch once loaded, then stops asking", async () => {
    const answers = [anImport({ status: "loading", progress: { ...progress, percent: 91, secondsLeft: 4 } }), anImport({ status: "loaded", progress: null, batchId: "17" })];
    handlers.push(on(apiPaths.importItem("imp-1"), () => ok(answers.shift() ?? anImport({ status: "loaded", batchId: "17" }))));
    handlers.push(on(apiPaths.batchRejects("17", "limit=1"), ok({ batch: aBatch(), total: 20, reasons: [], columns: [], rows: [] } satisfies RejectPage)));
    visitImports([anImport({ status: "loading", progress })]);
    await screen.findByText("91 %", {}, { timeout: 5000 });
    const link = await screen.findByRole("link", { name: "Rejects of batch 17 (20)" }, { timeout: 5000 });
    expect(link.getAttribute("href")).toBe("/imports/batches/17");
    expect(figure(screen.getByLabelText("What loading north-jobs.csv did"), "Inserted")).toBe("1,100");
    expect(screen.queryByRole("progressbar")).toBeNull();
    const asked = requestsTo(apiPaths.importItem("imp-1")).length;
    expect(asked).toBe(2);
    await new Promise((r) => setTimeout(r, 1600));
    expect(requestsTo(apiPaths.importItem("imp-1")).length).toBe(asked);
  });
});

describe("Imports page: uploading", { timeout: 20_000 }, () => {
  it("sends the accepted files in one multipart request under 'files' and names the ones it kept back", async () => {
    handlers.push(on(apiPaths.imports(), ok({ imports: [anImport({ id: "imp-2", fileName: "south-machines.csv", status: "checking", preview: null })] }), "POST"));
    handlers.push(on(apiPaths.importItem("imp-2"), ok(anImport({ id: "imp-2", fileName: "south-machines.csv", status: "checking", preview: null }))));
    visitImports([]);
    await screen.findByText("Nothing uploaded yet", {}, { timeout: 10_000 });
    expect(screen.getByText(/up to 200 MB each/)).toBeTruthy();
    const huge = new File(["x"], "everything.csv");
    Object.defineProperty(huge, "size", { value: MAX_IMPORT_BYTES + 1 });
    const files = [new File(["serial,model_code\nKWRN1,WRN\n"], "south-machines.csv"), new File(["%PDF"], "manual.pdf"), huge];
    const input = screen.getByLabelText("Choose files");
    Object.defineProperty(input, "files", { value: files });
    fireEvent.change(input);
    await screen.findByRole("heading", { name: "south-machines.csv" });
    const [post] = requestsTo(apiPaths.imports(), "POST");
    expect(post.body).toBeInstanceOf(FormData);
    expect((post.body as FormData).getAll("files").map((f) => (f as File).name)).toEqual(["south-machines.csv"]);
    expect(post.credentials).toBe("same-origin");
    const kept = within(screen.getByText("These files were not sent:").parentElement!).getAllByRole("listitem").map((li) => li.textContent);
    // a no-break space between number and unit (NIST SP 811 §7.2)
    expect(kept).toEqual(["manual.pdf: only .csv and .txt exports can be loaded", "everything.csv: it is larger than 200\u00a0MB, the limit for one file"]);
  });
});

describe("Imports page: the load history", { timeout: 20_000 }, () => {
  it("lists each batch with its counts, linking to its rejects, and filters by shop", async () => {
    handlers.push(on(apiPaths.imports(), ok({ imports: [] })));
    handlers.push(on(apiPaths.batches(), ok({ batches: [aBatch(), aBatch({ id: "18", fileName: "west-hours.csv", kind: "hours", shop: "S2", rejected: 0, importId: null })] })));
    handlers.push(on(apiPaths.batches("S2"), ok({ batches: [aBatch({ id: "18", fileName: "west-hours.csv", kind: "hours", shop: "S2", rejected: 0, importId: null })] })));
    handlers.push(on(apiPaths.shops(), ok({ shops: [{ code: "S1", name: "North yard", region: null, town: null, climateZone: null, timeZone: null }, { code: "S2", name: "West yard", region: null, town: null, climateZone: null, timeZone: null }] })));
    visit("/imports");
    const table = await screen.findByRole("table", { name: "Load history" }, { timeout: 10_000 });
    const [, first, second] = within(table).getAllByRole("row");
    expect(within(first).getByRole("link", { name: "north-jobs.csv" }).getAttribute("href")).toBe("/imports/batches/17");
    expect(within(first).getByRole("link", { name: "20 rejects of batch 17" }).getAttribute("href")).toBe("/imports/batches/17");
    expect(within(first).getAllByRole("cell").map((c) => c.textContent).slice(1, 13)).toEqual(
      ["Repair-order lines", "generic-jobs v2", "S1", "Test Analyst", expect.any(String), "1 min 35 s", "Loaded", "1,250", "1,100", "90", "40", "20 rejects of batch 17"],
    );
    expect(second.textContent).toContain("Hour-meter readings");

    await waitFor(() => expect(screen.getAllByRole("option", { name: "S2 · West yard" })).toHaveLength(1));
    fireEvent.change(screen.getByLabelText("Shop"), { target: { value: "S2" } });
    await waitFor(() => expect(within(screen.getByRole("table", { name: "Load history" })).getAllByRole("row")).toHaveLength(2));
    expect(requestsTo(apiPaths.batches("S2"))).toHaveLength(1);
  });
});

describe("Batch rejects page", { timeout: 20_000 }, () => {
  const rows: RejectPage["rows"] = [
    { line: 7, code: "bad_date", reason: 'opened date "2024-13-45" is not a date in this export\'s format (YYYY-MM-DD)', raw: { ro_number: "R-105", opened_date: "2024-13-45", shop_code: "S1" }, fixedBy: "21" },
    { line: 9, code: "unknown_machine", reason: "machine serial KZ0099999 is not in the machine master; load the machines export that lists it first", raw: { ro_number: "R-107", opened_date: "2024-02-01", shop_code: "S1" }, fixedBy: null },
  ];
  const page = (reason: string | null): RejectPage => ({
    batch: aBatch(),
    total: reason ? rows.filter((r) => r.code === reason).length : 20,
    reasons: [{ code: "bad_date", count: 1 }, { code: "unknown_machine", count: 19 }],
    columns: ["ro_number", "opened_date", "shop_code"],
    rows: reason ? rows.filter((r) => r.code === reason) : rows,
  });
  const rejectsHandler: Handler = (url) => (url.pathname === apiPaths.batchRejects("17") ? ok(page(url.searchParams.get("reason"))) : undefined);

  it("shows the batch, then each reject's line, reason, raw fields by the file's columns and the batch that fixed it", async () => {
    handlers.push(rejectsHandler);
    visit("/imports/batches/17");
    const table = await screen.findByRole("table", { name: "Rejects of batch 17" }, { timeout: 10_000 });
    expect(within(table).getAllByRole("columnheader").map((h) => h.textContent)).toEqual(["Line", "Reason", "Since", "ro_number", "opened_date", "shop_code"]);
    const [, first, second] = within(table).getAllByRole("row");
    expect(within(first).getAllByRole("cell").map((c) => c.textContent)).toEqual(["7", 'opened date "2024-13-45" is not a date in this export\'s format (YYYY-MM-DD)', "fixed by batch 21", "R-105", "2024-13-45", "S1"]);
    expect(within(first).getByRole("link", { name: "fixed by batch 21" }).getAttribute("href")).toBe("/imports/batches/21");
    expect(within(second).getAllByRole("cell")[2].textContent).toBe("");
    expect(figure(screen.getByLabelText("What batch 17 did"), "Rejected")).toBe("20");
    expect(screen.getByText("Rows 1–20 of 20")).toBeTruthy();
  });

  it("filters by reason: the request carries reason=…, and the CSV link keeps the same filter", async () => {
    handlers.push(rejectsHandler);
    visit("/imports/batches/17");
    const select = await screen.findByLabelText("Reason", {}, { timeout: 10_000 });
    expect(within(select).getAllByRole("option").map((o) => o.textContent)).toEqual(["Every reason (20)", "date not readable (1)", "machine not known (19)"]);
    expect(screen.getByRole("link", { name: "Download CSV" }).getAttribute("href")).toBe(apiPaths.batchRejectsCsv("17"));

    fireEvent.change(select, { target: { value: "unknown_machine" } });
    await waitFor(() => expect(within(screen.getByRole("table", { name: "Rejects of batch 17" })).getAllByRole("row")).toHaveLength(2));
    const asked = sent.filter((s) => s.url.pathname === apiPaths.batchRejects("17")).map((s) => s.url.searchParams.get("reason"));
    expect(asked).toEqual([null, "unknown_machine"]);
    expect(screen.getByText(/machine serial KZ0099999/)).toBeTruthy();
    expect(screen.queryByText(/2024-13-45/)).toBeNull();
    expect(screen.getByRole("link", { name: "Download CSV (machine not known)" }).getAttribute("href")).toBe(apiPaths.batchRejectsCsv("17", "reason=unknown_machine"));
  });

  it("pages by offset and limit", async () => {
    handlers.push((url) => (url.pathname === apiPaths.batchRejects("17") ? ok({ ...page(null), total: 450 }) : undefined));
    visit("/imports/batches/17?limit=200");
    await screen.findByText("Rows 1–200 of 450", {}, { timeout: 10_000 });
    fireEvent.click(screen.getByRole("button", { name: "Next" }));
    await screen.findByText("Rows 201–400 of 450");
    const last = sent.filter((s) => s.url.pathname === apiPaths.batchRejects("17")).at(-1)!;
    expect([last.url.searchParams.get("offset"), last.url.searchParams.get("limit")]).toEqual(["200", "200"]);
  });

  it("explains a batch outside the caller's shops inside the imports area", async () => {
    handlers.push((url) => (url.pathname === apiPaths.batchRejects("99") ? fail(404, "not_found", "Batch 99 was not found.") : undefined));
    visit("/imports/batches/99");
    await screen.findByRole("heading", { name: "Not found" }, { timeout: 10_000 });
    expect(screen.getByText("Batch 99 was not found.")).toBeTruthy();
    expect(within(screen.getByRole("alert")).getByRole("link", { name: "Imports" }).getAttribute("href")).toBe("/imports");
  });
});

describe("import words", () => {
  it("screenFiles keeps .csv and .txt files up to the limit and says why it keeps the others back", () => {
    const empty = new File([], "blank.txt");
    const { accepted, turnedAway } = screenFiles([new File(["a"], "A.CSV"), new File(["b"], "b.txt"), new File(["c"], "c.xlsx"), empty], createFormat({ locale: "en-US", currency: "USD" }));
    expect(accepted.map((f) => f.name)).toEqual(["A.CSV", "b.txt"]);
    expect(turnedAway).toEqual([{ name: "c.xlsx", why: "only .csv and .txt exports can be loaded" }, { name: "blank.txt", why: "the file is empty" }]);
  });

  it("reasonLabel says a known reject reason in words and any other code with spaces", () => {
    expect(reasonLabel("hour_meter_backwards")).toBe("hour meter went backwards");
    expect(reasonLabel("tmin_above_tmax")).toBe("daily minimum above the daily maximum");
    expect(reasonLabel("some_new_reason")).toBe("some new reason");
  });

  it("secondsInWords and timeLeftInWords say durations the way people do", () => {
    expect([secondsInWords(45), secondsInWords(60), secondsInWords(125), secondsInWords(3900)]).toEqual(["45 s", "1 min", "2 min 5 s", "1 h 05 min"]);
    expect([timeLeftInWords(null), timeLeftInWords(0.4), timeLeftInWords(125)]).toEqual(["time left not known yet", "less than a second left", "about 2 min 5 s left"]);
  });

  it("readRejectParams falls back to the first page of 100 and leaves paging out of the CSV's query", () => {
    expect(readRejectParams(new URLSearchParams("reason=bad_date&offset=-3&limit=7"))).toEqual({ reason: "bad_date", offset: 0, limit: 100, pageSearch: "reason=bad_date&offset=0&limit=100", csvSearch: "reason=bad_date" });
    expect(readRejectParams(new URLSearchParams("offset=200&limit=500")).pageSearch).toBe("offset=200&limit=500");
  });
});
