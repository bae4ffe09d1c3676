import { afterAll, beforeAll, describe, expect, it } from "vitest";
import request from "supertest";
import { testApp, type TestApp } from "../helpers/test-app.js";
import { apiPaths } from "../../shared/api-paths.js";
import { addMonthsToMonth } from "../../shared/dates.js";
import { parse as parseCsv } from "csv-parse/sync";
import { GROUP_HIDDEN, roundTo } from "../../server/analytics/peer-groups.js";
import { funnelSchema, shopBenchmarksSchema, trendSchema, type PeerSpread, type PeerSummary, type ShopBenchmark, type ShopBenchmarks } from "../../shared/schemas/benchmarks.js";
import { fixCycleSchema, waitsSchema } from "../../shared/schemas/benchmark-details.js";

// A re-identification attempt on the demo world. A shop manager (S1) collects everything the benchmarks API
// answers about other shops for twelve consecutive months, and tries to follow one shop through them: the
// shop whose parts wait is the group's most unusual (found from the director's exact figures, the side
// knowledge an attacker might have). The attack is the one that worked when peers were per-shop rows: find the
// record whose parts wait matches the target's, read the target's other figures from it, and follow it from
// month to month. The claim checked, precisely:
//   1. the manager's answers hold no record of a single other shop in any month (no row, point, series or
//      letter), so the matching finds no record and there is nothing to link between months; run on per-shop
//      figures (the director's, rounded as peers used to be) the same matching finds the target in every month,
//      so the check can fail;
//   2. every range the manager is shown about other shops holds at least three of them by the director's exact
//      figures, the target included: on any figure and month, a guess of which shop in the target's range is the
//      target is right with probability at most 1/3, which is what picking among the range's shops at random
//      gives. That is no linkage better than chance.
// k ≥ 3 is the threshold rule of statistical disclosure control (Hundepool et al., Statistical Disclosure
// Control, Wiley 2012; the value 3 from memory).

let t: TestApp;
let director: string;
let manager: string;
/** a manager of six of the eight demo shops: the group total less their own is the sum of two shops */
let managerOfSix: string;
const SIX = ["S1", "S2", "S3", "S4", "S5", "S6"];

const OWN = "S1";
const FIRST = "2022-09";
const MONTHS = Array.from({ length: 12 }, (_, i) => addMonthsToMonth(FIRST, i));

beforeAll(async () => {
  t = await testApp({ demo: true });
  director = await t.signInAs({ roles: ["director"] });
  manager = await t.signInAs({ roles: ["manager"], shops: [OWN] });
  managerOfSix = await t.signInAs({ roles: ["manager"], shops: SIX });
}, 600_000);
afterAll(async () => {
  await t?.drop();
});

const get = async (url: string, cookie: string) => (await request(t.app).get(url).set("Cookie", cookie).expect(200)).body as unknown;

/** Each spread of the peer summary and how to read the same figure from an exact row. */
const FIGURES: Record<Exclude<keyof PeerSummary, "shops" | "rule">, (r: ShopBenchmark) => number | null> = {
  lines: (r) => r.lines,
  comeback: (r) => r.comeback.value,
  efficiency: (r) => r.efficiency.value,
  partsWaitMedian: (r) => r.partsWait.median,
  partsWaitP90: (r) => r.partsWait.p90,
  backOrder: (r) => r.backOrder.value,
  coldStartMeasured: (r) => r.coldStartMeasured.value,
  warrantyOnTime: (r) => r.warrantyOnTime.value,
};

/** Every object in an answer that stands for one shop the caller may not name. */
function peerRecords(json: unknown): unknown[] {
  const found: unknown[] = [];
  const walk = (x: unknown) => {
    if (Array.isArray(x)) return x.forEach(walk);
    if (x === null || typeof x !== "object") return;
    const o = x as Record<string, unknown>;
    if (o.peer === true || (typeof o.key === "string" && o.key.startsWith("peer-")) || (typeof o.label === "string" && /^Peer /.test(o.label))) found.push(o);
    Object.values(o).forEach(walk);
  };
  walk(json);
  return found;
}

/** The records whose parts wait (median and p90) reads as the target's, to 0.1 d as peers were once given. */
const matching = (records: unknown[], wait: { median: number | null; p90: number | null }) =>
  records.filter((r) => {
    const w = (r as { partsWait?: { median?: number | null; p90?: number | null } }).partsWait;
    const same = (a: number | null | undefined, b: number | null) => typeof a === "number" && b !== null && Math.round(a * 10) === Math.round(b * 10);
    return same(w?.median, wait.median) && same(w?.p90, wait.p90);
  });

const inRange = (v: number, g: { from: number | null; to: number | null }, step: number) => {
  const r = roundTo(v, step);
  return (g.from === null || r >= g.from) && (g.to === null || r < g.to);
};

describe("re-identifying another shop from a manager's benchmarks, over twelve months", () => {
  const exact = new Map<string, ShopBenchmarks>();
  const seen = new Map<string, { shops: ShopBenchmarks; funnel: unknown; trend: unknown; waits: unknown; fixCycle: unknown; wider: unknown }>();
  let target = "";

  beforeAll(async () => {
    for (const at of MONTHS) {
      const q = { period: "month", at };
      exact.set(at, shopBenchmarksSchema.parse(await get(apiPaths.benchmarks("shops", q), director)));
      seen.set(at, {
        shops: shopBenchmarksSchema.parse(await get(apiPaths.benchmarks("shops", q), manager)),
        funnel: await get(apiPaths.benchmarks("funnel", q), manager),
        trend: await get(apiPaths.benchmarks("trend", q), manager),
        waits: await get(apiPaths.benchmarks("waits", q), manager),
        fixCycle: await get(apiPaths.benchmarks("fix-cycle", q), manager),
        // another filter on the same month: a differencing attempt needs per-shop figures in both
        wider: await get(apiPaths.benchmarks("shops", { ...q, days: 60, hours: 200 }), manager),
      });
    }
    // the target: the other shop whose monthly parts-wait p90 is the highest most often
    const wins = new Map<string, number>();
    for (const body of exact.values()) {
      const top = body.shops.filter((s) => s.shopCode !== OWN && s.partsWait.p90 !== null).sort((a, b) => b.partsWait.p90! - a.partsWait.p90!)[0];
      if (top) wins.set(top.shopCode!, (wins.get(top.shopCode!) ?? 0) + 1);
    }
    target = [...wins].sort((a, b) => b[1] - a[1])[0]![0];
  }, 600_000);

  it("finds the target in most months from per-shop figures (the control: the attack works where there are per-shop records)", () => {
    let found = 0;
    for (const at of MONTHS) {
      const body = exact.get(at)!;
      const wait = body.shops.find((s) => s.shopCode === target)!.partsWait;
      const others = body.shops.filter((s) => s.shopCode !== OWN);
      const hits = matching(others, wait);
      if (hits.length === 1 && (hits[0] as ShopBenchmark).shopCode === target) found++;
    }
    // picking one of the seven other shops at random finds it in 12/7 ≈ 1.7 months on average
    expect(found).toBeGreaterThan(6);
  });

  it("finds no record of a single other shop in anything the manager is answered, so no month links to another", () => {
    for (const at of MONTHS) {
      const s = seen.get(at)!;
      const wait = exact.get(at)!.shops.find((x) => x.shopCode === target)!.partsWait;
      for (const [what, body] of Object.entries(s)) {
        const records = peerRecords(body);
        expect(records, `${at} ${what}`).toEqual([]);
        expect(matching(records, wait), `${at} ${what}`).toEqual([]);
      }
      expect(s.shops.shops.map((x) => x.shopCode)).toEqual([OWN]);
      // nor does any answer name another shop
      const json = JSON.stringify(s);
      const otherCodes = exact.get(at)!.shops.map((x) => x.shopCode!).filter((c) => c !== OWN);
      expect(otherCodes.filter((c) => new RegExp(`"${c}"|\\b${c}\\b`).test(json)), at).toEqual([]);
    }
  });

  it("shows the target, on every figure and in every month, only inside a range that fits at least three other shops", () => {
    let ranges = 0;
    for (const at of MONTHS) {
      const others = exact.get(at)!.shops.filter((s) => s.shopCode !== OWN);
      const peers = seen.get(at)!.shops.peers!;
      expect(peers.shops).toBe(others.length);
      for (const [name, read] of Object.entries(FIGURES)) {
        const spread = peers[name as keyof typeof FIGURES] as PeerSpread;
        const values = others.map((r) => [r.shopCode!, read(r)] as const).filter((x): x is readonly [string, number] => x[1] !== null);
        expect(spread.shops, `${at} ${name}`).toBe(values.length);
        for (const g of spread.groups) {
          const fits = values.filter(([, v]) => inRange(v, g, spread.step));
          expect(fits.length, `${at} ${name} ${JSON.stringify(g)}`).toBeGreaterThanOrEqual(3);
          expect(fits.length, `${at} ${name}`).toBe(g.shops);
          ranges++;
        }
        const own = values.find(([c]) => c === target);
        if (own && spread.groups.length > 1) {
          const mine = spread.groups.find((g) => inRange(own[1], g, spread.step))!;
          // the chance of naming the target from its range: one in the number of shops the range fits
          const candidates = values.filter(([, v]) => inRange(v, mine, spread.step)).length;
          expect(1 / candidates, `${at} ${name}`).toBeLessThanOrEqual(1 / 3);
        }
      }
    }
    // the months carry real spreads, not only "too few to show"
    expect(ranges).toBeGreaterThan(12 * 4);
  });

  it("never gives the target's unusual parts wait, exact or to the day, in the month it is the group's highest", () => {
    for (const at of MONTHS) {
      const others = exact.get(at)!.shops.filter((s) => s.shopCode !== OWN && s.partsWait.p90 !== null);
      const top = [...others].sort((a, b) => b.partsWait.p90! - a.partsWait.p90!)[0]!;
      const second = [...others].sort((a, b) => b.partsWait.p90! - a.partsWait.p90!)[1]!;
      if (Math.round(top.partsWait.p90!) === Math.round(second.partsWait.p90!)) continue;
      const shown = seen.get(at)!.shops.peers!.partsWaitP90.groups.flatMap((g) => [g.from, g.to]).filter((x): x is number => x !== null);
      expect(shown, at).not.toContain(Math.round(top.partsWait.p90!));
      expect(shown.every((x) => x <= Math.round(top.partsWait.p90!)), at).toBe(true);
    }
  });
});

// A total over every shop less the caller's own is the other shops' sum; with only two other shops that is
// close to reading one of them. The threshold rule of statistical disclosure control (Hundepool et al.,
// Statistical Disclosure Control, Wiley 2012; k = 3 from memory) withholds such a total: the manager of six of
// the eight shops gets no group figure from any benchmarks answer, where the director (and a manager of one
// shop, with seven others) gets it.
describe("the group figure for a manager with fewer than three other shops", () => {
  const q = { period: "rolling12" };
  const answers = async (cookie: string) => ({
    shops: shopBenchmarksSchema.parse(await get(apiPaths.benchmarks("shops", q), cookie)),
    funnel: funnelSchema.parse(await get(apiPaths.benchmarks("funnel", q), cookie)),
    trend: trendSchema.parse(await get(apiPaths.benchmarks("trend", q), cookie)),
    waits: waitsSchema.parse(await get(apiPaths.benchmarks("waits", q), cookie)),
    fixCycle: fixCycleSchema.parse(await get(apiPaths.benchmarks("fix-cycle", q), cookie)),
  });
  let dir: Awaited<ReturnType<typeof answers>>;
  let six: Awaited<ReturnType<typeof answers>>;
  let one: Awaited<ReturnType<typeof answers>>;
  beforeAll(async () => {
    dir = await answers(director);
    six = await answers(managerOfSix);
    one = await answers(manager);
  }, 600_000);

  it("gives the director every group figure (the control)", () => {
    expect(dir.shops.group).not.toBeNull();
    expect(dir.shops.groupHidden).toBeNull();
    expect(dir.funnel.groupRate).not.toBeNull();
    expect(dir.funnel.limits.length).toBeGreaterThan(0);
    expect(dir.trend.group.length).toBeGreaterThan(0);
    expect(dir.waits.group).not.toBeNull();
    expect(dir.waits.months.length).toBeGreaterThan(0);
    expect(dir.fixCycle.group).not.toBeNull();
    expect(dir.fixCycle.groupRate).not.toBeNull();
    expect(dir.fixCycle.limits.length).toBeGreaterThan(0);
  });

  it("still gives it to a manager of one shop, who has seven others", () => {
    expect(one.shops.group).toEqual(dir.shops.group);
    expect(one.funnel.groupRate).toBe(dir.funnel.groupRate);
    expect(one.fixCycle.groupRate).toBe(dir.fixCycle.groupRate);
  });

  it("gives the manager of six shops no group total, rate, limit or series, and says why in words", () => {
    expect(six.shops.shops.map((s) => s.shopCode)).toEqual(SIX);
    expect(six.shops.group).toBeNull();
    expect(six.funnel).toMatchObject({ groupRate: null, groupLines: null, limits: [], points: [] });
    expect(six.trend.group).toEqual([]);
    expect(six.trend.series.map((x) => x.key)).toEqual(SIX);
    expect(six.waits).toMatchObject({ group: null, months: [], stretches: [], baselineOver14: null });
    expect(six.fixCycle).toMatchObject({ group: null, groupRate: null, limits: [] });
    for (const body of [six.shops, six.funnel, six.trend, six.waits, six.fixCycle]) expect(body.groupHidden).toBe(GROUP_HIDDEN);
    expect(GROUP_HIDDEN).toBe("The group figure is hidden: fewer than three other shops to compare with.");
    // nothing is placed against the group rate either: the limits around it would give it away
    for (const s of six.shops.shops) {
      expect(s.comeback.funnel).toBe("not_rated");
      expect(s.comeback.aboveGroup).toBe(false);
      expect(s.technicians!.every((x) => !x.aboveGroup)).toBe(true);
    }
    for (const s of six.fixCycle.shops) expect([s.status, ...s.technicians.map((x) => x.status)].every((x) => x === "not_rated")).toBe(true);
    // the shop figures themselves are the director's
    for (const s of six.shops.shops) expect(s.lines).toBe(dir.shops.shops.find((x) => x.shopCode === s.shopCode)!.lines);
  });

  it("holds no number from which the two other shops' sums can be read, in any answer or CSV", async () => {
    const g = dir.shops.group!;
    const others = dir.shops.shops.filter((s) => !SIX.includes(s.shopCode!));
    expect(others).toHaveLength(2);
    const sum = (f: (s: ShopBenchmark) => number | null) => others.reduce((a, s) => a + (f(s) ?? 0), 0);
    const fixGroup = dir.fixCycle.group!;
    const fixOthers = dir.fixCycle.shops.filter((s) => !SIX.includes(s.key));
    const secret = [
      g.lines, g.comeback.successes!, g.comeback.value!, sum((s) => s.lines), sum((s) => s.comeback.successes),
      fixGroup.funnel.complaints, fixGroup.funnel.fixed, fixGroup.firstTimeFix.value!, dir.waits.group!.n,
      fixOthers.reduce((a, s) => a + s.funnel.complaints, 0), fixOthers.reduce((a, s) => a + s.funnel.fixed, 0),
    ];
    const numbers = new Set<number>();
    const walk = (x: unknown) => {
      if (typeof x === "number") numbers.add(x);
      else if (Array.isArray(x)) x.forEach(walk);
      else if (x && typeof x === "object") Object.values(x).forEach(walk);
    };
    walk(six);
    // the lines behind each KPI, as CSV, of a shop of the manager's: their own lines only
    for (const kpi of ["efficiency", "partsWait", "backOrder", "coldStart", "claims"]) {
      const res = await request(t.app).get(apiPaths.benchmarks("lines.csv", { ...q, kpi, shop: "S1" })).set("Cookie", managerOfSix).expect(200);
      const rows = parseCsv(res.text, { columns: true }) as Record<string, string>[];
      expect(new Set(rows.map((r) => r.shop)), kpi).toEqual(rows.length ? new Set(["S1"]) : new Set());
      for (const r of rows) for (const v of Object.values(r)) if (v !== "" && Number.isFinite(Number(v))) numbers.add(Number(v));
    }
    // small counts meet by chance (a technician's 23 lines); the check is on the figures that identify a sum
    const telling = secret.filter((x) => !Number.isInteger(x) || x >= 100);
    expect(telling.length).toBeGreaterThanOrEqual(8);
    expect(telling.filter((x) => numbers.has(x))).toEqual([]);
  });
});
