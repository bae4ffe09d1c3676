import { describe, expect, it } from "vitest";
import { signInThroughProvider } from "../helpers/browser.js";
import { browserJourney } from "../helpers/browser-journey.js";
import { DEMO_PASSWORD } from "../../server/auth/demo-accounts.js";

// The analyst's comparisons on the demo world (../shared/SCENARIO.md: heater-plug lot BT-2109 on K26-4R wears
// out early): the lot's failure rate against the other lots in words, a B-life other than B10 on the Life page
// (and a refused one in words), the cost MCF beside the count MCF, then two engine families and the cost table
// on the Rates page.

const env = browserJourney({ demo: true });
const SLOW = { timeout: 120_000 };
const page = () => env.browser.page;

describe("the analyst's comparisons in Chromium", () => {
  it("compares lot BT-2109 with the other K26-4R lots on the Life page, in words and with a B25 life", async () => {
    await signInThroughProvider(page(), env.stack.url, "analyst", DEMO_PASSWORD);
    await page().goto(`${env.stack.url}/life?engineFamilies=K26-4R&component=ENG-CSA-HPLUG&compareBy=lot&compareValue=BT-2109`);
    await page().getByText(/^Lot BT-2109 fails [\d.,]+ times as often as all other lots per 1,000 engine hours \(95 % CI [\d.,]+–[\d.,]+, p [<=] [\d.]+\)\.$/).waitFor(SLOW);
    await page().getByRole("heading", { name: /cost MCF/ }).waitFor(SLOW);
    await page().getByText(/Scale ratio \d/).waitFor(SLOW);

    const bLife = page().getByRole("textbox", { name: "B-life percent" });
    await bLife.fill("60");
    await bLife.press("Enter");
    await page().getByRole("alert").getByText("B-life runs from B1 to B50.").waitFor();
    expect(page().url()).not.toContain("bLife=");

    await bLife.fill("25");
    await bLife.press("Enter");
    await page().waitForURL(/bLife=25/);
    await page().getByRole("columnheader", { name: "B25 life, h (90 %)" }).waitFor(SLOW);
    expect(await page().getByTestId("weibull-b-life").count()).toBe(2);
    await page().getByTestId("km-b-life").getByText(/B25 life read off the curve/).waitFor(SLOW);
    expect(await page().locator("[data-testid=chart]:has(svg)").count()).toBe(4);
    await env.browser.screenshot("life-compare-01-lot-b25");
  }, 300_000);

  it("compares two engine families and shows repair cost per 1,000 engine hours on the Rates page", async () => {
    await page().goto(`${env.stack.url}/rates?cmpBy=engineFamily&cmpA=K18-3G&cmpB=K26-4R&cmpPart=ENG-CSA-HPLUG`);
    await page().getByTestId("rate-comparison").getByText(/^Engine family K18-3G (fails [\d.,]+ times as often as|had no failures against)/).waitFor(SLOW);
    const costs = page().getByTestId("cost-table");
    await costs.getByRole("cell", { name: "All components" }).waitFor(SLOW);
    expect(await costs.getByRole("columnheader").count()).toBeGreaterThan(3);
    await env.browser.screenshot("life-compare-02-rates");
  }, 300_000);
});
