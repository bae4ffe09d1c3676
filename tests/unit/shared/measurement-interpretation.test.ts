import { describe, expect, it } from "vitest";
import { classifyPlug, classifyRailVoltage, compressionBand, safetyCautionsIn, summariseCompression } from "../../../shared/measurement-interpretation.js";

// Thresholds are trade rules of thumb ("common practice, no source") or values from memory, as labelled
// in the module; these tests pin the arithmetic and the band edges, not a published value.
describe("summariseCompression(readings)", () => {
  it("averages attempts per cylinder and rates the engine by its lowest cylinder", () => {
    // cylinder means: (450+460+455)/3 = 455, (440+450+445)/3 = 445, (300+310+305)/3 = 305, (450+450+450)/3 = 450
    const s = summariseCompression([
      { position: 1, attempts: [450, 460, 455] },
      { position: 2, attempts: [440, 450, 445] },
      { position: 3, attempts: [300, 310, 305] },
      { position: 4, attempts: [450, 450, 450] },
    ])!;
    expect(s.cylinders.map((c) => c.mean)).toEqual([455, 445, 305, 450]);
    expect(s.average).toBeCloseTo((455 + 445 + 305 + 450) / 4, 10);
    expect(s.lowest).toMatchObject({ position: 3, mean: 305, verdict: "watch" });
    // spread = (455 − 305) / 455 = 0.32967 → above 25 %: fault
    expect(s.spread).toBeCloseTo(150 / 455, 10);
    expect(s.spreadVerdict).toBe("fault");
    expect(s.pattern.kind).toBe("one-low");
  });

  it("reads two adjacent low cylinders as a head-gasket pattern and all below 300 psi as rings", () => {
    const gasket = summariseCompression([
      { position: 1, attempts: [450] }, { position: 2, attempts: [350] }, { position: 3, attempts: [355] }, { position: 4, attempts: [448] },
    ])!;
    expect(gasket.pattern.kind).toBe("two-adjacent-low");
    const rings = summariseCompression([{ position: 1, attempts: [280] }, { position: 2, attempts: [285] }, { position: 3, attempts: [290] }])!;
    expect(rings.pattern.kind).toBe("all-low");
    expect(rings.spreadVerdict).toBe("good"); // (290 − 280) / 290 = 3.4 %
  });

  it("returns null without readings", () => {
    expect(summariseCompression([])).toBeNull();
  });
});

describe("compressionBand(psi)", () => {
  it("places the band edges as labelled", () => {
    expect(compressionBand(400).verdict).toBe("good");
    expect(compressionBand(399.9).label).toMatch(/350–400/);
    expect(compressionBand(349.9).verdict).toBe("watch");
    expect(compressionBand(299.9).verdict).toBe("fault");
    expect(compressionBand(289.9).label).toMatch(/below 290/);
  });
});

describe("classifyPlug(ohms, siblings)", () => {
  it("calls 0.5–2 Ω healthy, OL and kΩ open, under 0.5 Ω a possible short", () => {
    expect(classifyPlug(1.0).verdict).toBe("healthy");
    expect(classifyPlug(null).verdict).toBe("open");
    expect(classifyPlug(42_000).verdict).toBe("open");
    expect(classifyPlug(0.2).verdict).toBe("short");
    expect(classifyPlug(5).verdict).toBe("high");
  });

  it("flags a plug well above its siblings", () => {
    expect(classifyPlug(1.9, [1.0, 1.1, 0.9]).verdict).toBe("suspect");
    expect(classifyPlug(1.1, [1.0, 1.1, 0.9]).verdict).toBe("healthy");
  });
});

describe("classifyRailVoltage(volts, hasFaultCode)", () => {
  it("separates a supplied rail, a weak supply and a dead one", () => {
    expect(classifyRailVoltage(12.2, false).verdict).toBe("good");
    expect(classifyRailVoltage(10.2, false).verdict).toBe("watch");
    expect(classifyRailVoltage(0.1, true).label).toMatch(/fuse or relay/);
  });
});

describe("safetyCautionsIn(unit)", () => {
  it("states the plug tip's temperature in the reader's unit: 1,400–1,500 °F is 760–816 °C (NIST SP 811: t/°C = (t/°F − 32)/1.8), shown as about 760–815 °C", () => {
    expect(((1400 - 32) / 1.8).toFixed(0)).toBe("760");
    expect(((1500 - 32) / 1.8).toFixed(1)).toBe("815.6");
    expect(safetyCautionsIn("F")[0]).toContain("about 1,400–1,500 °F");
    expect(safetyCautionsIn("C")[0]).toContain("about 760–815 °C");
    // the other cautions are the same in both units and name no temperature
    expect(safetyCautionsIn("C").slice(1)).toEqual(safetyCautionsIn("F").slice(1));
    for (const c of safetyCautionsIn("C").slice(1)) expect(c).not.toMatch(/°[CF]/);
    expect(safetyCautionsIn("C").at(-1)).toMatch(/maker's service manual/);
  });
});
