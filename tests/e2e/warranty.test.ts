import { afterAll, describe, expect, it } from "vitest";
import { execFileSync } from "node:child_process";
import { mkdtempSync, readFileSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { artifactsDir, forgetSessions, signInThroughProvider } from "../helpers/browser.js";
import { browserJourney } from "../helpers/browser-journey.js";
import { drawnPng } from "../helpers/drawn-png.js";
import { DEMO_PASSWORD } from "../../server/auth/demo-accounts.js";

// The warranty clerk's journey on the demo world: the planted heater-plug lot BT-2109 (../shared/SCENARIO.md)
// becomes a campaign case with a photo, its packet is downloaded and e-mailed to the SMTP fake.

const env = browserJourney({ demo: true });
const work = mkdtempSync(path.join(tmpdir(), "ironledger-warranty-e2e-"));

afterAll(async () => {
  rmSync(work, { recursive: true, force: true });
});

describe("a campaign case from the planted cluster in Chromium", () => {
  let claimNumber = "";

  it("lets the clerk pick the BT-2109 cluster on the new-claim page and see its statistics", async () => {
    const { page } = env.browser;
    await signInThroughProvider(page, env.stack.url, "clerk", DEMO_PASSWORD);
    await page.getByRole("navigation", { name: "Main" }).getByRole("link", { name: "Claims" }).click();
    await page.getByRole("link", { name: "New claim" }).click();
    await page.getByRole("table", { name: "Unclaimed repair lines in warranty" }).waitFor();
    await env.browser.screenshot("warranty-new-claim-chooser");
    const choice = page.getByRole("list", { name: "Clusters to choose from" }).getByRole("listitem").filter({ hasText: "BT-2109" }).first();
    await choice.getByRole("button", { name: /^Use cluster/ }).click();
    await page.waitForURL(/\/claims\/new\?cluster=[0-9a-f]{16}$/);
    await page.getByTestId("cluster-stats").getByText("BT-2109").first().waitFor();
    await page.getByRole("table", { name: "Repair lines in the case" }).waitFor();
    await env.browser.screenshot("warranty-campaign-preview");
  });

  it("makes the campaign case and shows its deadline, lines and audit trail", async () => {
    const { page } = env.browser;
    await page.getByRole("button", { name: "Make the campaign case" }).click();
    await page.waitForURL(/\/claims\/\d+$/);
    // the detail page loads lazily after the URL changes: wait for its own heading
    const heading = page.getByRole("heading", { level: 1, name: /^IL-\d{2}C\d{5}$/ });
    await heading.waitFor();
    claimNumber = (await heading.textContent())!.trim();
    expect(claimNumber).toMatch(/^IL-\d{2}C\d{5}$/);
    await page.getByText(/RO closed \d{4}-\d{2}-\d{2} \+ 30 days = deadline/).first().waitFor();
    await page.getByRole("list", { name: "Audit trail" }).getByText("created").waitFor();
  });

  it("attaches a photo and shows it as a thumbnail", async () => {
    const { page } = env.browser;
    const buffer = await drawnPng(page, { width: 160, height: 100, colour: "#7a5a3c", second: "#b7410e" });
    await page.getByLabel("Attach a file").setInputFiles({ name: "failed-plug.png", mimeType: "image/png", buffer });
    const thumb = page.getByRole("img", { name: "failed-plug.png" });
    await thumb.waitFor();
    // thumbnails load lazily: bring it on screen as the clerk would
    await thumb.scrollIntoViewIfNeeded();
    await expect.poll(() => thumb.evaluate((img: HTMLImageElement) => img.complete && img.naturalWidth), { timeout: 30_000 }).toBe(160);
    await page.getByRole("list", { name: "Audit trail" }).getByText("attachment added").waitFor();
    await env.browser.screenshot("warranty-campaign-detail");
  });

  it("downloads the packet PDF with the cluster statistics and the photo's name in it", async () => {
    const { page } = env.browser;
    const [download] = await Promise.all([page.waitForEvent("download"), page.getByRole("link", { name: "Download packet (PDF)" }).click()]);
    const file = path.join(work, "packet.pdf");
    await download.saveAs(file);
    expect(readFileSync(file).subarray(0, 5).toString()).toBe("%PDF-");
    const text = execFileSync("pdftotext", ["-layout", file, "-"], { encoding: "utf8" });
    expect(text).toContain(claimNumber);
    expect(text).toContain("Cluster statistics");
    expect(text).toContain("BT-2109");
    expect(text).toContain("failed-plug.png");
    execFileSync("pdftoppm", ["-png", "-r", "60", "-f", "1", "-l", "2", file, path.join(artifactsDir, "warranty-packet")], { stdio: "ignore" });
  });

  it("sends the packet and shows it as sent", async () => {
    const { page } = env.browser;
    await page.getByRole("button", { name: "Send packet" }).click();
    await page.getByTestId("send-state").getByText(/^Sent to claims-k26@warranty\.ironledger\.invalid/).waitFor();
    await page.getByRole("list", { name: "Audit trail" }).getByText("packet sent").waitFor();
    await env.browser.screenshot("warranty-campaign-sent");
  });

  it("shows the clerk's queue of covered, unclaimed repair lines on the claims page and opens a claim from it", async () => {
    const { page } = env.browser;
    await page.getByRole("navigation", { name: "Main" }).getByRole("link", { name: "Claims" }).click();
    const queue = page.getByRole("table", { name: "Unclaimed repair lines in warranty" });
    await queue.waitFor({ timeout: 60_000 });
    expect(await queue.locator("tbody tr").count()).toBeGreaterThan(0);
    await env.browser.screenshot("warranty-claims-queue");
    await queue.getByRole("button", { name: /^Claim RO / }).first().click();
    await page.waitForURL(/\/claims\/new\?repairLine=/);
    await page.waitForLoadState("networkidle");
  });

  it("lets the admin read the captured mail with the packet attached", async () => {
    const { page } = env.browser;
    await forgetSessions(page);
    await signInThroughProvider(page, env.stack.url, "admin", DEMO_PASSWORD);
    await page.getByRole("navigation", { name: "Main" }).getByRole("link", { name: "Captured mail" }).click();
    await page.getByRole("list", { name: "Captured mail" }).getByText(`${claimNumber}.pdf`, { exact: false }).waitFor();
    await env.browser.screenshot("warranty-captured-mail");
  });

  it("logs no console errors on the way", () => {
    expect(env.browser.consoleErrors).toEqual([]);
  });
});
