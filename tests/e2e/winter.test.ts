import { afterAll, describe, expect, it } from "vitest";
import { mkdtempSync, readFileSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { parse } from "csv-parse/sync";
import { signInThroughProvider } from "../helpers/browser.js";
import { browserJourney } from "../helpers/browser-journey.js";
import { photograph } from "../helpers/photograph.js";
import { axeViolations } from "../helpers/axe.js";
import { DEMO_PASSWORD } from "../../server/auth/demo-accounts.js";

// A cold shop's manager gets ready for winter on the demo world: the forecast and stock advice of their shop only,
// a stock count entered that closes the gap, a period typed wrong and told why, and the block-heater fitting list
// downloaded as CSV.

const env = browserJourney({ demo: true });
const work = mkdtempSync(path.join(tmpdir(), "ironledger-winter-e2e-"));
afterAll(() => rmSync(work, { recursive: true, force: true }));

const number = (s: string | null) => Number((s ?? "").replace(/[^\d.]/g, ""));
const SLOW = { timeout: 60_000 };

describe("a shop manager's winter readiness in Chromium", () => {
  it("opens Winter readiness from the menu and sees only their shop's forecast and stock advice", async () => {
    const { page } = env.browser;
    await signInThroughProvider(page, env.stack.url, "manager.s1", DEMO_PASSWORD);
    await page.getByRole("navigation", { name: "Main" }).getByRole("link", { name: "Winter readiness" }).click();
    await page.getByRole("heading", { level: 1, name: "Winter readiness" }).waitFor();
    const forecast = page.getByRole("table", { name: "Forecast by shop and part" });
    await forecast.waitFor(SLOW);
    const shops = await forecast.locator("tbody tr td:first-child").allTextContents();
    expect(shops.length).toBeGreaterThan(0);
    expect(shops.every((s) => s.startsWith("S1"))).toBe(true);
    await page.getByText("How this is worked out").waitFor();
    const advice = page.getByRole("table", { name: "Stock advice by shop and part" });
    expect((await advice.locator("tbody tr td:first-child").allTextContents()).every((s) => s.startsWith("S1 "))).toBe(true);
    await page.getByRole("table", { name: "Last winter: forecast and actual by shop" }).waitFor(SLOW);
  });

  it("enters the stock on hand and sees the gap close", async () => {
    const { page } = env.browser;
    const row = page.getByRole("table", { name: "Stock advice by shop and part" }).locator("tbody tr").first();
    const hold = number(await row.locator("td").nth(2).textContent());
    expect(hold).toBeGreaterThan(0);
    const input = row.getByRole("textbox", { name: /^Stock on hand of / });
    await input.fill("lots");
    await row.getByRole("button", { name: /^Save/ }).click();
    await row.getByText("Quantity should be a whole number of 0 or more").waitFor();
    const onHand = Math.max(0, hold - 1);
    await input.fill(String(onHand));
    await row.getByRole("button", { name: /^Save/ }).click();
    await expect.poll(async () => number(await row.getByTestId("gap").textContent()), SLOW).toBe(hold - onHand);
    await photograph(env.browser, "winter-01-stock-advice", row.getByRole("textbox", { name: /^Stock on hand of / }));
  });

  it("says in words what is wrong with a typed service level and keeps the forecast", async () => {
    const { page } = env.browser;
    await page.getByRole("textbox", { name: "Service level" }).fill("ninety");
    await page.getByRole("button", { name: "Show forecast" }).click();
    await page.getByText("Service level should be a number from 0.5 to 0.999").waitFor();
    await page.getByRole("textbox", { name: "Service level" }).fill("95 %");
    await page.getByRole("button", { name: "Show forecast" }).click();
    await page.waitForURL(/serviceLevel=95/);
    await page.getByRole("heading", { name: /Stock advice at a 95(\.0)?\s?% service level/ }).waitFor(SLOW);
  });

  it("downloads the block-heater fitting list of their shop as CSV, with the cautions beside the list", async () => {
    const { page } = env.browser;
    const list = page.getByRole("table", { name: "Block-heater fitting list" });
    await list.waitFor(SLOW);
    const firstSerial = ((await list.locator("tbody tr").first().locator("td").nth(1).textContent()) ?? "").trim();
    await page.getByRole("complementary", { name: "Before fitting or plugging in a block heater" }).getByText(/GFCI outlet/).waitFor();
    const [download] = await Promise.all([page.waitForEvent("download"), page.getByRole("link", { name: "Download CSV" }).click()]);
    expect(download.suggestedFilename()).toMatch(/^block-heater-fitting-\d{4}-\d{2}-\d{2}\.csv$/);
    const file = path.join(work, download.suggestedFilename());
    await download.saveAs(file);
    const [header, ...rows] = parse(readFileSync(file, "utf8")) as string[][];
    expect(header.slice(0, 8)).toEqual(["shop", "shop_name", "serial", "model_line", "engine_family", "delivery_date", "age_months", "hour_meter_h"]);
    expect(rows.length).toBeGreaterThan(0);
    expect(rows.every((r) => r[0] === "S1")).toBe(true);
    expect(rows[0][2]).toBe(firstSerial);
    await photograph(env.browser, "winter-02-fitting-list", page.getByRole("link", { name: "Download CSV" }));
  });

  it("has no accessibility violations", async () => {
    const { page } = env.browser;
    expect(await axeViolations(page)).toEqual([]);
  });
});
