import { createRequire } from "node:module";
import { readFileSync } from "node:fs";
import type { Page } from "playwright-core";

const require = createRequire(import.meta.url);
const axeSource = readFileSync(require.resolve("axe-core/axe.min.js"), "utf8");

export interface AxeViolation {
  id: string;
  impact: string | null;
  help: string;
  nodes: string[];
}

/**
 * Runs axe-core (WCAG 2.0/2.1 level A and AA rules) in the page and returns its violations, each with the
 * selectors of the first few elements it found.
 */
export async function axeViolations(page: Page): Promise<AxeViolation[]> {
  await page.evaluate(axeSource);
  return await page.evaluate(async () => {
    const axe = (window as unknown as { axe: { run: (ctx: Document, o: object) => Promise<{ violations: { id: string; impact: string | null; help: string; nodes: { target: unknown[] }[] }[] }> } }).axe;
    const r = await axe.run(document, { runOnly: { type: "tag", values: ["wcag2a", "wcag2aa", "wcag21a", "wcag21aa"] }, resultTypes: ["violations"] });
    return r.violations.map((v) => ({ id: v.id, impact: v.impact, help: v.help, nodes: v.nodes.slice(0, 4).map((n) => n.target.map(String).join(" ")) }));
  });
}
