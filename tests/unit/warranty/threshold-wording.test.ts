import { describe, expect, it } from "vitest";
import { generalSource, thresholdSourceWords } from "../../../shared/threshold-source.js";
import { interpretMeasurements, lineEligibility } from "../../../server/services/warranty/evidence.js";
import { judgedUnderWords, termsFor, termsSourceWords } from "../../../server/services/warranty/eligibility.js";
import type { MeasurementRow, RepairLineRow } from "../../../server/db/queries/claims.js";

// The words a claim packet uses for where a reading's threshold comes from. Ironledger's bands are tagged
// internally "common practice, no source" (a trade rule of thumb) or "from memory" (a recalled value); neither
// tag may reach the maker: both are general service practice. The bands checked here (400–500 psi target,
// 0.5–2 Ω healthy, above 10 Ω open, below 10.5 V check the battery) are DOMAIN.md §3's: common practice, no
// source, and from memory for the 10 Ω cut and the 10.5 V limit.

const m = (kind: string, position: number, attempt: number, value: number | null, raw = String(value), overRange = false): MeasurementRow => ({
  repair_line_key: "1", kind, position, attempt, value: value === null ? null : String(value), unit: "", over_range: overRange, raw_value: raw, raw_unit: null,
});

const internal = /common practice|no source|from memory/i;

describe("thresholdSourceWords(source)", () => {
  it("words both internal tags as general service practice", () => {
    expect(thresholdSourceWords(generalSource("common practice, no source"))).toBe("general service practice");
    expect(thresholdSourceWords(generalSource("from memory"))).toBe("general service practice");
  });

  it("names the shop that entered the maker's manual values", () => {
    expect(thresholdSourceWords({ kind: "maker-manual", enteredBy: "S3" })).toBe("the maker's service manual (entered by shop S3)");
    expect(thresholdSourceWords({ kind: "maker-manual", enteredBy: "  " })).toBe("the maker's service manual");
  });
});

describe("interpretMeasurements(readings, faults): each verdict's source", () => {
  it("carries the words, not the tag, on every compression, plug and rail verdict", () => {
    const i = interpretMeasurements(
      [
        m("compression", 1, 1, 450), m("compression", 2, 1, 320), m("compression", 3, 1, 440),
        // 12 Ω: above the 10 Ω cut, tagged "from memory" inside; 1.0 Ω healthy, tagged "common practice"
        m("plug_resistance", 1, 1, 12), m("plug_resistance", 2, 1, 1.0), m("plug_resistance", 3, 1, 1.1),
        m("rail_voltage", 0, 1, 10.0),
      ],
      [],
    );
    expect(i.plugs.map((p) => p.provenance)).toEqual(["from memory", "common practice, no source", "common practice, no source"]);
    expect(i.plugs.map((p) => p.source)).toEqual(["general service practice", "general service practice", "general service practice"]);
    expect(i.rail[0]).toMatchObject({ verdict: "watch", provenance: "from memory", source: "general service practice" });
    const c = i.compression!;
    // 320 psi sits in the 300–350 psi band, tagged from memory (the gap between the stated bands)
    expect(c.cylinders[1]).toMatchObject({ band: "300–350 psi: marginal, re-test or trend", source: "general service practice" });
    expect(c.lowest.source).toBe("general service practice");
    expect(c.spreadSource).toBe("general service practice");
    expect(c.pattern.source).toBe("general service practice");
    const words = [...c.cylinders.map((y) => y.source), c.lowest.source, c.spreadSource, c.pattern.source, ...i.plugs.map((p) => p.source), ...i.rail.map((r) => r.source)];
    for (const w of words) expect(w).not.toMatch(internal);
  });
});

describe("the policy a line is judged under", () => {
  const noRegistry = { warrantyBaseMonths: null, warrantyBaseHours: null, warrantyEngineMonths: null, warrantyEngineHours: null };
  const policy = { base: { months: 12, hours: 1000 }, engine: { months: 48, hours: 4000 } };

  it("takes the policy's terms where the machine registry has none, and the registry's where it has them", () => {
    expect(termsFor("engine", noRegistry, policy)).toEqual({ months: 48, hours: 4000, fromRegistry: false });
    expect(termsFor("engine", { ...noRegistry, warrantyEngineMonths: 24, warrantyEngineHours: 2000 }, policy)).toEqual({ months: 24, hours: 2000, fromRegistry: true });
  });

  it("is named in words: version and family, or the group default", () => {
    expect(judgedUnderWords({ version: 3, engineFamily: "K18-3G" })).toBe("judged under policy version 3 of K18-3G");
    expect(judgedUnderWords({ version: 1, engineFamily: "*" })).toBe("judged under policy version 1 of the group default policy");
    expect(termsSourceWords(false, { version: 2, engineFamily: "K26-4R" })).toBe("Terms from warranty policy version 2 of K26-4R (the machine registry has none).");
    expect(termsSourceWords(true, { version: 2, engineFamily: "K26-4R" })).toMatch(/^Terms from the machine registry/);
  });

  it("decides cover with the policy's months: delivered 2022-01-10, failed 2025-06-01 is inside 48 months, outside 36", () => {
    // 2022-01-10 + 48 months = 2026-01-10; + 36 months = 2025-01-10 (calendar months, ISO 8601 dates)
    const line = {
      system: "Engine", delivery_date: "2022-01-10", opened_date: "2025-06-01", hour_meter: "1500",
      warranty_base_months: null, warranty_base_hours: null, warranty_engine_months: null, warranty_engine_hours: null,
    } as unknown as RepairLineRow;
    const under48 = lineEligibility(line, { version: 2, engineFamily: "K18-3G", coverage: policy });
    expect(under48).toMatchObject({ verdict: "covered", coverEnds: "2026-01-10", termsSource: "Terms from warranty policy version 2 of K18-3G (the machine registry has none)." });
    const under36 = lineEligibility(line, { version: 1, engineFamily: "K18-3G", coverage: { ...policy, engine: { months: 36, hours: 3000 } } });
    expect(under36).toMatchObject({ verdict: "not_covered", coverEnds: "2025-01-10", endedBy: "months" });
  });
});
