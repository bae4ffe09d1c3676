import { describe, expect, it } from "vitest";
import { sql } from "kysely";
import { signInThroughProvider } from "../helpers/browser.js";
import { browserJourney } from "../helpers/browser-journey.js";
import { DEMO_PASSWORD } from "../../server/auth/demo-accounts.js";

// The analyst's week on the demo world (../shared/SCENARIO.md): the planted heater-plug lot must top the
// cluster list, and its repair lines must lead down to single repair orders with their readings.

const env = browserJourney({ demo: true });
const SLOW = { timeout: 120_000 }; // the first cluster scan of a fresh server takes a while


const page = () => env.browser.page;
const nav = (name: string) => page().getByRole("navigation", { name: "Main" }).getByRole("link", { name, exact: true });
const chartCount = () => page().locator("[data-testid=chart]:has(svg)").count();

describe("the analyst's week in Chromium", () => {
  it("signs in through the provider and sees the overview with loads, rates, new clusters and machines", async () => {
    await signInThroughProvider(page(), env.stack.url, "analyst", DEMO_PASSWORD);
    await page().getByRole("heading", { name: "Machines most in need of attention" }).waitFor(SLOW);
    await page().getByRole("heading", { name: "Findings new or changed" }).waitFor();
    await page().getByRole("cell", { name: /S5 · / }).waitFor();
    await env.browser.screenshot("analyst-01-overview");
  }, 180_000);

  it("finds the planted heater-plug lot (BT-2109, K26-4R) as the first finding of Clusters, its slices inside it", async () => {
    await nav("Clusters").click();
    const first = page().getByRole("list", { name: "Findings" }).getByRole("listitem").first();
    await first.waitFor(SLOW);
    const text = await first.innerText();
    expect(text).toMatch(/^HEATER-PLUG SET|Heater-plug set/);
    expect(text).toMatch(/Heater-plug set failures with lot BT-2109 \(engine family K26-4R/);
    expect(text).toMatch(/Inside this finding \(\d+\)/);
    // no second finding names the lot
    expect(await page().getByRole("list", { name: "Findings" }).getByRole("listitem").filter({ hasText: "lot BT-2109" }).count()).toBe(1);
    // every temperature of the finding and its facets follows the unit switch
    const openFacets = () => first.locator("details").first().evaluate((d) => ((d as HTMLDetailsElement).open = true));
    await openFacets();
    const temps = async () => (await first.innerText()).match(/°[CF]/g) ?? [];
    expect(new Set(await temps())).toEqual(new Set(["°C"]));
    const unitSwitch = page().getByRole("group", { name: "Temperature unit" });
    await unitSwitch.getByRole("button", { name: "°F" }).click();
    await page().waitForFunction(() => /°F/.test(document.querySelector('[aria-label="Findings"] li')?.textContent ?? ""), undefined, SLOW);
    await openFacets();
    expect(new Set(await temps())).toEqual(new Set(["°F"]));
    await unitSwitch.getByRole("button", { name: "°C" }).click();
    await page().waitForFunction(() => !/°F/.test(document.querySelector('[aria-label="Findings"] li')?.textContent ?? ""), undefined, SLOW);
    await env.browser.screenshot("analyst-02-clusters");
  }, 180_000);

  let lineIds: string[] = [];
  it("opens the cluster and sees its repair lines, machines and charts", async () => {
    await page().getByRole("list", { name: "Findings" }).getByRole("listitem").first().getByRole("link").first().click();
    await page().getByRole("heading", { name: /^Repair lines \([\d,]+\)$/ }).waitFor(SLOW);
    const hrefs = await page().locator('a[href^="/repairs/"]').evaluateAll((as) => as.map((a) => a.getAttribute("href")!));
    lineIds = [...new Set(hrefs.map((h) => h.slice("/repairs/".length)))];
    expect(lineIds.length).toBeGreaterThan(10);
    expect(await chartCount()).toBeGreaterThanOrEqual(3);
    // an analyst is not offered a warranty case (it would be refused), but is told who opens one; the finding is theirs to work
    expect(await page().getByRole("button", { name: "Open a warranty case" }).or(page().getByRole("link", { name: "Open a warranty case" })).count()).toBe(0);
    await page().getByText("A warranty clerk or a shop manager opens warranty cases from this page").waitFor();
    await page().getByRole("heading", { name: "Working this finding" }).waitFor();
    await env.browser.screenshot("analyst-03-cluster-detail");
  }, 180_000);

  it("sets the finding to investigating with a note, and sees it in its history and on the list", async () => {
    const panel = page().getByRole("region", { name: "Working this finding" });
    await panel.getByLabel("Status").selectOption("investigating");
    await panel.getByLabel("Note").fill("asking two cold shops for the removed plugs");
    await panel.getByRole("button", { name: "Save" }).click();
    const history = panel.getByRole("list", { name: "History of the finding" });
    await history.getByText(/status New → Investigating — asking two cold shops for the removed plugs/).waitFor(SLOW);
    await history.getByText(/found by the scan/).waitFor();
    await nav("Clusters").click();
    const first = page().getByRole("list", { name: "Findings" }).getByRole("listitem").first();
    await first.getByText("Investigating", { exact: true }).waitFor(SLOW);
    await env.browser.screenshot("analyst-03b-finding-investigating");
    // the Overview lists it among the findings changed since the last visit
    await nav("Overview").click();
    await page().getByRole("heading", { name: "Findings new or changed" }).waitFor(SLOW);
    await page().getByText("worked: now investigating").first().waitFor(SLOW);
    await env.browser.screenshot("analyst-03c-overview-finding-changed");
    // back to the finding's evidence, where the next step starts
    await page().getByRole("link", { name: /Heater-plug set failures with lot BT-2109/ }).first().click();
    await page().getByRole("heading", { name: /^Repair lines \([\d,]+\)$/ }).waitFor(SLOW);
  }, 180_000);

  it("opens a repair with compression readings and sees the table with average and spread", async () => {
    const withCompression = await sql<{ id: string }>`
      SELECT DISTINCT repair_line_key::text AS id FROM fact_measurement
      WHERE kind = 'compression' AND repair_line_key IN (${sql.join(lineIds.map((id) => sql`${id}::bigint`))})`.execute(env.stack.tdb.db);
    expect(withCompression.rows.length).toBeGreaterThan(0);
    const id = withCompression.rows[0].id;
    await page().locator(`a[href="/repairs/${id}"]`).first().click();
    const table = page().getByRole("table", { name: "Compression per cylinder" });
    await table.waitFor(SLOW);
    expect(await table.locator("tbody tr").count()).toBeGreaterThanOrEqual(3);
    await page().getByText("Average", { exact: true }).waitFor();
    await page().getByText("Spread between cylinders").waitFor();
    await page().getByRole("heading", { name: "Before you act on these readings" }).waitFor();
    await page().getByText(/Follow the maker's service manual/).waitFor();
    await env.browser.screenshot("analyst-04-repair-with-compression");

    const without = lineIds.find((x) => !withCompression.rows.some((r) => r.id === x))!;
    await page().goto(`${env.stack.url}/repairs/${without}`, { waitUntil: "networkidle" });
    await page().getByText("No compression recorded on this line.").waitFor(SLOW);
    await env.browser.screenshot("analyst-05-repair-without-compression");
  }, 180_000);

  it("renders the four rate charts with data", async () => {
    await nav("Rates").click();
    await page().getByRole("heading", { name: "Monthly failures against what the fleet predicts" }).waitFor(SLOW);
    // the newest months of the demo's exports are incomplete: drawn hollow, said in words, no alarm
    await page().getByText(/Left out as incomplete \(hour readings cover less than 95 %/).waitFor();
    await page().getByTestId("flagged-months").waitFor();
    await page().getByRole("heading", { name: "Failures by component (Pareto)" }).waitFor(SLOW);
    await page().getByRole("heading", { name: "Failure rate by daily minimum temperature" }).waitFor(SLOW);
    await page().getByRole("heading", { name: "Failure rate by engine-hour band" }).waitFor(SLOW);
    expect(await chartCount()).toBe(4);
    expect(await page().locator("[data-testid=chart] svg rect").count()).toBeGreaterThan(10);
    await page().getByRole("button", { name: "°F" }).click();
    await page().getByText("Daily minimum temperature at the home shop (°F)").waitFor();
    await env.browser.screenshot("analyst-06-rates");
    await page().getByRole("button", { name: "Plain rate" }).click();
    await page().getByRole("heading", { name: "Monthly failure rate with control limits" }).waitFor();
    await page().getByRole("button", { name: "Against expected" }).click();
  }, 180_000);

  it("renders the Weibull plot with its fit table, Kaplan–Meier and the mean cumulative function", async () => {
    await nav("Life").click();
    await page().getByRole("heading", { name: /Weibull probability plot/ }).waitFor(SLOW);
    await page().getByRole("heading", { name: /Kaplan–Meier/ }).waitFor(SLOW);
    await page().getByRole("heading", { name: /mean cumulative function/ }).waitFor(SLOW);
    await page().getByRole("heading", { name: /cost MCF/ }).waitFor(SLOW);
    expect(await chartCount()).toBe(4);
    await page().getByRole("columnheader", { name: /β shape/ }).waitFor();
    expect(await page().locator("[data-testid=chart] svg circle").count()).toBeGreaterThan(20);
    await page().getByRole("combobox", { name: "Compare", exact: true }).selectOption("lot");
    await page().getByRole("textbox", { name: "Lot", exact: true }).fill("BT-2109");
    await page().getByRole("textbox", { name: "Lot", exact: true }).press("Enter");
    await page().getByText(/Scale ratio \d/).waitFor(SLOW);
    await env.browser.screenshot("analyst-07-life");
  }, 180_000);

  it("lists repairs with server-side paging and sorting", async () => {
    await nav("Repairs").click();
    await page().getByText(/^[\d,]+ repair lines$/).waitFor(SLOW);
    await page().getByRole("button", { name: /Hour meter/ }).click();
    await page().waitForURL(/sort=hours/);
    await page().getByRole("button", { name: "Next" }).click();
    await page().getByText(/^Page 2 of/).waitFor();
    await env.browser.screenshot("analyst-08-repairs");
    await page().setViewportSize({ width: 800, height: 900 });
    await env.browser.screenshot("analyst-09-repairs-tablet");
    await page().setViewportSize({ width: 1280, height: 860 });
  }, 180_000);

  it("shows the manager of S5 only S5's repairs", async () => {
    await page().getByRole("button", { name: /Teodor Quill/ }).click();
    await page().getByRole("menuitem", { name: "Sign out" }).click();
    await page().waitForURL(`${env.stack.url}/signed-out`);
    await page().getByRole("link", { name: "Sign in" }).click();
    await page().getByLabel("Username").fill("manager.s5");
    await page().getByLabel("Password").fill(DEMO_PASSWORD);
    await page().getByRole("button", { name: "Sign in" }).click();
    await page().getByRole("navigation", { name: "Main" }).waitFor();
    await nav("Repairs").click();
    await page().getByText(/^[\d,]+ repair lines$/).waitFor(SLOW);
    const shops = await page().locator("table tbody tr td:nth-child(2)").allInnerTexts();
    expect(shops.length).toBe(25);
    expect(new Set(shops)).toEqual(new Set(["S5"]));
    await env.browser.screenshot("analyst-10-manager-s5-repairs");
    await nav("Overview").click();
    await page().getByRole("heading", { name: "Machines most in need of attention" }).waitFor(SLOW);
    await env.browser.screenshot("analyst-11-manager-s5-overview");
  }, 240_000);

  it("logs no console errors or failed requests on any page", () => {
    expect(env.browser.consoleErrors).toEqual([]);
  });
});
