import { afterEach, describe, expect, it } from "vitest";
import { sql } from "kysely";
import { execFileSync } from "node:child_process";
import { mkdtempSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { loadFile } from "../../etl/index.js";
import { forgetSessions, signInThroughProvider } from "../helpers/browser.js";
import { browserJourney } from "../helpers/browser-journey.js";
import { DESKTOP, PHONE, photograph, sidewaysOverflow } from "../helpers/photograph.js";
import { axeViolations } from "../helpers/axe.js";
import { DEMO_PASSWORD } from "../../server/auth/demo-accounts.js";

// A technician at a four-cylinder machine in a cold shop, on a 390 px phone: finds the line by serial, types four
// open plugs and healthy compression over three attempts, loses the connection half-way, saves with none, and the
// sheet goes by itself, once, when the connection returns. The analyst then reads the readings on the repair
// record; the shop's export of the line arrives closed and merges into it; the warranty clerk claims it and the
// packet carries the readings.
//
// Expected interpretations are the trade's rules of thumb (common practice, no source): a good heater plug reads
// about 1 Ω or less, OL or tens of ohms to kΩ means open; about 400–500 psi is healthy compression.

const env = browserJourney({ demo: true });

const RO = "BENCH-7001";

// a failed step never leaves the browser offline for the next one
afterEach(async () => {
  await env.browser?.ctx.setOffline(false);
});

describe("the technician's bench sheet in Chromium at 390 px", () => {
  let serial = "";

  it("finds a line by serial after adding it, and interprets each value as it is typed", async () => {
    const { page } = env.browser;
    // a four-cylinder glow-plug machine of the technician's shop S1, delivered last: still under the engine cover
    const m = await sql<{ serial: string; hours: string | null }>`
      SELECT m.serial, (SELECT max(h.hours)::text FROM fact_hour_reading h WHERE h.machine_key = m.machine_key) AS hours
      FROM dim_machine m JOIN dim_shop s ON s.shop_key = m.home_shop_key
      WHERE s.shop_code = 'S1' AND m.engine_family = 'K26-4R' AND m.delivery_date IS NOT NULL
      ORDER BY m.delivery_date DESC, m.serial LIMIT 1`.execute(env.stack.tdb.db);
    serial = m.rows[0].serial;
    const hours = Math.round(Number(m.rows[0].hours ?? 0) + 400);

    await page.setViewportSize(PHONE);
    await signInThroughProvider(page, env.stack.url, "tech.s1s2", DEMO_PASSWORD);
    // the technician's home is the bench sheet
    await page.getByRole("heading", { level: 1, name: "Bench sheet" }).waitFor();
    expect(new URL(page.url()).pathname).toBe("/bench-sheet");
    await page.getByText(/kept on this device as you type it/).first().waitFor();

    await page.getByText("Start a new line (not exported by the shop yet)").click();
    const form = page.getByRole("form", { name: "New repair-order line" });
    await form.getByLabel("Shop").selectOption("S1");
    await form.getByLabel("Serial").fill(serial);
    await form.getByLabel("RO number").fill(RO);
    await form.getByLabel("Complaint").fill("Hard start on cold mornings, white smoke until warm");
    await form.getByRole("button", { name: "Add the line" }).click();
    await page.getByRole("heading", { name: new RegExp(`RO ${RO}, line 1`) }).waitFor();

    // back to the search, and the line found by its serial typed in small letters
    await page.getByRole("button", { name: "Another line" }).click();
    await page.getByLabel("Serial or RO number").fill(serial.toLowerCase());
    await page.getByRole("button", { name: "Find" }).click();
    await page.getByRole("button", { name: new RegExp(`RO ${RO}, line 1`) }).click();
    await page.getByRole("heading", { name: new RegExp(`RO ${RO}, line 1 · ${serial}`) }).waitFor();

    await page.getByLabel(/Ambient temperature/).fill("-18");
    await page.getByRole("group", { name: "Temperature unit" }).getByText("°C", { exact: true }).click();
    await page.getByRole("group", { name: "Engine" }).getByText("Cold", { exact: true }).click();
    await page.getByLabel("Hour meter (h)").fill(String(hours));
    await page.getByText(/Below about −7 °C \(20 °F\)/).waitFor();

    await page.getByLabel("Rail voltage (V)").fill("12.3");
    await page.getByRole("group", { name: "Wait-to-start lamp" }).getByText("Lit", { exact: true }).click();
    await expect.poll(() => page.locator("#bench-rail-reading").textContent()).toMatch(/good.*about 12 V: the preheat circuit is supplied/);

    // four open plugs: two over limit, one 40 kΩ, one 65 Ω
    await page.getByRole("button", { name: "Plug 1 reads OL (over limit)" }).click();
    await page.getByLabel("Plug 2 resistance").fill("40");
    await page.getByRole("group", { name: "Plug 2 meter unit" }).getByText("kΩ", { exact: true }).click();
    await page.getByRole("button", { name: "Plug 3 reads OL (over limit)" }).click();
    await page.getByLabel("Plug 4 resistance").fill("65");
    for (const n of [1, 2, 3, 4]) await expect.poll(() => page.locator(`#bench-plug-${n}-reading`).textContent()).toMatch(/^open/);
    await page.getByRole("group", { name: "Plug 1 bench test" }).getByText("No heat", { exact: true }).click();
    await page.locator("#bench-plug-1-bench-reading").getByText("no heat on the bench: plug failed").waitFor();
    // the cautions of the bench test sit beside it, with the deference to the service manual
    const plugs = page.getByRole("region", { name: /Heater plugs/ });
    await plugs.getByText(/Bench tests with a battery can spark/).waitFor();
    await expect(plugs.getByText(/maker's service manual/).count()).resolves.toBeGreaterThan(0);
    // the plugs' availability from the group's order history: the part the family's heater-plug lines use most
    const part = await sql<{ part_number: string }>`
      SELECT fl.part_number FROM fact_repair_line fl JOIN dim_machine m ON m.machine_key = fl.machine_key JOIN dim_component c ON c.component_key = fl.component_key
      WHERE c.component_code = 'ENG-CSA-HPLUG' AND m.engine_family = 'K26-4R' AND fl.part_number IS NOT NULL
      GROUP BY 1 ORDER BY count(*) DESC, 1 LIMIT 1`.execute(env.stack.tdb.db);
    const summary = page.getByRole("region", { name: "What the readings point to" });
    await summary.getByText(new RegExp(`Heater plugs ${part.rows[0].part_number}: typically \\d+ days? from order to receipt`)).waitFor();
  });

  it("keeps the sheet on the device with no connection and sends it once when the connection returns", async () => {
    const { page, ctx } = env.browser;
    const puts: string[] = [];
    page.on("request", (r) => {
      if (r.method() === "PUT" && r.url().includes("/api/bench-sheet/lines/")) puts.push(r.url());
    });
    const attempts: Record<number, number[]> = { 1: [455, 460, 450], 2: [448, 452, 450], 3: [458, 455, 462], 4: [445, 450, 447] };
    for (const cyl of [1, 2]) for (const [j, v] of attempts[cyl].entries()) await page.getByLabel(`Cylinder ${cyl}, attempt ${j + 1} (psi)`).fill(String(v));

    await ctx.setOffline(true);
    await page.getByText("No connection. Keep going: the sheet stays on this device.").waitFor();
    for (const cyl of [3, 4]) for (const [j, v] of attempts[cyl].entries()) await page.getByLabel(`Cylinder ${cyl}, attempt ${j + 1} (psi)`).fill(String(v));
    await expect.poll(() => page.locator("#bench-cyl-1-reading").textContent()).toMatch(/good.*mean 455/);

    const summary = page.getByRole("region", { name: "What the readings point to" });
    await summary.getByText("All four plugs open, compression healthy: the plugs, not the engine, explain the hard cold start.").waitFor();
    // the plugs take days to arrive (the group's order history), so the block heater is offered for the wait
    await summary.getByText(/While the plugs are on their way, a block heater .* clean the socket first/).waitFor();

    await page.getByRole("button", { name: "Save the sheet" }).click();
    await page.getByText(/No connection: the sheet is kept on this device and will be sent by itself/).waitFor();
    const kept = await page.evaluate(() => Object.keys(localStorage).filter((k) => k.startsWith("ironledger.benchDraft.")).map((k) => JSON.parse(localStorage.getItem(k)!)));
    expect(kept).toHaveLength(1);
    expect(kept[0].pending).not.toBeNull();
    expect(kept[0].cylinders[3].attempts).toEqual(["445", "450", "447"]);
    expect(puts).toEqual([]);

    await ctx.setOffline(false);
    await page.getByText(/^Sent\. \d+ readings stored or changed\./).waitFor({ timeout: 30_000 });
    // one online event, one save; nothing sent twice after the answer
    await page.waitForTimeout(1000);
    expect(puts).toHaveLength(1);
    const after = await page.evaluate(() => Object.keys(localStorage).filter((k) => k.startsWith("ironledger.benchDraft.")).map((k) => JSON.parse(localStorage.getItem(k)!).pending));
    expect(after).toEqual([null]);

    expect(await sidewaysOverflow(page)).toBeLessThanOrEqual(0);
    // touch targets of the sheet: at least 44 px high (WCAG 2.1 SC 2.5.5 target size)
    const small = await page.evaluate(() =>
      [...document.querySelectorAll("main button, main input:not(.sr-only), main select, main label:has(input[type=radio])")]
        .filter((e) => (e as HTMLElement).offsetParent !== null && e.getBoundingClientRect().height < 44)
        .map((e) => e.outerHTML.slice(0, 80)),
    );
    expect(small).toEqual([]);
    expect(await axeViolations(page)).toEqual([]);
    await page.setViewportSize(DESKTOP);
    await photograph(env.browser, "bench-sheet-01-sent", page.getByRole("button", { name: "Save the sheet" }));
  });

  it("shows the readings to the analyst on the repair record", async () => {
    const { page } = env.browser;
    await forgetSessions(page);
    await signInThroughProvider(page, env.stack.url, "analyst", DEMO_PASSWORD, "/repairs");
    await page.getByRole("textbox", { name: "Search", exact: true }).fill(RO);
    await page.getByRole("button", { name: "Search" }).click();
    await page.getByRole("link", { name: new RegExp(RO) }).first().click();
    const plugs = page.getByRole("table", { name: "Heater-plug resistance" });
    await plugs.waitFor();
    expect(await plugs.locator("tbody tr").count()).toBe(4);
    expect(await plugs.getByText("open", { exact: true }).count()).toBe(4);
    const compression = page.getByRole("table", { name: "Compression per cylinder" });
    expect(await compression.locator("tbody tr").count()).toBe(4);
    await env.browser.screenshot("bench-sheet-02-repair-record-desktop");
  });

  it("keeps the readings when the shop's export of the line arrives, closed, and merges it into the sheet's line", async () => {
    const db = env.stack.tdb.db;
    const line = await sql<{ opened: string; hours: string | null }>`
      SELECT opened_date::text AS opened, hour_meter::text AS hours FROM fact_repair_line WHERE ro_number = ${RO}`.execute(db);
    expect(line.rows).toHaveLength(1);
    const before = await sql<{ n: string }>`SELECT count(*) AS n FROM fact_measurement m JOIN fact_repair_line l USING (repair_line_key) WHERE l.ro_number = ${RO}`.execute(db);
    const dir = mkdtempSync(path.join(tmpdir(), "bench-export-"));
    const file = path.join(dir, "s1-jobs.csv");
    const { opened, hours } = line.rows[0];
    writeFileSync(
      file,
      "shop_code,ro_number,line_no,serial,opened_date,closed_date,hour_meter,complaint,cause,correction,component_code,pay_type\n" +
        `S1,${RO},1,${serial},${opened},${opened},${hours ?? ""},Hard start on cold mornings,All four heater plugs open circuit,Replaced the heater-plug set,ENG-CSA-HPLUG,warranty\n`,
    );
    const s = await loadFile(env.stack.tdb.pool, { path: file, profile: "generic-jobs", loadedBy: "test: the shop's export" });
    expect(s).toMatchObject({ rejected: 0, inserted: 0, updated: 1 });
    const after = await sql<{ n: string; lines: string }>`
      SELECT count(*) AS n, count(DISTINCT l.repair_line_key) AS lines FROM fact_measurement m JOIN fact_repair_line l USING (repair_line_key) WHERE l.ro_number = ${RO}`.execute(db);
    expect(after.rows[0]).toEqual({ n: before.rows[0].n, lines: "1" });
  });

  it("gives the clerk a claim whose packet carries the sheet's readings", async () => {
    const { page } = env.browser;
    await forgetSessions(page);
    await page.setViewportSize(DESKTOP);
    await signInThroughProvider(page, env.stack.url, "clerk", DEMO_PASSWORD, "/repairs");
    await page.getByRole("textbox", { name: "Search", exact: true }).fill(RO);
    await page.getByRole("button", { name: "Search" }).click();
    await page.getByRole("link", { name: new RegExp(RO) }).first().click();
    await page.getByRole("link", { name: "Open a warranty claim" }).click();
    const readings = page.getByTestId("measurements");
    await readings.waitFor();
    for (const n of [1, 2, 3, 4]) await readings.getByText(new RegExp(`^Plug ${n}:`)).waitFor();
    await readings.getByText(/Compression per cylinder/).waitFor();
    await env.browser.screenshot("bench-sheet-03-claim-evidence-desktop");
    await page.getByRole("button", { name: "Make the claim" }).click();
    await page.getByRole("heading", { level: 1, name: /^IL-\d{2}R\d{5}$/ }).waitFor();
    const id = new URL(page.url()).pathname.split("/").pop()!;
    const pdf = await page.request.get(`${env.stack.url}/api/claims/${id}/packet.pdf`);
    expect(pdf.status()).toBe(200);
    const dir = mkdtempSync(path.join(tmpdir(), "bench-packet-"));
    writeFileSync(path.join(dir, "packet.pdf"), await pdf.body());
    const text = execFileSync("pdftotext", ["-layout", path.join(dir, "packet.pdf"), "-"], { encoding: "utf8" });
    expect(text).toContain("Heater-plug resistance (cold, disconnected)");
    expect(text.match(/\bopen\b/gi)?.length ?? 0).toBeGreaterThanOrEqual(4);
    expect(text).toMatch(/Compression/);
    expect(text).toContain(serial);
  });
});
