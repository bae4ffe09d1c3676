import { describe, expect, it } from "vitest";
import {
  comebackPair,
  countComebacks,
  hoursAfterClose,
  pairComebacks,
  windowElapsed,
  type RepairLineRecord,
} from "../../../server/analytics/comebacks.js";

// The rule is DOMAIN.md §3 "Comeback": same machine and system, next line begins within 30 days and 100 engine
// hours of the original's close; PM, return-for-parts, installs and customer damage excluded; attributed to the
// original's shop and technician. Common practice, no source. The examples below are computed by hand.

let seq = 0;
const line = (o: Partial<RepairLineRecord> & Pick<RepairLineRecord, "opened">): RepairLineRecord => ({
  id: `L${++seq}`,
  shop: "A",
  technician: "A-T1",
  machine: "M1",
  system: "Engine",
  lineType: "failure",
  customerDamage: false,
  closed: o.opened,
  hourMeter: null,
  ...o,
});
const settings = { days: 30, hours: 100 };

describe("hoursAfterClose(original, followUp)", () => {
  it("interpolates the meter at close by date between the two readings", () => {
    // original opened 2024-01-01 at 1,000 h, closed 2024-01-11; follow-up opened 2024-01-21 at 1,040 h.
    // 40 h over 20 days from opening to opening; close to follow-up is 10 of those days: 40 × 10/20 = 20 h.
    const o = line({ opened: "2024-01-01", closed: "2024-01-11", hourMeter: 1000 });
    const f = line({ opened: "2024-01-21", hourMeter: 1040 });
    expect(hoursAfterClose(o, f)).toBeCloseTo(20, 12);
  });

  it("is null when a reading is missing or the meter ran backwards, so days alone decide", () => {
    const o = line({ opened: "2024-01-01", hourMeter: 1000 });
    expect(hoursAfterClose(o, line({ opened: "2024-01-05", hourMeter: null }))).toBeNull();
    expect(hoursAfterClose(o, line({ opened: "2024-01-05", hourMeter: 3 }))).toBeNull();
    expect(comebackPair(o, line({ opened: "2024-01-05", hourMeter: 3 }), settings)?.daysAfterClose).toBe(4);
  });
});

describe("comebackPair(original, followUp, settings)", () => {
  const o = line({ opened: "2024-03-01", closed: "2024-03-02", hourMeter: 500 });

  it("pairs a line 30 days after close and refuses one 31 days after (both limits inclusive)", () => {
    // 2024-03-02 + 30 days = 2024-04-01; + 31 = 2024-04-02
    expect(comebackPair(o, line({ opened: "2024-04-01" }), settings)?.daysAfterClose).toBe(30);
    expect(comebackPair(o, line({ opened: "2024-04-02" }), settings)).toBeNull();
  });

  it("refuses a line more than 100 engine hours after close even within 30 days", () => {
    // opened 2024-03-01 at 500 h, closed 2024-03-02; follow-up 2024-03-11 at 612 h:
    // 112 h × (9 days close→open) / (10 days open→open) = 100.8 h > 100
    expect(comebackPair(o, line({ opened: "2024-03-11", hourMeter: 612 }), settings)).toBeNull();
    // at 610 h: 110 × 9/10 = 99 h ≤ 100
    expect(comebackPair(o, line({ opened: "2024-03-11", hourMeter: 610 }), settings)?.hoursAfterClose).toBeCloseTo(99, 12);
  });

  it("needs the same machine and the same system", () => {
    expect(comebackPair(o, line({ opened: "2024-03-05", machine: "M2" }), settings)).toBeNull();
    expect(comebackPair(o, line({ opened: "2024-03-05", system: "Hydraulics" }), settings)).toBeNull();
  });

  it("excludes PM lines, planned return-for-parts visits, installs and customer damage", () => {
    for (const lineType of ["pm", "return_for_parts", "install"] as const) {
      expect(comebackPair(o, line({ opened: "2024-03-05", lineType }), settings)).toBeNull();
    }
    expect(comebackPair(o, line({ opened: "2024-03-05", customerDamage: true }), settings)).toBeNull();
    expect(comebackPair(line({ opened: "2024-03-01", customerDamage: true }), line({ opened: "2024-03-05" }), settings)).toBeNull();
  });

  it("does not pair a line that opened before the original closed", () => {
    const long = line({ opened: "2024-03-01", closed: "2024-03-20" });
    expect(comebackPair(long, line({ opened: "2024-03-10" }), settings)).toBeNull();
  });

  it("widens with the settings (7–90 days)", () => {
    expect(comebackPair(o, line({ opened: "2024-04-20" }), { days: 60, hours: 100 })?.daysAfterClose).toBe(49);
    expect(() => pairComebacks([], { days: 5, hours: 100 })).toThrow(RangeError);
    expect(() => pairComebacks([], { days: 30, hours: 250 })).toThrow(RangeError);
  });
});

describe("pairComebacks(lines) and countComebacks(originals, asOf)", () => {
  // Shop A, two technicians, data through 2024-06-30.
  //  M1 Engine: a1 closed 01-10 (T1) → a2 opened 01-20 (10 days: comeback of a1) → a3 opened 01-25 (15 days after
  //             a1's close, 4 after a2's: a third visit, a repeat repair; a1 still counts once)
  //  M2 Engine: b1 closed 02-01 (T2), b2 opened 04-01: 60 days later, not a comeback → b2 is an original
  //  M3 Hydraulics: c1 closed 03-01 (T2) → c2 opened 03-05 is customer damage: ignored
  //  M4 Engine: d1 closed 06-15 (T1) → window open until 07-15 > 06-30: not yet counted
  //  M1 Service: a PM line: ignored
  const a1 = line({ opened: "2024-01-08", closed: "2024-01-10", machine: "M1", technician: "A-T1" });
  const a2 = line({ opened: "2024-01-20", closed: "2024-01-21", machine: "M1", technician: "A-T2" });
  const a3 = line({ opened: "2024-01-25", closed: "2024-01-25", machine: "M1", technician: "A-T2" });
  const b1 = line({ opened: "2024-01-30", closed: "2024-02-01", machine: "M2", technician: "A-T2" });
  const b2 = line({ opened: "2024-04-01", closed: "2024-04-02", machine: "M2", technician: "A-T1" });
  const c1 = line({ opened: "2024-03-01", closed: "2024-03-01", machine: "M3", system: "Hydraulics", technician: "A-T2" });
  const c2 = line({ opened: "2024-03-05", closed: "2024-03-05", machine: "M3", system: "Hydraulics", customerDamage: true });
  const d1 = line({ opened: "2024-06-14", closed: "2024-06-15", machine: "M4", technician: "A-T1" });
  const pm = line({ opened: "2024-01-15", machine: "M1", system: "Service", lineType: "pm" });
  const originals = pairComebacks([d1, pm, a3, c2, b2, a1, c1, a2, b1], settings);
  const byId = new Map(originals.map((o) => [o.line.id, o]));

  it("keeps only originals: a2 and a3 are comebacks, c2 and the PM line are not repairs", () => {
    expect([...byId.keys()].sort()).toEqual([a1.id, b1.id, b2.id, c1.id, d1.id].sort());
    expect(byId.get(a1.id)!.comebacks.map((p) => [p.followUp.id, p.daysAfterClose])).toEqual([[a2.id, 10], [a3.id, 15]]);
    expect(byId.get(b1.id)!.comebacks).toEqual([]);
  });

  it("counts lines with a comeback over qualifying lines whose window has elapsed: 1 ÷ 4", () => {
    // qualifying: a1, b1, b2, c1 (d1 closed 06-15, 06-15 + 30 = 07-15 > 06-30); with a comeback: a1 → 1/4 = 25 %
    expect(windowElapsed(d1, "2024-06-30", settings)).toBe(false);
    expect(windowElapsed(b2, "2024-06-30", settings)).toBe(true);
    expect(countComebacks(originals, "2024-06-30", settings)).toEqual({ lines: 4, withComeback: 1 });
  });

  it("attributes the comeback to the original's technician, not the one who did the return visit", () => {
    // T1's qualifying originals: a1 (comeback), b2 → 1/2; T2's: b1, c1 → 0/2
    const t1 = originals.filter((o) => o.line.technician === "A-T1");
    const t2 = originals.filter((o) => o.line.technician === "A-T2");
    expect(countComebacks(t1, "2024-06-30", settings)).toEqual({ lines: 2, withComeback: 1 });
    expect(countComebacks(t2, "2024-06-30", settings)).toEqual({ lines: 2, withComeback: 0 });
  });
});
