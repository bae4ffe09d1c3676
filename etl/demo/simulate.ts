/**
 * One machine's life, day by day from delivery to the end of the window: engine hours accrue (winter
 * reductions), every component runs its Weibull process in engine hours since install and is renewed when
 * replaced, cold factors multiply the hazard per day (exact sampling by inverting the cumulative hazard
 * against a unit exponential), cold-start aids fail intrinsically then manifest with q(Tmin), PM visits fall
 * every 250 ± 30 h, comebacks are spawned per technician, and parts may be back-ordered.
 * Nothing here pastes an outcome: every failure is sampled from its process. Days are the generator's own
 * calendar up to `clock.lastDay`; lot codes carry the written month (moved by `clock.shiftDays`, anchor.ts).
 */
import { UNSHIFTED, type DemoClock } from "./anchor.js";
import { addMonths, isDjf } from "./calendar.js";
import { goodPlugLot, yymm, type Machine } from "./fleet.js";
import { stream, type Rng } from "./prng.js";
import {
  backOrders, badLot, badLotWear, BUILD_START, comebacks, manifestation, processes, quirks, readings, shops, usage, warranty, WINDOW_END, WINDOW_START,
  type ColdFactor, type ComponentProcess,
} from "./scenario.js";
import { componentDetail, pickMode, pmDetail } from "./shop-floor.js";
import { tminAt, type ShopWeather } from "./weather.js";

export type LineType = "failure" | "pm" | "install";

/** One RO line as the simulation saw it; texts, labour and measurements are drawn later from `seed`. */
export interface JobEvent {
  machine: number;
  serial: string;
  shop: number;
  openDay: number;
  closeDay: number;
  trueHours: number;
  meter: number;
  meterNote: string;
  lineType: LineType;
  component: string;
  mode: string;
  comeback: boolean;
  tech: string;
  payType: string;
  orderDay: number | null;
  receivedDay: number | null;
  backOrdered: boolean;
  ambientF: number | null;
  /** index into pmDetail.ops, −1 on other lines */
  pmOp: number;
  socketCorroded: boolean;
  lot: string;
  seed: number;
}

export interface TelematicsReading {
  day: number;
  meter: number;
}

/** Technician choice per shop: named shares (S5-T2 30%, S3-T4 25%), the rest evenly. */
export class TechPicker {
  private readonly ids: string[][];
  private readonly weights: number[][];
  constructor() {
    this.ids = shops.map((s) => Array.from({ length: s.technicians }, (_, i) => `${s.code}-T${i + 1}`));
    this.weights = this.ids.map((ids) => {
      const named = ids.map((id) => comebacks.techShare[id]);
      const rest = 1 - named.reduce<number>((a, w) => a + (w ?? 0), 0);
      const unnamed = named.filter((w) => w === undefined).length;
      return named.map((w) => w ?? rest / unnamed);
    });
  }
  pick(rng: Rng, shop: number): string {
    return this.ids[shop]![rng.weightedIndex(this.weights[shop]!)]!;
  }
  roster(shop: number): readonly string[] {
    return this.ids[shop]!;
  }
}

export function comebackProbability(tech: string, shopCode: string): number {
  return comebacks.byTech[tech] ?? comebacks.byShop[shopCode] ?? comebacks.p;
}

interface ComponentState {
  proc: ComponentProcess;
  beta: number;
  eta: number;
  factor: ColdFactor | undefined;
  installHours: number;
  /** no-cold-factor components: engine hours at which the item fails */
  failAt: number;
  /** cold-factor components: unit exponential target and cumulative hazard so far */
  target: number;
  cumHazard: number;
  prevPow: number;
  latentDay: number;
  blockedUntil: number;
  renewPending: boolean;
}

const REPAIR_DAYS = [0.5, 0.3, 0.12, 0.08];
const LONG_REPAIRS = new Set(["ENG-BLK-RING", "HYD-PMP-MAIN", "ENG-AIR-TURBO"]);

/** Covered when within the months limit and the hours limit of the component's coverage class. */
export function coveredByWarranty(m: Machine, engineClass: boolean, day: number, hours: number): boolean {
  const months = engineClass ? warranty.engineMonths : warranty.baseMonths;
  const limit = engineClass ? warranty.engineHours : warranty.baseHours;
  return day <= addMonths(m.deliveryDay, months) && hours <= limit;
}

export function simulateMachine(
  seed: number, m: Machine, weather: ShopWeather, techs: TechPicker, clock: DemoClock = UNSHIFTED,
): { events: JobEvent[]; telematics: TelematicsReading[] } {
  const lastDay = clock.lastDay;
  const lotMonth = (day: number): string => yymm(day + clock.shiftDays);
  const rng = stream(seed, "machine", m.index);
  const shop = shops[m.shop]!;
  const events: JobEvent[] = [];
  const telematics: TelematicsReading[] = [];
  const baseRate = m.annualHours / 365.25;
  const winterRate = baseRate * (shop.cold ? usage.winterFactorCold : usage.winterFactorOther);

  const states: ComponentState[] = processes
    .filter((p) => p.families.includes(m.family) && (!p.models || p.models.includes(m.model)))
    .map((proc) => {
      const lotBad = proc.code === "ENG-CSA-HPLUG" && m.badLot;
      const st: ComponentState = {
        proc, beta: lotBad ? badLot.beta : proc.beta, eta: lotBad ? badLot.eta : proc.eta, factor: lotBad ? badLotWear : proc.coldFactor,
        installHours: 0, failAt: Infinity, target: 0, cumHazard: 0, prevPow: 0, latentDay: -1, blockedUntil: -1, renewPending: false,
      };
      arm(st, 0);
      return st;
    });

  function arm(st: ComponentState, hours: number): void {
    st.installHours = hours;
    st.cumHazard = 0;
    st.prevPow = 0;
    st.latentDay = -1;
    if (st.factor) st.target = rng.exponential();
    else st.failAt = hours + rng.weibull(st.beta, st.eta);
  }

  function renew(st: ComponentState, hours: number): void {
    // replacements always come from good lots, so the base process applies from here on
    st.beta = st.proc.beta;
    st.eta = st.proc.eta;
    st.factor = st.proc.coldFactor;
    st.renewPending = false;
    arm(st, hours);
  }

  let meterOffset = 0;
  let meterReplaced = false;
  let pmCount = 0;
  let nextPm = m.deliveryHours + readings.pmIntervalHours + rng.uniform(-readings.pmJitterHours, readings.pmJitterHours);
  const pendingComebacks: { day: number; st: ComponentState; mode: string }[] = [];

  function push(e: Omit<JobEvent, "machine" | "serial" | "shop" | "seed">): void {
    const seedOfLine = rng.nextUint32();
    if (e.openDay >= WINDOW_START && e.openDay <= lastDay) events.push({ ...e, machine: m.index, serial: m.serial, shop: m.shop, seed: seedOfLine });
  }

  function repair(st: ComponentState, day: number, hours: number, tmin: number, isComeback: boolean, mode: string): void {
    const code = st.proc.code;
    const tech = techs.pick(rng, m.shop);
    const winter = code === "ENG-CSA-HPLUG" && m.family === backOrders.winterFamily && day >= backOrders.winterFrom && day <= backOrders.winterTo;
    let received: number;
    let backOrdered = false;
    if (rng.chance(winter ? backOrders.winterP : backOrders.otherP)) {
      backOrdered = true;
      const wait = winter
        ? rng.lognormal(backOrders.winterMedianDays, backOrders.winterSigmaLog)
        : rng.lognormal(backOrders.otherMedianDays, backOrders.otherSigmaLog);
      received = day + Math.min(winter ? backOrders.winterCapDays : backOrders.otherCapDays, Math.max(1, Math.round(wait)));
    } else {
      received = day + rng.int(0, backOrders.stockedMaxDays);
    }
    const work = rng.weightedIndex(REPAIR_DAYS) + (LONG_REPAIRS.has(code) ? 2 : 0);
    const close = backOrdered ? received + rng.int(0, 1) : Math.max(received, day + work);
    const covered = coveredByWarranty(m, st.proc.engineCoverage, day, hours);
    const payType = isComeback ? (covered ? "warranty" : "internal") : covered ? (rng.chance(0.06) ? "customer" : "warranty") : "customer";
    const detail = componentDetail[code]!;
    push({
      openDay: day, closeDay: close, trueHours: hours, meter: hours - meterOffset, meterNote: "", lineType: "failure", component: code,
      mode, comeback: isComeback, tech, payType, orderDay: day, receivedDay: received, backOrdered,
      ambientF: tmin + rng.uniform(0, quirks.ambientSpreadF), pmOp: -1, socketCorroded: false,
      lot: code === "ENG-CSA-HPLUG" ? goodPlugLot(received + clock.shiftDays) : `${detail.lotPrefix}-${lotMonth(received - 30)}`,
    });
    st.blockedUntil = close;
    st.renewPending = true;
    st.latentDay = -1;

    if (shop.cold && backOrdered && st.proc.twoStage && (m.blockHeaterDay === null || m.blockHeaterDay > day) && rng.chance(backOrders.workaroundShare)) {
      install(day, hours, tmin);
    }
    if (!isComeback && mode !== "DAMAGE" && rng.chance(comebackProbability(tech, shop.code))) {
      const maxDays = Math.min(comebacks.maxDays, Math.floor(comebacks.maxHours / baseRate));
      if (maxDays >= comebacks.minDays) pendingComebacks.push({ day: close + rng.int(comebacks.minDays, maxDays), st, mode });
    }
  }

  function install(day: number, hours: number, tmin: number): void {
    const corroded = day > addMonths(m.deliveryDay, backOrders.socketCorrodedAgeMonths) && rng.chance(backOrders.socketCorrodedShare);
    push({
      openDay: day, closeDay: day + rng.int(0, 1), trueHours: hours, meter: hours - meterOffset, meterNote: "", lineType: "install",
      component: "ENG-COO-BLKHTR", mode: corroded ? "CORROSION" : "OTHER", comeback: false, tech: techs.pick(rng, m.shop), payType: "customer",
      orderDay: day, receivedDay: day, backOrdered: false, ambientF: tmin + rng.uniform(0, quirks.ambientSpreadF), pmOp: -1,
      socketCorroded: corroded, lot: `BH-${lotMonth(day - 30)}`,
    });
    m.blockHeaterDay = day;
  }

  let hours = m.deliveryHours;
  for (let day = m.deliveryDay; day <= lastDay; day++) {
    const tmin = tminAt(weather, day);
    const start = hours;
    const end = start + (inDjf(day) ? winterRate : baseRate);

    for (const st of states) {
      if (st.blockedUntil >= day) continue;
      if (st.renewPending) renew(st, start);
      if (st.latentDay >= 0) {
        if (day > st.latentDay && rng.chance(manifestation(tmin))) repair(st, day, start, tmin, false, pickMode(rng, componentDetail[st.proc.code]!));
        continue;
      }
      if (st.factor) {
        const pow = Math.pow((end - st.installHours) / st.eta, st.beta);
        const dH = st.factor(tmin) * (pow - st.prevPow);
        st.prevPow = pow;
        st.cumHazard += dH;
        if (st.cumHazard >= st.target) {
          const at = start + (end - start) * (1 - (st.cumHazard - st.target) / dH);
          if (st.proc.twoStage) st.latentDay = day;
          else repair(st, day, at, tmin, false, pickMode(rng, componentDetail[st.proc.code]!));
        }
      } else if (end >= st.failAt) {
        repair(st, day, Math.max(start, st.failAt), tmin, false, pickMode(rng, componentDetail[st.proc.code]!));
      }
    }

    for (let i = pendingComebacks.length - 1; i >= 0; i--) {
      const cb = pendingComebacks[i]!;
      if (cb.day !== day) continue;
      pendingComebacks.splice(i, 1);
      repair(cb.st, day, start, tmin, true, cb.mode);
    }

    if (m.retrofitDay === day && m.blockHeaterDay === null) install(day, start, tmin);

    if (end >= nextPm) {
      const reading = Math.min(end, Math.max(start, nextPm));
      pmCount++;
      const pmOp = pmDetail.ops.findIndex((op) => pmCount % op.every === 0);
      let meter = reading - meterOffset;
      let note = "";
      if (m.meterReplacementFrom !== null && !meterReplaced && day >= m.meterReplacementFrom) {
        meterReplaced = true;
        const fresh = Math.round(rng.uniform(0.1, 0.9) * 10) / 10;
        note = `Hour meter replaced; old meter read ${meter.toFixed(1)} h, new meter ${fresh.toFixed(1)} h`;
        meterOffset = reading - fresh;
        meter = fresh;
      }
      push({
        openDay: day, closeDay: day + (rng.chance(0.8) ? 0 : 1), trueHours: reading, meter, meterNote: note, lineType: "pm", component: pmDetail.component,
        mode: "", comeback: false, tech: techs.pick(rng, m.shop), payType: "customer", orderDay: null, receivedDay: null, backOrdered: false,
        ambientF: null, pmOp, socketCorroded: false, lot: "",
      });
      nextPm = reading + readings.pmIntervalHours + rng.uniform(-readings.pmJitterHours, readings.pmJitterHours);
    }

    if (m.telematics && day >= WINDOW_START && dayOfMonth(day) === m.telematicsDayOfMonth) telematics.push({ day, meter: end - meterOffset });
    hours = end;
  }
  return { events, telematics };
}

/**
 * Calendar lookups for every simulated day, computed once: bit 0x80 marks Dec–Feb, the low bits hold the day
 * of the month. It reaches a year past the window for the longest pad (anchor.ts) and some days more.
 */
const CALENDAR_FROM = BUILD_START;
const calendarFlags = (() => {
  const flags = new Uint8Array(WINDOW_END - CALENDAR_FROM + 1 + 366 + 400);
  for (let i = 0; i < flags.length; i++) {
    const day = CALENDAR_FROM + i;
    flags[i] = new Date(day * 86_400_000).getUTCDate() | (isDjf(day) ? 0x80 : 0);
  }
  return flags;
})();
const dayOfMonth = (day: number): number => calendarFlags[day - CALENDAR_FROM]! & 0x7f;
const inDjf = (day: number): boolean => (calendarFlags[day - CALENDAR_FROM]! & 0x80) !== 0;
