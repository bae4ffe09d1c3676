import { mkdtemp, readFile, rm } from "node:fs/promises";
import { tmpdir } from "node:os";
import path from "node:path";
import { parse } from "csv-parse/sync";
import { addYears, differenceInCalendarDays, format, parseISO, subDays } from "date-fns";
import iconv from "iconv-lite";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { CALENDAR_ANCHOR, demoTimeline, parseAnchor } from "../../../etl/demo/anchor.js";
import { isoOf } from "../../../etl/demo/calendar.js";
import { generateDemo, type Manifest } from "../../../etl/demo/generate.js";
import { resolveProfiles } from "../../../etl/demo/profiles.js";
import { badLot, models, shops, WINDOW_END } from "../../../etl/demo/scenario.js";
import { AR_PHI, cToF } from "../../../etl/demo/weather.js";
import type { Profile } from "../../../etl/profiles/profile-schema.js";
import { parseDate, parseDecimal } from "../../../etl/transform/values.js";
import { TEST_DEMO_ANCHOR } from "../../helpers/test-db.js";

const dirs: string[] = [];
async function generate(seed: number, scale: number, anchor?: string): Promise<{ dir: string; manifest: Manifest }> {
  const dir = await mkdtemp(path.join(tmpdir(), "ironledger-anchor-"));
  dirs.push(dir);
  return { dir, manifest: await generateDemo({ out: dir, seed, scale, anchor }) };
}
afterAll(async () => {
  await Promise.all(dirs.map((d) => rm(d, { recursive: true, force: true })));
});

/** An export read back through its profile: rows keyed by canonical column. */
async function readExport(dir: string, file: string, profile: Profile): Promise<Record<string, string>[]> {
  const bytes = await readFile(path.join(dir, file));
  const text = iconv.decode(bytes, profile.encoding === "windows-1252" ? "win1252" : "utf8");
  const rows = parse(text, { delimiter: profile.delimiter, columns: true, bom: true, skip_empty_lines: true }) as Record<string, string>[];
  return rows.map((r) => Object.fromEntries(Object.entries(profile.columns).map(([canonical, header]) => [canonical, r[header] ?? ""])));
}
const isoIn = (text: string, p: Profile): string | null => parseDate(text, p.dateFormat);
const plusDays = (iso: string, n: number): string => format(subDays(parseISO(iso), -n), "yyyy-MM-dd");

describe("demoTimeline(anchor)", () => {
  // Day counts are Gregorian calendar facts (2028 is a leap year, 2025–26 holds no 29 February), cross-checked
  // with date-fns (subDays, addYears, differenceInCalendarDays), a general reference library.
  it.each([
    ["2025-07-01", 0, 0, 0, "2020-07-01", "2025-06-30"],
    ["2026-12-03", 1, 365, 155, "2021-07-01", "2026-12-02"],
    ["2026-06-30", 0, 0, 364, "2020-07-01", "2026-06-29"],
    ["2026-07-01", 1, 365, 0, "2021-07-01", "2026-06-30"],
    ["2028-07-01", 3, 1096, 0, "2023-07-02", "2028-06-30"],
    ["2024-03-01", -2, -731, 244, "2018-07-01", "2024-02-29"],
  ] as const)("anchor %s moves the calendar %i year(s) (%i days), then pads %i days", (anchor, years, days, pad, from, to) => {
    const t = demoTimeline(anchor);
    expect({ years: t.years, shiftDays: t.shiftDays, padDays: t.padDays, from: t.from, to: t.to }).toEqual({ years, shiftDays: days, padDays: pad, from, to });
    const ownEnd = isoOf(WINDOW_END);
    expect(t.to).toBe(format(subDays(parseISO(anchor), 1), "yyyy-MM-dd"));
    expect(t.shiftDays).toBe(differenceInCalendarDays(addYears(parseISO(ownEnd), years), parseISO(ownEnd)));
    expect(t.padDays).toBeGreaterThanOrEqual(0);
    expect(t.padDays).toBeLessThanOrEqual(365);
    expect(isoOf(t.lastDay + t.shiftDays)).toBe(t.to);
  });

  it("rejects an anchor that is not a calendar date, in words", () => {
    expect(() => parseAnchor("2026-02-30")).toThrow(/not a calendar date written YYYY-MM-DD/);
    expect(() => parseAnchor("03/12/2026")).toThrow(/not a calendar date/);
    expect(() => parseAnchor("1999-12-31")).toThrow(/outside 2000-01-01 to 2099-12-31/);
    expect(parseAnchor(" 2026-01-15 ")).toBe("2026-01-15");
  });

  it("keeps the tests' fixed anchor on the generator's own calendar", () => {
    expect(TEST_DEMO_ANCHOR).toBe(CALENDAR_ANCHOR);
    expect(demoTimeline(TEST_DEMO_ANCHOR)).toMatchObject({ shiftDays: 0, padDays: 0 });
  });
});

describe("generateDemo({ out, seed, scale, anchor })", () => {
  const profiles = resolveProfiles();
  const ANCHOR = "2026-12-03";
  const LAST = "2026-12-02";
  let run: { dir: string; manifest: Manifest };
  beforeAll(async () => {
    run = await generate(1, 0.1, ANCHOR);
  }, 60_000);

  it("records the anchor and the moved window in the manifest", () => {
    expect(run.manifest.anchor).toBe(ANCHOR);
    expect(run.manifest.shift).toEqual({ years: 1, days: 365, padDays: 155 });
    expect(run.manifest.window).toEqual({ from: "2021-07-01", to: LAST });
  });

  it("makes the newest repair order of the group fall on the day before the anchor", async () => {
    let newest = "";
    let after = 0;
    for (const s of shops) {
      const p = profiles.shops[s.code]!.jobs;
      for (const r of await readExport(run.dir, `${s.code}-jobs.csv`, p)) {
        const d = isoIn(r.opened_date!, p)!;
        // injected future dates (a year typed wrong) are the only ones past the history's end
        if (d > LAST) {
          after++;
          expect(Number(d.slice(0, 4))).toBeGreaterThan(2026);
        } else if (d > newest) newest = d;
      }
    }
    expect(newest).toBe(LAST);
    expect(after).toBeLessThanOrEqual(run.manifest.injected.futureDate);
  });

  it("writes work still running on the history's last day as open, so no close or receipt falls after it", async () => {
    let typed = 0;
    const open = new Set<string>();
    for (const s of shops) {
      const p = profiles.shops[s.code]!.jobs;
      for (const r of await readExport(run.dir, `${s.code}-jobs.csv`, p)) {
        const opened = isoIn(r.opened_date!, p)!;
        const closed = r.closed_date === "" ? null : isoIn(r.closed_date!, p)!;
        const received = r.part_received_date === "" ? null : isoIn(r.part_received_date!, p)!;
        // a year typed wrong (an injected future date) is the only date past the history's end
        for (const d of [opened, closed]) {
          if (d !== null && d > LAST) {
            typed++;
            expect(Number(d.slice(0, 4)), `${s.code} RO ${r.ro_number}`).toBeGreaterThan(2026);
          }
        }
        if (received !== null) expect(received <= LAST, `${s.code} RO ${r.ro_number} part received ${received}`).toBe(true);
        // a part still awaited keeps its line open: nothing closes before its part arrives
        if (r.part_ordered_date !== "" && received === null) expect(closed, `${s.code} RO ${r.ro_number}`).toBeNull();
        if (closed === null) open.add(`${s.code} ${r.ro_number}`);
      }
    }
    expect(typed).toBeGreaterThan(0);
    expect(typed).toBeLessThanOrEqual(run.manifest.injected.futureDate);
    expect(open.size).toBeGreaterThan(0);
  });

  it("ends every shop's weather on the day before the anchor, with its coldest months still in Dec–Feb", async () => {
    for (const s of shops) {
      const p = profiles.shops[s.code]!.weather;
      const rows = await readExport(run.dir, `${s.code}-weather.csv`, p);
      const dates = rows.map((r) => isoIn(r.date!, p)!);
      expect(dates.at(-1)).toBe(LAST);
      const byMonth = Array.from({ length: 12 }, () => [] as number[]);
      const djf: number[] = [];
      rows.forEach((r, i) => {
        const raw = parseDecimal(r.tmin!, p.decimalComma)!;
        const f = p.units.temperature === "C" ? cToF(raw) : raw;
        const month = Number(dates[i]!.slice(5, 7));
        byMonth[month - 1]!.push(f);
        if (month === 12 || month <= 2) djf.push(f);
      });
      const mean = (xs: number[]): number => xs.reduce((a, b) => a + b, 0) / xs.length;
      const means = byMonth.map(mean);
      const coldest = means.indexOf(Math.min(...means)) + 1;
      const warmest = means.indexOf(Math.max(...means)) + 1;
      expect([12, 1, 2], `${s.code} coldest month ${coldest}`).toContain(coldest);
      expect([6, 7, 8], `${s.code} warmest month ${warmest}`).toContain(warmest);
      // the scenario table's DJF mean Tmin, within the sampling error of an AR(1) seasonal mean (as weather.test.ts)
      const tolerance = 4 * s.sigmaF * Math.sqrt((1 + AR_PHI) / (1 - AR_PHI) / djf.length) + 1;
      expect(Math.abs(mean(djf) - s.djfMeanTminF), s.code).toBeLessThan(tolerance);
    }
  });

  it("fits lot BT-2109 to every K26-4R built in the scenario's build window moved by whole years", async () => {
    const p = profiles.machines;
    const k26 = new Set(models.filter((m) => m.family === badLot.family).map((m) => m.code));
    const from = format(addYears(parseISO(isoOf(badLot.buildFrom)), run.manifest.shift.years), "yyyy-MM-dd");
    const to = format(addYears(parseISO(isoOf(badLot.buildTo)), run.manifest.shift.years), "yyyy-MM-dd");
    expect([from, to]).toEqual(["2022-09-01", "2022-12-31"]);
    let lot = 0;
    for (const r of await readExport(run.dir, "machines.csv", p)) {
      const built = isoIn(r.build_date!, p)!;
      const family26 = k26.has(r.serial!.split("-")[0] as (typeof models)[number]["code"]);
      const inWindow = built >= from && built <= to;
      expect(r.heater_plug_lot === badLot.lot, `${r.serial} built ${built}`).toBe(family26 && inWindow);
      if (r.heater_plug_lot === badLot.lot) lot++;
      // the serial carries the build month as written
      expect(r.serial!.split("-")[1]!.slice(0, 4)).toBe(`${built.slice(2, 4)}${built.slice(5, 7)}`);
    }
    expect(lot).toBeGreaterThan(0);
  });

  it("writes byte-identical files for the same seed and anchor, and moves them for another anchor", async () => {
    const again = await generate(1, 0.1, ANCHOR);
    expect(await readFile(path.join(again.dir, "manifest.json"), "utf8")).toBe(await readFile(path.join(run.dir, "manifest.json"), "utf8"));
    const other = await generate(1, 0.1, plusDays(ANCHOR, 1));
    expect(other.manifest.window.to).toBe(plusDays(LAST, 1));
    expect(other.manifest.files.find((f) => f.file === "S1-jobs.csv")!.sha256).not.toBe(run.manifest.files.find((f) => f.file === "S1-jobs.csv")!.sha256);
  }, 60_000);

  it("writes, at the anchor 2025-07-01, the generator's own calendar unmoved", async () => {
    // sha256 of every export at seed 1, scale 0.1, copied from the manifest.json of
    // `npm run demo:generate -- --out DIR --seed 1 --scale 0.1 --anchor 2025-07-01`. First pinned from the generator
    // as it was before the anchor existed (its window fixed at 2020-07-01..2025-06-30); pinned again once lines
    // still running on the history's last day were written open. That change moved three job files only
    // (S3, S5, S8), one line each: a close date after 2025-06-30, and a part received after it, became blank.
    // Pinned a third time when the model lines took the invented three-letter codes of the scenario page (WRN,
    // DLV, SKL, TMB, TRN, GRS) in place of letter-plus-size codes: serials embed the code, and the generator orders
    // each day's lines by serial and numbers repair orders in that order, so the registry, telematics and job files
    // changed, and the measurement files whose repair-order numbers moved; the weather files and the S3 and S8
    // measurements kept their bytes. The simulation is unchanged. A deliberate change to
    // the generator's output or to an export profile (etl/profiles) changes them: pin them again from a run
    // at anchor 2025-07-01.
    const pinned: Record<string, string> = {
      "machines.csv": "46049ef94e9769484d0a6529309a3a0cfda39f50c656015a98862921bc481236",
      "telematics-hours.csv": "c4435d9ae3c008f0f0a8dc908bd3eb39f8727fe865d2d8670e889c2465a517ff",
      "S1-weather.csv": "e26e34376dbd0b582da717bc159a0dd89737a729a2fc4258a8f33a570347bd18",
      "S1-jobs.csv": "0ff45551a58dee03bb9589c8f5c5384bfd7e868825731c526672c6b27dbc86e3",
      "S1-measurements.csv": "3edebf09730993f0731c34001343b5a4359ad8e672e1cc86c952dea3a6086c2a",
      "S2-weather.csv": "80b12ead794628da9ca37dc13115afed82ab7c1e6f92e57d22e06cccefde2c92",
      "S2-jobs.csv": "b32e0e62d2d306a54bfb5b2fd80b15bbf60a99b1920d0b72c7df95a1dafde2fe",
      "S2-measurements.csv": "be7d11f175db8ab8af24410607f07a0c28a0625a6df71eaf35c2cac362a0296a",
      "S3-weather.csv": "923db290a7ff9cc281ec67d0aedb4157b4d51dcce775c2b5e995e13615d2ec96",
      "S3-jobs.csv": "47f5577a5565f8b15749ab502f3f53a099e8634f5ec65701bcfae8e376d4c145",
      "S3-measurements.csv": "eb02b6b92b895484fb5a612e251c95d177995bddedcb74a2d14a26a24b2dc8d3",
      "S4-weather.csv": "88357fffb6989a02bd5a5dc57d57821754baf9957808c4d82c0aab3fae46bb46",
      "S4-jobs.csv": "ab8ca12ff9afba7457f6363c57159654beae93c70679b511f38b542901904f03",
      "S4-measurements.csv": "649328c8f782c87779b98d37285188c49b2aa4b7a5208ce674dc581e7d778cd9",
      "S5-weather.csv": "e79d67aeb47658285d7909d25625e3a0b990ffc17a888983466009d1194dab06",
      "S5-jobs.csv": "5964bd9050bcd6e74e09336234025efb0ab9cecd271cea3765d3f0a076ec4c78",
      "S5-measurements.csv": "9f00dc98b4911100f2d94684a65cb17e35766fe98717edef0292ed589637fedf",
      "S6-weather.csv": "cf7135b34b1648ac13f29b29f937fde597a9aa0ca0a736f026b14c28c7d76988",
      "S6-jobs.csv": "e8f8f4bdcd42f1126c2660ee0ea9be69713a0ad439dc6e5077f68b6db5d1dd22",
      "S6-measurements.csv": "84710e514450221c84dc80dcd99e95dfdb0acbfb5871c568312457c339997c55",
      "S7-weather.csv": "a4cea8eb027ff8a4d5a20c5fc8a1dd7b6e894cd7b59c9a7d9ffd7791b09614e2",
      "S7-jobs.csv": "264b6a9e3d8b91d49069c7aa71ff678ed3b090322a725588a8b0f6de843fdff8",
      "S7-measurements.csv": "cd7ff979afd2e4a3122180a1bd35596491f41600fa28e247fe6f904409c7c89a",
      "S8-weather.csv": "cb76008182b7245bddae62ec2e71654ced926db0e7e90f2c8b488917e127d9b9",
      "S8-jobs.csv": "c092c21993c49ae13354f1b2cf68ef8d0c57543dfb7144b4e94373133de66942",
      "S8-measurements.csv": "194bed6d68ca62c1ea3467da572fb0a29076a37ea6a2721c410e73d434f97618",
    };
    const { manifest } = await generate(1, 0.1, "2025-07-01");
    expect(Object.fromEntries(manifest.files.map((f) => [f.file, f.sha256]))).toEqual(pinned);
    expect(manifest.window).toEqual({ from: "2020-07-01", to: "2025-06-30" });
  }, 60_000);
});
