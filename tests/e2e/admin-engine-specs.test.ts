import { beforeAll, describe, expect, it } from "vitest";
import { signInThroughProvider } from "../helpers/browser.js";
import { browserJourney } from "../helpers/browser-journey.js";
import { axeViolations } from "../helpers/axe.js";
import { photograph } from "../helpers/photograph.js";
import { DEMO_PASSWORD } from "../../server/auth/demo-accounts.js";
import { engineSpecPaths } from "../../shared/schemas/engine-specs.js";

// An administrator enters an engine family's own compression figures in Chromium, in kPa as a manual might give
// them: a minimum above the target is refused in the browser in words and nothing is sent; corrected, the
// figures are saved as version 1, stored in psi (NIST SP 811 (2008) Appendix B.8: 1 psi = 6.894 757 kPa). The
// figures are test inputs, not any engine's values.

const env = browserJourney({ demo: true });
const page = () => env.browser.page;
const writes: string[] = [];

beforeAll(() => {
  page().on("request", (r) => {
    if (r.method() !== "GET" && r.url().includes(engineSpecPaths.adminList())) writes.push(`${r.method()} ${new URL(r.url()).pathname}`);
  });
});

describe("an administrator's engine figures, in Chromium", () => {
  it("refuses a minimum above the target in words, then saves the corrected figures as version 1 in psi", async () => {
    await signInThroughProvider(page(), env.stack.url, "admin", DEMO_PASSWORD);
    await page().waitForLoadState("networkidle");
    await page().getByRole("navigation", { name: "Main" }).getByRole("link", { name: "Engine figures", exact: true }).click();
    await page().getByRole("heading", { level: 1, name: "Engine figures" }).waitFor();
    await page().getByRole("link", { name: "K26-4R", exact: true }).click();
    const form = page().getByRole("form", { name: "Figures for K26-4R" });
    await form.waitFor();

    await form.getByLabel("Unit").selectOption("kPa");
    await form.getByLabel("Target, low end (kPa)").fill("3000");
    await form.getByLabel("Target, high end (kPa)").fill("3400");
    await form.getByLabel("Allowable minimum (kPa)").fill("3100");
    await form.getByLabel("Where in the maker's service manual").fill("engine section, compression table");
    await form.getByLabel("Why it changes").fill("First entry from the manual.");
    await form.getByRole("button", { name: "Save as version 1" }).click();
    await form.getByText("the allowable minimum (3100 kPa) is above the target's low end (3000 kPa); the minimum must be at or below the target").waitFor();
    expect(writes).toEqual([]);

    await form.getByLabel("Allowable minimum (kPa)").fill("2800");
    await form.getByRole("button", { name: "Save as version 1" }).click();
    await page().getByRole("status").getByText("Saved K26-4R as version 1.").waitFor();
    expect(writes).toEqual([`PUT ${engineSpecPaths.admin("K26-4R")}`]);
    const row = (await env.stack.tdb.pool.query<{ t: string; a: string; unit: string; saved_by: string }>(
      `SELECT target_min_psi::text AS t, allowable_min_psi::text AS a, entered_unit AS unit, saved_by FROM engine_spec_version WHERE engine_family = 'K26-4R'`,
    )).rows;
    expect(row).toHaveLength(1);
    expect(Number(row[0].t)).toBeCloseTo(3000 / 6.894757, 9);
    expect(Number(row[0].a)).toBeCloseTo(2800 / 6.894757, 9);
    expect(row[0].unit).toBe("kPa");
    await page().getByRole("table", { name: "Versions of K26-4R's figures" }).waitFor();
    expect(await axeViolations(page())).toEqual([]);
    await photograph(env.browser, "admin-engine-specs", page().getByRole("status").getByText("Saved K26-4R as version 1."));
  });
});
