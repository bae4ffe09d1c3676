/**
 * The machine registry: 4,000 machines at scale 1 (scale multiplies), shop and model mixes from the scenario
 * tables, builds uniform over 2020-03-01..2024-12-31, delivery = build + lognormal lag, the heater-plug lot
 * fitted at build (BT-2109 on every K26-4R built 2021-09-01..2021-12-31) and block heaters at delivery.
 * Days are the generator's own calendar; only the texts that carry a date (serials, lot codes) are written
 * moved by `clock.shiftDays` (anchor.ts), and `clock.lastDay` ends the history.
 */
import { UNSHIFTED, type DemoClock } from "./anchor.js";
import { addMonths, dayOf, monthOf, yearOf } from "./calendar.js";
import { stream } from "./prng.js";
import {
  backOrders, badLot, BUILD_END, BUILD_START, cylinders, delivery, goodPlugSupplier, injections, models, readings, shops, usage,
  type EngineFamily, type ModelCode,
} from "./scenario.js";

export interface Machine {
  index: number;
  serial: string;
  engineSerial: string;
  model: ModelCode;
  family: EngineFamily;
  cylinders: number;
  shop: number;
  buildDay: number;
  deliveryDay: number;
  deliveryHours: number;
  annualHours: number;
  telematics: boolean;
  telematicsDayOfMonth: number;
  plugLot: string | null;
  badLot: boolean;
  /** engine mean compression when new, psi: N(450, 20) */
  compressionNew: number;
  blockHeaterDay: number | null;
  /** the baseline retrofit planned for this machine (a winter visit), if any */
  retrofitDay: number | null;
  /** a meter replacement happens at the first PM visit on or after this day */
  meterReplacementFrom: number | null;
}

/** Largest-remainder apportionment of round(total × scale) items over the weights. */
export function apportion(weights: readonly number[], scale: number): number[] {
  const total = Math.round(weights.reduce((a, b) => a + b, 0) * scale);
  const sum = weights.reduce((a, b) => a + b, 0);
  const exact = weights.map((w) => (w / sum) * total);
  const counts = exact.map(Math.floor);
  const order = exact.map((e, i) => [e - Math.floor(e), i] as const).sort((a, b) => b[0] - a[0] || a[1] - b[1]);
  for (let k = 0; k < total - counts.reduce((a, b) => a + b, 0); k++) counts[order[k]![1]]!++;
  return counts;
}

export const yymm = (day: number): string => `${String(yearOf(day) % 100).padStart(2, "0")}${String(monthOf(day)).padStart(2, "0")}`;

/** A good heater-plug lot: the invented supplier's code for the month before `day`. */
export function goodPlugLot(day: number): string {
  return `${goodPlugSupplier.lotPrefix}-${yymm(addMonths(day, -1))}`;
}

export function buildFleet(seed: number, scale: number, clock: DemoClock = UNSHIFTED): Machine[] {
  const rng = stream(seed, "fleet");
  const modelCounts = apportion(models.map((m) => m.machines), scale);
  const modelList = models.flatMap((m, i) => Array.from({ length: modelCounts[i]! }, () => m));
  const shopCounts = apportion(shops.map((s) => s.machines), scale);
  const shopList = rng.shuffle(shops.flatMap((_, i) => Array.from({ length: shopCounts[i]! }, () => i)));
  rng.shuffle(modelList);
  const draft = modelList.map((m, i) => ({ model: m, shop: shopList[i]!, buildDay: rng.int(BUILD_START, BUILD_END) }));
  draft.sort((a, b) => a.buildDay - b.buildDay);
  const perModelSeq = new Map<string, number>();
  const fleet: Machine[] = draft.map((d, index) => {
    const r = stream(seed, "machine-static", index);
    const seq = (perModelSeq.get(d.model.code) ?? 0) + 1;
    perModelSeq.set(d.model.code, seq);
    const lag = Math.min(delivery.lagMaxDays, Math.max(delivery.lagMinDays, Math.round(r.lognormal(delivery.lagMedianDays, delivery.lagSigmaLog))));
    const deliveryDay = d.buildDay + lag;
    const family = d.model.family;
    const isBadLot = family === badLot.family && d.buildDay >= badLot.buildFrom && d.buildDay <= badLot.buildTo;
    const shop = shops[d.shop]!;
    const heaterAtDelivery = r.chance(shop.blockHeaterAtDelivery);
    return {
      index,
      serial: `${d.model.code}-${yymm(d.buildDay + clock.shiftDays)}${String(seq).padStart(5, "0")}`,
      engineSerial: `E${family.slice(1, 3)}${family.slice(-1)}${String(100000 + index * 7 + r.int(0, 6)).padStart(7, "0")}`,
      model: d.model.code,
      family,
      cylinders: cylinders[family],
      shop: d.shop,
      buildDay: d.buildDay,
      deliveryDay,
      deliveryHours: Math.round(r.uniform(delivery.hoursMin, delivery.hoursMax) * 10) / 10,
      annualHours: r.lognormal(usage.annualMedianHours, usage.annualSigmaLog),
      telematics: r.chance(readings.telematicsShare),
      telematicsDayOfMonth: r.int(1, 28),
      plugLot: family === "K38-4H" ? null : isBadLot ? badLot.lot : goodPlugLot(d.buildDay + clock.shiftDays),
      badLot: isBadLot,
      compressionNew: r.normal(450, 20),
      blockHeaterDay: heaterAtDelivery ? deliveryDay : null,
      retrofitDay: null,
      meterReplacementFrom: null,
    };
  });
  planRetrofits(seed, fleet, clock.lastDay);
  planMeterReplacements(seed, fleet, Math.max(1, Math.round(injections.meterReplacements * scale)), clock.lastDay);
  return fleet;
}

/** Baseline block-heater retrofits: Poisson(0.15 per 100 heater-less cold-shop machines) per shop and winter begun by `lastDay`. */
function planRetrofits(seed: number, fleet: Machine[], lastDay: number): void {
  const rng = stream(seed, "retrofits");
  for (let year = 2020; dayOf(`${year}-11-01`) <= lastDay; year++) {
    const from = dayOf(`${year}-11-01`);
    const to = dayOf(`${year + 1}-02-28`);
    shops.forEach((shop, s) => {
      if (!shop.cold) return;
      const eligible = fleet.filter((m) => m.shop === s && m.deliveryDay < from && m.blockHeaterDay === null && m.retrofitDay === null);
      const n = Math.min(eligible.length, rng.poisson(backOrders.retrofitRatePerWinter * eligible.length));
      for (const m of rng.shuffle(eligible).slice(0, n)) m.retrofitDay = rng.int(from, to);
    });
  }
}

function planMeterReplacements(seed: number, fleet: Machine[], count: number, lastDay: number): void {
  const rng = stream(seed, "meter-replacements");
  const latest = lastDay - 540;
  const candidates = fleet.filter((m) => m.deliveryDay < latest - 180);
  for (const m of rng.shuffle(candidates).slice(0, count)) m.meterReplacementFrom = rng.int(Math.max(m.deliveryDay + 180, dayOf("2021-01-01")), latest);
}

