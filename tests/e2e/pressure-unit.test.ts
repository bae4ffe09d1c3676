import { describe, expect, it } from "vitest";
import { sql } from "kysely";
import { signInThroughProvider } from "../helpers/browser.js";
import { browserJourney } from "../helpers/browser-journey.js";
import { DEMO_PASSWORD } from "../../server/auth/demo-accounts.js";

// A reader picks the unit pressures are shown in; the repair list groups large figures in thousands.

const env = browserJourney({ demo: true });
const SLOW = { timeout: 120_000 };
const page = () => env.browser.page;

// NIST SP 811 (2008) Appendix B.8: 1 psi = 6.894 757 kPa; 1 bar = 100 kPa (exact)
const KPA_PER_PSI = 6.894757;

describe("the pressure unit and figures in Chromium", () => {
  it("groups hour-meter figures of 1,000 h and more with a thousands separator in the repair list", async () => {
    await signInThroughProvider(page(), env.stack.url, "analyst", DEMO_PASSWORD);
    await page().goto(`${env.stack.url}/repairs?sort=hours&dir=desc`);
    await page().getByText(/^[\d,]+ repair lines$/).waitFor(SLOW);
    const hoursColumn = await page().locator("table thead th").allInnerTexts();
    const at = hoursColumn.findIndex((t) => /Hour meter/.test(t));
    expect(at).toBeGreaterThanOrEqual(0);
    const top = await page().locator(`table tbody tr:first-child td:nth-child(${at + 1})`).innerText();
    // en-US grouping per Unicode CLDR: "," every three digits (the browser runs in en-US)
    expect(top).toMatch(/^\d{1,3}(,\d{3})+$/);
  }, 180_000);

  it("shows compression in bar with the unit once the reader picks bar, and keeps the choice", async () => {
    const found = await sql<{ id: string; value: string }>`
      SELECT repair_line_key::text AS id, value::text AS value FROM fact_measurement
      WHERE kind = 'compression' AND value IS NOT NULL AND position = 1 AND attempt = 1
      ORDER BY repair_line_key LIMIT 1`.execute(env.stack.tdb.db);
    expect(found.rows.length).toBe(1);
    const { id, value } = found.rows[0];
    await page().goto(`${env.stack.url}/repairs/${id}`);
    const table = page().getByRole("table", { name: "Compression per cylinder" });
    await table.waitFor(SLOW);

    const unitChoice = page().getByRole("main").getByRole("combobox", { name: "Pressure unit" });
    const locale = await page().evaluate(() => navigator.language);
    // the rule of the product: psi for US English, kPa otherwise
    expect(await unitChoice.inputValue()).toBe(locale === "en-US" ? "psi" : "kPa");

    await unitChoice.selectOption("bar");
    await table.getByRole("columnheader", { name: "Attempt 1 (bar)" }).waitFor();
    const firstCell = await table.locator("tbody tr:first-child td:nth-child(2)").innerText();
    // the stored psi converted with the NIST factor, to the hundredth of a bar
    const expected = ((Number(value) * KPA_PER_PSI) / 100).toLocaleString(locale, { minimumFractionDigits: 2, maximumFractionDigits: 2 });
    expect(firstCell).toBe(expected);
    const average = await page().getByText("Average", { exact: true }).locator("xpath=following-sibling::dd").innerText();
    expect(average).toMatch(/^\d+[.,]\d{2}\u00a0bar$/);
    const section = page().locator("section[aria-labelledby=m-compression]");
    // every figure, band and pattern of the panel is in bar (only the unit choice still names psi)
    expect((await section.locator("table, dl, p").allInnerTexts()).join("\n")).not.toMatch(/psi/);
    await env.browser.screenshot("repair-compression-in-bar");

    await page().reload();
    await table.waitFor(SLOW);
    expect(await page().evaluate(() => localStorage.getItem("ironledger.pressureUnit"))).toBe("bar");
    await table.getByRole("columnheader", { name: "Attempt 1 (bar)" }).waitFor();
  }, 180_000);

  it("logs no console errors or failed requests", () => {
    expect(env.browser.consoleErrors).toEqual([]);
  });
});
