import { describe, expect, it } from "vitest";
import { profileSchema, type Profile } from "../../../etl/profiles/profile-schema.js";
import { formatHoursMinutes, headerRow, KPA_PER_PSI, PSI_PER_BAR, renderRow } from "../../../etl/demo/profile-writer.js";

const jobsColumns = { shop_code: "Store", opened_date: "Opened", hour_meter: "Hrs", labor_hours: "Act", component_code: "Comp", pay_type: "Pay", ambient_temp: "Amb", back_ordered: "B/O" };
const measColumns = { ro_number: "RO", kind: "Test", position: "Cyl", value: "Reading", unit: "Unit" };

const profile = (over: Record<string, unknown>): Profile =>
  profileSchema.parse({ id: "t", description: "test", kind: "jobs", columns: jobsColumns, ...over });

/** The forward reading a loader does, written here independently of the writer. */
const read = {
  date(text: string, format: Profile["dateFormat"]): string {
    if (format === "iso") return text;
    const [a, b, y] = text.split("/");
    return format === "mdy" ? `${y}-${a}-${b}` : `${y}-${b}-${a}`;
  },
  number: (text: string, comma: boolean): number => Number(comma ? text.replace(",", ".") : text),
  hours(text: string, p: Profile): number {
    const hm = /^(\d+):(\d\d)$/.exec(text);
    return hm ? Number(hm[1]) + Number(hm[2]) / 60 : read.number(text, p.decimalComma);
  },
  celsius: (text: string, p: Profile): number => (p.units.temperature === "F" ? (read.number(text, p.decimalComma) - 32) / 1.8 : read.number(text, p.decimalComma)),
};

const job = { shop_code: "S1", opened_date: "2023-01-09", hour_meter: 1234.5, labor_hours: 1.75, component_code: "ENG-CSA-HPLUG", pay_type: "warranty", ambient_temp: -12.3, back_ordered: true };

describe("renderRow(profile, record)", () => {
  it.each([
    ["month-first °F", profile({ dateFormat: "mdy", units: { temperature: "F" } })],
    ["day-first °C, decimal comma, h:mm", profile({ dateFormat: "dmy", decimalComma: true, hoursFormat: "h:mm", delimiter: ";" })],
    ["ISO °C", profile({})],
  ])("round-trips dates, hours and temperature through a %s profile", (_, p) => {
    const cells = renderRow(p, job);
    expect(headerRow(p)).toEqual(Object.values(jobsColumns));
    const by = Object.fromEntries(Object.keys(jobsColumns).map((c, i) => [c, cells[i]!]));
    expect(read.date(by.opened_date!, p.dateFormat)).toBe(job.opened_date);
    expect(read.hours(by.hour_meter!, p)).toBeCloseTo(job.hour_meter, 1);
    expect(read.hours(by.labor_hours!, p)).toBeCloseTo(job.labor_hours, 1);
    expect(read.celsius(by.ambient_temp!, p)).toBeCloseTo(job.ambient_temp, 1);
    expect(by.back_ordered).toBe("Y");
  });

  it("writes °F from canonical °C", () => {
    const cells = renderRow(profile({ units: { temperature: "F" } }), { ambient_temp: -20 });
    expect(cells[Object.keys(jobsColumns).indexOf("ambient_temp")]).toBe("-4.0");
  });

  it("maps our codes to the shop's through the inverse of its code tables", () => {
    const p = profile({ codes: { component: { GP: "ENG-CSA-HPLUG" }, payType: { W: "warranty" } } });
    const cells = renderRow(p, job);
    expect(cells[Object.keys(jobsColumns).indexOf("component_code")]).toBe("GP");
    expect(cells[Object.keys(jobsColumns).indexOf("pay_type")]).toBe("W");
  });

  it("writes h:mm as hours and minutes", () => {
    expect(formatHoursMinutes(1234.5)).toBe("1234:30");
    expect(formatHoursMinutes(0.7)).toBe("0:42");
  });
});

describe("renderRow(measurement profile, reading, drift)", () => {
  const meas = (units: Record<string, string>, extra: Record<string, unknown> = {}): Profile =>
    profileSchema.parse({ id: "m", description: "test", kind: "measurements", columns: measColumns, units, ...extra });
  const reading = { ro_number: "1", kind: "compression", position: 2, value: 452.3, unit: "psi" };

  it("round-trips psi through kPa and bar profiles", () => {
    const [, , , kpa, kpaUnit] = renderRow(meas({ compression: "kPa" }), reading);
    expect(kpaUnit).toBe("kPa");
    expect(Number(kpa) / KPA_PER_PSI).toBeCloseTo(452.3, 0);
    const [, , , bar, barUnit] = renderRow(meas({ compression: "bar" }, { decimalComma: true }), reading);
    expect(barUnit).toBe("bar");
    expect(read.number(bar!, true) * PSI_PER_BAR).toBeCloseTo(452.3, 0);
  });

  it("writes a drifting technician's kPa without a unit where the profile sniffs", () => {
    const p = meas({ compression: "sniff" });
    expect(renderRow(p, reading).slice(3)).toEqual(["452.3", ""]);
    const [, , , value, unit] = renderRow(p, reading, { compressionUnit: "kPa" });
    expect(unit).toBe("");
    expect(Number(value)).toBeGreaterThan(1000);
    expect(Number(value) / KPA_PER_PSI).toBeCloseTo(452.3, 0);
  });

  it("writes resistance as the meter shows it where the profile says so", () => {
    const p = meas({ resistance: "suffixed" });
    const r = { ro_number: "1", kind: "plug_resistance", position: 1, unit: "ohm" };
    expect(renderRow(p, { ...r, value: 42_300 }).slice(3)).toEqual(["42k", ""]);
    expect(renderRow(p, { ...r, value: 1.04 }).slice(3)).toEqual(["1.04", ""]);
    expect(renderRow(p, { ...r, value: "OL" }).slice(3)).toEqual(["OL", ""]);
    expect(renderRow(meas({ resistance: "ohm" }), { ...r, value: "OL" }).slice(3)).toEqual(["OL", ""]);
  });
});
