import { describe, expect, it } from "vitest";
import type { Locator } from "playwright-core";
import { signInThroughProvider } from "../helpers/browser.js";
import { browserJourney } from "../helpers/browser-journey.js";
import { photograph } from "../helpers/photograph.js";
import { DEMO_PASSWORD } from "../../server/auth/demo-accounts.js";

// An administrator corrects an export profile in Chromium: a shop system that now writes its dates day first
// is tried against the jobs profile, every row is refused for its date; the date format is changed in the form
// and the same sample tried again, now without a reject; the edit is saved as the next version with a note,
// and nothing was loaded by either try. Pages are photographed at desktop and phone width.

const env = browserJourney({ demo: true });
const SLOW = { timeout: 90_000 };
const HEADER =
  "shop_code,ro_number,line_no,serial,opened_date,closed_date,hour_meter,meter_note,complaint,cause,correction,component_code,failure_mode,labor_op,standard_hours,labor_hours,parts_cost,labor_cost,pay_type,line_type,tech_id,part_number,part_description,part_qty,supplier_lot,part_ordered_date,part_received_date,back_ordered,fault_codes,ambient_temp";

const page = () => env.browser.page;

async function countsOf(list: Locator): Promise<Record<string, number>> {
  const pairs = await list.locator(":scope > div").evaluateAll((divs) =>
    divs.map((d) => [d.querySelector("dt")!.textContent!.trim(), Number(d.querySelector("dd")!.textContent!.replaceAll(",", ""))] as const),
  );
  return Object.fromEntries(pairs);
}



describe("an administrator's profile edit tried on a sample and saved, in Chromium", () => {
  const sampleName = "s1-day-first.csv";
  let sample = "";
  let footprint: unknown;
  const counts = () => countsOf(page().getByLabel(`What loading ${sampleName} would do`));
  const footprintNow = async () =>
    (await env.stack.tdb.pool.query(`SELECT (SELECT count(*) FROM etl_batch) AS batches, (SELECT count(*) FROM fact_repair_line) AS lines`)).rows[0];

  it("shows every row of a day-first sample refused by the profile as it is", async () => {
    const serials = (await env.stack.tdb.pool.query<{ serial: string }>(
      `SELECT m.serial FROM dim_machine m JOIN dim_shop s ON s.shop_key = m.home_shop_key WHERE s.shop_code = 'S1' ORDER BY m.serial LIMIT 3`,
    )).rows.map((r) => r.serial);
    // dates day first (25/06/2024): read as YYYY-MM-DD they are no dates at all
    sample = [HEADER, ...serials.map((s, i) => `S1,DAYFIRST-${i + 1},1,${s},2${i}/06/2024,2${i}/06/2024,,,Hard start,Plug open,Replaced plug,ENG-CSA-HPLUG,OPEN,,1.0,1.0,10.00,20.00,customer,failure,,,,,,,,N,,`)].join("\n") + "\n";
    footprint = await footprintNow();

    await signInThroughProvider(page(), env.stack.url, "admin", DEMO_PASSWORD);
    await page().getByRole("navigation", { name: "Main" }).getByRole("link", { name: "Profiles" }).click();
    await page().getByRole("heading", { level: 1, name: "Export profiles" }).waitFor();
    await page().getByRole("list", { name: "Export profiles" }).getByRole("link", { name: "generic-jobs", exact: true }).click();
    await page().getByRole("heading", { level: 1, name: "Profile generic-jobs" }).waitFor();
    await page().getByText(/Reads repair-order lines · version 1/).waitFor();

    await page().getByLabel("Sample export").setInputFiles({ name: sampleName, mimeType: "text/csv", buffer: Buffer.from(sample) });
    await page().getByRole("button", { name: "Try on the sample" }).click();
    await page().getByRole("status").filter({ hasText: "Nothing was loaded." }).waitFor(SLOW);
    expect(await counts()).toMatchObject({ "Rows read": 3, Rejected: 3 });
    await page().getByRole("table", { name: `First rejected rows of ${sampleName}` }).getByText(/is not a date in this export's format/).first().waitFor();
  }, 180_000);

  it("reads the same sample without a reject once the date format says day first, still loading nothing", async () => {
    await page().getByLabel("Date format").selectOption("dmy");
    await page().getByRole("button", { name: "Try on the sample" }).click();
    await page().waitForFunction(() => !document.body.textContent?.includes("Reading the sample…"));
    await page().getByRole("table", { name: `First rows of ${sampleName} as they would land` }).waitFor(SLOW);
    expect(await counts()).toMatchObject({ "Rows read": 3, "Would insert": 3, Rejected: 0 });
    // the rows land with their dates in the warehouse's form
    await page().getByRole("table", { name: `First rows of ${sampleName} as they would land` }).getByRole("cell", { name: "2024-06-20" }).first().waitFor();
    expect(await footprintNow()).toEqual(footprint);
    await photograph(env.browser, "profile-trial");
  }, 120_000);

  it("saves the edit as version 2 with its note; the versions table shows both", async () => {
    await page().getByLabel("Why (kept with the version)").fill("the shop system now writes dates day first");
    await page().getByRole("button", { name: "Save as version 2" }).click();
    await page().getByRole("status").filter({ hasText: "Saved as version 2." }).waitFor(SLOW);
    const versions = page().getByRole("table", { name: "Versions of the profile" });
    await versions.getByRole("cell", { name: "the shop system now writes dates day first" }).waitFor();
    expect(await versions.locator("tbody tr").count()).toBe(2);
    const stored = await env.stack.tdb.pool.query(`SELECT version, body->>'dateFormat' AS date_format, saved_by FROM etl_profile_version WHERE profile_id = 'generic-jobs' ORDER BY version`);
    expect(stored.rows).toEqual([
      { version: 1, date_format: "iso", saved_by: "defaults" },
      { version: 2, date_format: "dmy", saved_by: expect.any(String) },
    ]);
    expect(await footprintNow()).toEqual(footprint);
    // version 1 is still there, shown read only
    await versions.getByRole("link", { name: "1", exact: true }).click();
    await page().getByText(/an older version, shown as it was \(read only\)/).waitFor();
    expect(await page().getByLabel("Date format").inputValue()).toBe("iso");
    expect(await page().getByLabel("Date format").isDisabled()).toBe(true);
    await photograph(env.browser, "profile-old-version");
  }, 120_000);

  it("logs no console errors or failed requests", () => {
    expect(env.browser.consoleErrors).toEqual([]);
  });
});
