import { chromium, type BrowserContext, type Page } from "playwright-core";
import { mkdirSync, mkdtempSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";

export const artifactsDir = path.resolve(import.meta.dirname, "../../test-artifacts/screenshots");

export interface Browser {
  ctx: BrowserContext;
  page: Page;
  consoleErrors: string[];
  screenshot(name: string): Promise<string>;
  close(): Promise<void>;
}

/** Debian's Chromium, headless, with a new empty profile and background networking off. */
export async function openBrowser(): Promise<Browser> {
  const udd = mkdtempSync(path.join(tmpdir(), "ironledger-chromium-"));
  const ctx = await chromium.launchPersistentContext(udd, {
    executablePath: process.env.CHROMIUM_PATH ?? "/usr/bin/chromium",
    headless: true,
    viewport: { width: 1280, height: 860 },
    args: [
      "--headless", "--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run",
      "--disable-background-networking", "--disable-component-update", "--disable-sync",
    ],
  });
  const page = ctx.pages()[0] ?? (await ctx.newPage());
  const consoleErrors: string[] = [];
  page.on("console", (m) => {
    if (m.type() === "error") consoleErrors.push(m.text());
  });
  page.on("pageerror", (e) => consoleErrors.push(e.message));
  page.on("response", (r) => {
    if (r.status() >= 400) consoleErrors.push(`HTTP ${r.status()} ${r.url()}`);
  });
  mkdirSync(artifactsDir, { recursive: true });
  return {
    ctx,
    page,
    consoleErrors,
    async screenshot(name) {
      const file = path.join(artifactsDir, `${name}.png`);
      await page.screenshot({ path: file, fullPage: true });
      return file;
    },
    async close() {
      try {
        await ctx.close();
      } finally {
        rmSync(udd, { recursive: true, force: true });
      }
    },
  };
}

/** Signs in through the identity provider's own page, as a user would. */
export async function signInThroughProvider(page: Page, baseUrl: string, username: string, password: string, path = "/") {
  await page.goto(baseUrl + path, { waitUntil: "networkidle" });
  await page.getByRole("link", { name: "Sign in" }).click();
  await page.getByLabel("Username").fill(username);
  await page.getByLabel("Password").fill(password);
  await page.getByRole("button", { name: "Sign in" }).click();
  await page.waitForURL((u) => u.href.startsWith(baseUrl), { timeout: 15_000 });
  await page.getByRole("navigation", { name: "Main" }).waitFor();
}

/**
 * Forgets every session in the browser. Leaves the page first: with rolling sessions a response still in
 * flight from the old page would set the session cookie again after it was cleared.
 */
export async function forgetSessions(page: Page): Promise<void> {
  await page.goto("about:blank");
  await page.context().clearCookies();
}
