import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { parse } from "csv-parse/sync";
import type { Locator } from "playwright-core";
import { signInThroughProvider } from "../helpers/browser.js";
import { browserJourney } from "../helpers/browser-journey.js";
import { photograph } from "../helpers/photograph.js";
import { DEMO_PASSWORD } from "../../server/auth/demo-accounts.js";
import { apiPaths } from "../../shared/api-paths.js";

// A shop manager feeds the warehouse from the Imports page in Chromium: a jobs export of their shop is
// checked (a dry run with a preview), loaded as a job, its reject downloaded, mended in the downloaded text and
// loaded again as it is, after which the batch's rejects page shows the line as fixed by the later batch.
// A file naming another shop is refused in words, with no way to load it. Pages are photographed at desktop
// and phone width.

const env = browserJourney({ demo: true });
const work = mkdtempSync(path.join(tmpdir(), "ironledger-imports-e2e-"));
const SLOW = { timeout: 90_000 };
const HEADER =
  "shop_code,ro_number,line_no,serial,opened_date,closed_date,hour_meter,meter_note,complaint,cause,correction,component_code,failure_mode,labor_op,standard_hours,labor_hours,parts_cost,labor_cost,pay_type,line_type,tech_id,part_number,part_description,part_qty,supplier_lot,part_ordered_date,part_received_date,back_ordered,fault_codes,ambient_temp";
const BAD_DATE = "2024-13-40";
const GOOD_DATE = "2024-06-04";

const jobLine = (shop: string, ro: string, serial: string, date = "2024-06-03") =>
  `${shop},${ro},1,${serial},${date},${date},,,Hard start,Plug open,Replaced plug,ENG-CSA-HPLUG,OPEN,,1.0,1.0,10.00,20.00,customer,failure,,,,,,,,N,,`;

/** the first machine (by serial) whose home is the given shop in the demo world */
let serialOf: Record<"S1" | "S8", string>;

beforeAll(async () => {
  const pick = async (shop: string) =>
    (await env.stack.tdb.pool.query<{ serial: string }>(
      `SELECT m.serial FROM dim_machine m JOIN dim_shop s ON s.shop_key = m.home_shop_key WHERE s.shop_code = $1 ORDER BY m.serial LIMIT 1`,
      [shop],
    )).rows[0].serial;
  serialOf = { S1: await pick("S1"), S8: await pick("S8") };
});

afterAll(() => rmSync(work, { recursive: true, force: true }));

const page = () => env.browser.page;
const card = (fileName: string) => page().getByRole("article", { name: fileName, exact: true });

/** Chooses files through the page's own file input, as the "Choose files" button does. */
async function choose(files: { name: string; text: string }[]) {
  await page()
    .getByRole("region", { name: "Upload exports" })
    .locator('input[type="file"]')
    .setInputFiles(files.map((f) => ({ name: f.name, mimeType: "text/csv", buffer: Buffer.from(f.text) })));
}

/** A row of counts (label → figure) as the page writes them. */
async function countsOf(list: Locator): Promise<Record<string, number>> {
  const pairs = await list.locator(":scope > div").evaluateAll((divs) =>
    divs.map((d) => [d.querySelector("dt")!.textContent!.trim(), Number(d.querySelector("dd")!.textContent!.replaceAll(",", ""))] as const),
  );
  return Object.fromEntries(pairs);
}



describe("a shop manager's export checked, loaded and its reject mended, in Chromium", () => {
  const firstName = "s1-june.csv";
  let batch = "";
  let rejectsFile = "";
  let rejectsName = "";

  it("shows the check of an upload: counts, the shop, the first rows and the reject's reason in words", async () => {
    await signInThroughProvider(page(), env.stack.url, "manager.s1", DEMO_PASSWORD);
    await page().getByRole("navigation", { name: "Main" }).getByRole("link", { name: "Imports" }).click();
    await page().getByRole("heading", { level: 1, name: "Imports" }).waitFor();
    await page().getByText("You can load rows of your shops only (S1).").waitFor();

    const s1 = serialOf.S1;
    const csv = [HEADER, jobLine("S1", "WEB-1", s1), jobLine("S1", "WEB-2", s1), jobLine("S1", "WEB-3", s1, BAD_DATE)].join("\n") + "\n";
    await choose([{ name: firstName, text: csv }]);

    const c = card(firstName);
    await c.getByText("Ready to load", { exact: true }).waitFor(SLOW);
    expect(await countsOf(c.getByLabel(`What loading ${firstName} would do`))).toEqual({
      "Rows read": 3, "Would insert": 2, "Would update": 0, Unchanged: 0, Rejected: 1,
    });
    await c.getByText(/Shops named in the rows:\s*S1 \(2 rows\)/).waitFor();
    const rows = c.getByRole("table", { name: `First rows of ${firstName} as they would land` });
    expect(await rows.locator("tbody tr").count()).toBe(2);
    await rows.getByRole("cell", { name: "WEB-1", exact: true }).waitFor();
    const rejects = c.getByRole("table", { name: `First rejected rows of ${firstName}` });
    expect(await rejects.locator("tbody tr").count()).toBe(1);
    const reject = rejects.locator("tbody tr").first();
    expect((await reject.locator("td").first().textContent())?.trim()).toBe("4");
    await reject.getByText(`opened date "${BAD_DATE}" is not a date in this export's format`, { exact: false }).waitFor();
    // the reason in words only, never the internal code
    expect(await reject.innerText()).not.toContain("bad_date");
    // nothing is stored by the check
    expect(await c.getByRole("link", { name: /^Rejects of batch/ }).count()).toBe(0);
    await photograph(env.browser, "imports-preview");
  }, 180_000);

  it("loads the file as a job and shows it loaded, at 100 %, with the batch's counts", async () => {
    const c = card(firstName);
    await c.getByRole("button", { name: `Load ${firstName}` }).click();
    await c.getByText("Loaded", { exact: true }).waitFor(SLOW);
    expect(await c.getByRole("button", { name: `Load ${firstName}` }).count()).toBe(0);
    expect(await c.getByRole("progressbar").count()).toBe(0);
    const link = c.getByRole("link", { name: /^Rejects of batch \d+ \(1\)$/ });
    await link.waitFor();
    batch = /batch (\d+)/.exec((await link.textContent())!)![1];
    expect(await countsOf(c.getByLabel(`What loading ${firstName} did`))).toEqual({ "Rows read": 3, Inserted: 2, Updated: 0, Unchanged: 0, Rejected: 1 });
    // the progress the page polled ends at 100 %, done, with every row read (the browser's own session asks)
    const id = (await c.getByRole("link", { name: /^Original file/ }).getAttribute("href"))!.split("/").at(-2)!;
    const answer = await page().request.get(env.stack.url + apiPaths.importItem(id));
    expect(answer.status()).toBe(200);
    expect((await answer.json()).progress).toMatchObject({ percent: 100, phase: "done", rowsRead: 3 });
    // the load history shows the new batch in the manager's shop
    const history = page().getByRole("table", { name: "Load history" });
    await history.getByRole("link", { name: firstName, exact: true }).waitFor(SLOW);
  }, 120_000);

  it("opens the batch's rejects and downloads them as CSV with line, reason code and reason in front", async () => {
    await card(firstName).getByRole("link", { name: /^Rejects of batch/ }).click();
    await page().getByRole("heading", { level: 1, name: `Rejects of batch ${batch}` }).waitFor(SLOW);
    const table = page().getByRole("table", { name: `Rejects of batch ${batch}` });
    expect(await table.locator("tbody tr").count()).toBe(1);
    await table.getByText(`opened date "${BAD_DATE}"`, { exact: false }).waitFor();
    expect(await table.getByText(/fixed by batch/).count()).toBe(0);
    await page().getByRole("combobox", { name: "Reason" }).selectOption("bad_date");
    await page().waitForURL(/reason=bad_date/);

    const [download] = await Promise.all([page().waitForEvent("download"), page().getByRole("link", { name: /^Download CSV/ }).click()]);
    rejectsName = download.suggestedFilename();
    expect(rejectsName).toMatch(/\.csv$/);
    rejectsFile = path.join(work, rejectsName);
    await download.saveAs(rejectsFile);
    const cells = parse(readFileSync(rejectsFile, "utf8")) as string[][];
    expect(cells[0].slice(0, 5)).toEqual(["line", "reason_code", "reason", "shop_code", "ro_number"]);
    expect(cells).toHaveLength(2);
    expect(cells[1].slice(0, 2)).toEqual(["4", "bad_date"]);
    expect(cells[1][2]).toContain(`"${BAD_DATE}" is not a date`);
    expect(cells[1].slice(3, 5)).toEqual(["S1", "WEB-3"]);
  }, 120_000);

  it("loads the downloaded file once its date is mended, as it is, and shows the reject fixed by that batch", async () => {
    // the date fields only: the reason text, which quotes the bad date, stays as downloaded
    const text = readFileSync(rejectsFile, "utf8");
    const mended = text.replace(new RegExp(`(?<=,)${BAD_DATE}(?=,)`, "g"), GOOD_DATE);
    expect(mended).not.toBe(text);
    expect(mended).toContain(`""${BAD_DATE}""`);
    writeFileSync(rejectsFile, mended);

    await page().getByRole("navigation", { name: "Main" }).getByRole("link", { name: "Imports" }).click();
    await page().getByRole("heading", { level: 1, name: "Imports" }).waitFor();
    await page().getByRole("region", { name: "Upload exports" }).locator('input[type="file"]').setInputFiles(rejectsFile);
    const c = card(rejectsName);
    await c.getByText("Ready to load", { exact: true }).waitFor(SLOW);
    expect(await countsOf(c.getByLabel(`What loading ${rejectsName} would do`))).toEqual({
      "Rows read": 1, "Would insert": 1, "Would update": 0, Unchanged: 0, Rejected: 0,
    });
    // the three columns in front are named as ignored, by position and name
    const ignored = c.getByRole("listitem").filter({ hasText: "has no column of that name" });
    expect(await ignored.locator("q").allTextContents()).toEqual(["line", "reason_code", "reason"]);
    expect(await ignored.allTextContents()).toEqual([
      expect.stringMatching(/^column 1\s*line/), expect.stringMatching(/^column 2\s*reason_code/), expect.stringMatching(/^column 3\s*reason:/),
    ]);
    await c.getByRole("button", { name: `Load ${rejectsName}` }).click();
    await c.getByText("Loaded", { exact: true }).waitFor(SLOW);
    const link = c.getByRole("link", { name: /^Rejects of batch \d+ \(0\)$/ });
    await link.waitFor();
    const later = /batch (\d+)/.exec((await link.textContent())!)![1];
    expect(Number(later)).toBeGreaterThan(Number(batch));

    await page().getByRole("table", { name: "Load history" }).getByRole("link", { name: firstName, exact: true }).click();
    await page().getByRole("heading", { level: 1, name: `Rejects of batch ${batch}` }).waitFor(SLOW);
    const table = page().getByRole("table", { name: `Rejects of batch ${batch}` });
    const fixed = table.getByRole("link", { name: `fixed by batch ${later}` });
    await fixed.waitFor();
    await photograph(env.browser, "imports-rejects", fixed);
    await fixed.click();
    await page().getByRole("heading", { level: 1, name: `Rejects of batch ${later}` }).waitFor(SLOW);
    await page().getByText("This load rejected no rows.").waitFor();
  }, 180_000);
});

describe("a manager's file naming another shop, in Chromium", () => {
  it("is refused with that shop named and cannot be loaded", async () => {
    const name = "s1-and-s8.csv";
    await page().getByRole("navigation", { name: "Main" }).getByRole("link", { name: "Imports" }).click();
    await page().getByRole("heading", { level: 1, name: "Imports" }).waitFor();
    const csv = [HEADER, jobLine("S1", "WEB-10", serialOf.S1), jobLine("S8", "WEB-11", serialOf.S8)].join("\n") + "\n";
    await choose([{ name, text: csv }]);
    const c = card(name);
    await c.getByText("Cannot be loaded", { exact: true }).waitFor(SLOW);
    await c.getByRole("alert").getByText(/This file has rows of shop S8 \(1 row\); you can load files of your own shops only \(S1\)\. Nothing was loaded\./).waitFor();
    expect(await c.getByRole("button", { name: /^Load/ }).count()).toBe(0);
    // by now the load history holds both loads, one with a long file name
    await page().getByRole("table", { name: "Load history" }).locator("tbody tr").nth(1).waitFor();
    await photograph(env.browser, "imports-refused");
  }, 120_000);

  it("logs no console errors or failed requests", () => {
    expect(env.browser.consoleErrors).toEqual([]);
  });
});
