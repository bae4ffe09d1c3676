/**
 * The winter forecast model, built from the warehouse as it stood before a cutoff day: Weibull fits per
 * cold-start component × engine family (× lot where a lot's life differs), failure-rate ratios per daily-minimum
 * band, each shop's season climate, and every in-service machine's part age and hours per month. The forecast
 * uses the day after the data's end as the cutoff; the backtest the first day of the season it holds out.
 */
import type { Db } from "../../db/database.js";
import { fahrenheitBands, temperatureBandLabel, type TemperatureUnit } from "../../../shared/bands.js";
import type { WinterBand, WinterFit } from "../../../shared/schemas/winter.js";
import { fitWeibull, type WeibullFit } from "../../analytics/weibull.js";
import { chiSquareUpperTail } from "../../analytics/distributions.js";
import type { LifeObservation } from "../../analytics/life-data.js";
import {
  addDays,
  calibratedProbability,
  CALIBRATION_PRIOR,
  coldFactor,
  conditionalFailureProbability,
  credibilityRatio,
  daysInclusive,
  lastCompleteSeason,
} from "../../analytics/winter-forecast.js";
import {
  coldStartParts,
  shopClimateDays,
  winterBandCounts,
  winterFailures,
  winterMachines,
  type WinterFailure,
  type WinterMachine,
  type WinterPart,
} from "../../db/queries/winter.js";
import { HEATER_PLUG } from "../../../shared/catalog.js";

const MONTH_DAYS = 365.25 / 12;
/** A lot is fitted apart only with at least this many failures and a likelihood-ratio p below LOT_P. */
export const LOT_MIN_FAILURES = 10;
export const LOT_P = 0.01;
/** Machines whose last valid reading is older than this before the cutoff are taken as out of service. */
const IN_SERVICE_DAYS = 365;

export interface MachinePart {
  machineKey: string;
  shopCode: string;
  component: string;
  partNumber: string;
  engineFamily: string;
  /** engine hours on the part at the period's start */
  age: number;
  /** engine hours the machine runs in the period */
  hours: number;
  coldFactor: number;
  p: number;
}

export interface WinterModel {
  cutoff: string;
  period: { from: string; to: string; days: number; months: number };
  parts: WinterPart[];
  fits: WinterFit[];
  bands: WinterBand[];
  /** per shop: its share of past period-month days per °F band (fahrenheitBands order) */
  climate: Map<string, number[]>;
  shopNames: Map<string, string>;
  /** per shop × component: k */
  coldFactors: Map<string, number>;
  machineParts: MachinePart[];
  /** component × family pairs without a fit (too few failures) */
  unfitted: { component: string; engineFamily: string; failures: number }[];
}

const BAND_IDS = fahrenheitBands.map((b) => b.id);
const dayMs = (d: string) => Date.parse(`${d}T00:00:00Z`);
const daysBetween = (a: string, b: string) => (dayMs(b) - dayMs(a)) / 86_400_000;

/** The calendar months (1–12) a period touches. */
function periodMonths(from: string, to: string): number[] {
  const out = new Set<number>();
  let y = Number(from.slice(0, 4));
  let m = Number(from.slice(5, 7));
  const endY = Number(to.slice(0, 4));
  const endM = Number(to.slice(5, 7));
  while (y < endY || (y === endY && m <= endM)) {
    out.add(m);
    m++;
    if (m > 12) { m = 1; y++; }
    if (out.size === 12) break;
  }
  return [...out].sort((a, b) => a - b);
}

interface Life {
  units: (LifeObservation & { lot: string })[];
  /** the part fitted now: hours since fitting at the last reading, and its lot */
  current: { age: number; lot: string };
}

/** A machine's fitted parts of one component as life units, renewed at each counted failure, censored at the last reading. */
function lifeOf(m: WinterMachine, failures: readonly WinterFailure[], trackLots: boolean): Life | null {
  if (!m.trail.length) return null;
  const [firstDay, firstH] = m.trail[0];
  const lastH = m.trail[m.trail.length - 1][1];
  let start = m.installHours;
  let lot = trackLots ? m.buildLot : "all";
  let entry = daysBetween(m.deliveryDate, firstDay) > 30 ? Math.max(firstH - m.installHours, 0) : 0;
  const units: Life["units"] = [];
  for (const f of failures) {
    if (f.hourMeter === null || f.hourMeter <= start || f.hourMeter > lastH) continue;
    const time = f.hourMeter - start;
    if (entry < time) units.push({ time, entry, event: 1, lot });
    start = f.hourMeter;
    lot = trackLots ? f.fittedLot : "all";
    entry = 0;
  }
  if (lastH > start && entry < lastH - start) units.push({ time: lastH - start, entry, event: 0, lot });
  return { units, current: { age: Math.max(lastH - start, 0), lot } };
}

/** Hours per month from the last year of valid readings (at least 60 days apart), or null. */
function hoursPerMonth(trail: readonly [string, number][]): number | null {
  if (trail.length < 2) return null;
  const [d1, h1] = trail[trail.length - 1];
  const yearBefore = addDays(d1, -365);
  let base = trail[0];
  for (const r of trail) if (r[0] <= yearBefore) base = r;
  const span = daysBetween(base[0], d1);
  if (span < 60) return null;
  return Math.max(0, ((h1 - base[1]) / span) * MONTH_DAYS);
}

const median = (xs: number[]): number => {
  if (!xs.length) return 0;
  const s = [...xs].sort((a, b) => a - b);
  const i = Math.floor(s.length / 2);
  return s.length % 2 ? s[i] : (s[i - 1] + s[i]) / 2;
};

interface FitGroup {
  fit: WeibullFit;
  lot: string | null;
}

/**
 * Fits of one component × family: all lots together, and apart any lot with at least LOT_MIN_FAILURES failures
 * whose life differs from the rest's (likelihood-ratio test of one Weibull against two, χ² with 2 df, p < LOT_P);
 * the rest are then refitted without it.
 */
function fitFamily(units: Life["units"], trackLots: boolean): { groups: FitGroup[]; failures: number } {
  const failures = units.reduce((s, u) => s + u.event, 0);
  const separate: string[] = [];
  if (trackLots) {
    const perLot = new Map<string, number>();
    for (const u of units) if (u.event) perLot.set(u.lot, (perLot.get(u.lot) ?? 0) + 1);
    for (const [lot, n] of [...perLot].sort((a, b) => a[0].localeCompare(b[0]))) {
      if (n < LOT_MIN_FAILURES) continue;
      const a = units.filter((u) => u.lot === lot);
      const b = units.filter((u) => u.lot !== lot);
      const fa = fitWeibull(a, { intervals: false });
      const fb = fitWeibull(b, { intervals: false });
      const fp = fitWeibull(units, { intervals: false });
      if (fa.status !== "fitted" || fb.status !== "fitted" || fp.status !== "fitted") continue;
      const stat = 2 * (fa.logLikelihood + fb.logLikelihood - fp.logLikelihood);
      if (chiSquareUpperTail(stat, 2) < LOT_P) separate.push(lot);
    }
  }
  const groups: FitGroup[] = [];
  for (const lot of separate) {
    const fit = fitWeibull(units.filter((u) => u.lot === lot), { intervals: false });
    if (fit.status === "fitted") groups.push({ fit, lot });
  }
  const rest = fitWeibull(units.filter((u) => !separate.includes(u.lot)), { intervals: false });
  if (rest.status === "fitted") groups.push({ fit: rest, lot: null });
  return { groups, failures };
}

/** Builds the model from data dated before `cutoff`, for the period [from, to]. */
export async function buildWinterModel(db: Db, cutoff: string, from: string, to: string, unit: TemperatureUnit): Promise<WinterModel> {
  const days = daysInclusive(from, to);
  const period = { from, to, days, months: days / MONTH_DAYS };
  const parts = await coldStartParts(db, cutoff);
  const components = [...new Set(parts.map((p) => p.component))].sort();
  const families = [...new Set(parts.map((p) => p.engineFamily))].sort();
  const [machines, failures, climateRows] = await Promise.all([
    winterMachines(db, cutoff, families),
    winterFailures(db, components, undefined, addDays(cutoff, -1)),
    shopClimateDays(db, cutoff, periodMonths(from, to)),
  ]);

  const shopNames = new Map<string, string>();
  const climate = new Map<string, number[]>();
  for (const r of climateRows) {
    shopNames.set(r.shopCode, r.shopName);
    const row = climate.get(r.shopCode) ?? BAND_IDS.map(() => 0);
    row[BAND_IDS.indexOf(r.band)] += r.days;
    climate.set(r.shopCode, row);
  }
  for (const [shop, row] of climate) {
    const total = row.reduce((s, x) => s + x, 0);
    climate.set(shop, row.map((x) => (total ? x / total : 0)));
  }

  const failuresBy = new Map<string, WinterFailure[]>();
  for (const f of failures) {
    const k = `${f.machineKey}|${f.component}`;
    const list = failuresBy.get(k) ?? [];
    list.push(f);
    failuresBy.set(k, list);
  }
  for (const list of failuresBy.values()) list.sort((a, b) => (a.hourMeter ?? 0) - (b.hourMeter ?? 0));

  const inService = addDays(cutoff, -IN_SERVICE_DAYS);
  const rates = new Map<string, number | null>();
  for (const m of machines) rates.set(m.machineKey, hoursPerMonth(m.trail));
  const fleetRate = median([...rates.values()].filter((r): r is number => r !== null));

  const fits: WinterFit[] = [];
  const bands: WinterBand[] = [];
  const coldFactors = new Map<string, number>();
  const machineParts: MachinePart[] = [];
  const unfitted: WinterModel["unfitted"] = [];

  for (const component of components) {
    const compParts = parts.filter((p) => p.component === component);
    const compFamilies = compParts.map((p) => p.engineFamily);
    const counts = await winterBandCounts(db, component, compFamilies, cutoff);
    const byBand = new Map(counts.map((c) => [c.band, c]));
    const totalF = counts.reduce((s, c) => s + c.failures, 0);
    const totalD = counts.reduce((s, c) => s + c.machineDays, 0);
    const overall = totalD > 0 ? totalF / totalD : 0;
    const rr = BAND_IDS.map((b) => {
      const c = byBand.get(b);
      return c && c.machineDays > 0 && overall > 0 ? c.failures / c.machineDays / overall : null;
    });
    const fitShares = BAND_IDS.map((b) => (totalD > 0 ? (byBand.get(b)?.machineDays ?? 0) / totalD : 0));
    BAND_IDS.forEach((b, i) =>
      bands.push({
        component,
        band: b,
        label: temperatureBandLabel(b, unit),
        failures: byBand.get(b)?.failures ?? 0,
        machineDays: byBand.get(b)?.machineDays ?? 0,
        rateRatio: rr[i] ?? 0,
        fitShare: fitShares[i],
      }),
    );
    for (const [shop, shares] of climate) coldFactors.set(`${shop}|${component}`, coldFactor(rr, shares, fitShares));

    const trackLots = component === HEATER_PLUG;
    for (const part of compParts) {
      const famMachines = machines.filter((m) => m.engineFamily === part.engineFamily);
      const lives = famMachines.map((m) => ({ m, life: lifeOf(m, failuresBy.get(`${m.machineKey}|${component}`) ?? [], trackLots) }));
      const units = lives.flatMap((x) => x.life?.units ?? []);
      const { groups, failures: nFail } = fitFamily(units, trackLots);
      if (!groups.length) {
        unfitted.push({ component, engineFamily: part.engineFamily, failures: nFail });
        continue;
      }
      for (const g of groups) {
        fits.push({
          component,
          engineFamily: part.engineFamily,
          lot: g.lot,
          shape: g.fit.shape,
          scale: g.fit.scale,
          units: g.fit.units,
          failures: g.fit.failures,
        });
      }
      const rest = groups.find((g) => g.lot === null) ?? groups[0];
      for (const { m, life } of lives) {
        if (!life) continue;
        const last = m.trail[m.trail.length - 1];
        if (last[0] < inService) continue;
        const r = rates.get(m.machineKey) ?? fleetRate;
        const g = groups.find((x) => x.lot !== null && x.lot === life.current.lot) ?? rest;
        const age = life.current.age + Math.max(0, r * (daysBetween(last[0], from) / MONTH_DAYS));
        const hours = r * period.months;
        const k = coldFactors.get(`${m.shopCode}|${component}`) ?? 1;
        machineParts.push({
          machineKey: m.machineKey,
          shopCode: m.shopCode,
          component,
          partNumber: part.partNumber,
          engineFamily: part.engineFamily,
          age,
          hours,
          coldFactor: k,
          p: conditionalFailureProbability(age, hours, g.fit.shape, g.fit.scale, k),
        });
        if (!shopNames.has(m.shopCode)) shopNames.set(m.shopCode, m.shopCode);
      }
    }
  }
  return { cutoff, period, parts, fits, bands, climate, shopNames, coldFactors, machineParts, unfitted };
}

/** Actual counted failures per machine × component in [from, to], for the backtest. */
export async function actualFailures(db: Db, components: readonly string[], from: string, to: string): Promise<Map<string, number>> {
  const rows = await winterFailures(db, components, from, to);
  const out = new Map<string, number>();
  for (const f of rows) out.set(`${f.machineKey}|${f.component}`, (out.get(`${f.machineKey}|${f.component}`) ?? 0) + 1);
  return out;
}

/** Complete past winters, before the cutoff, that each shop's calibration is learned from. */
export const CALIBRATION_WINTERS = 2;

export interface ShopCalibration {
  shopCode: string;
  component: string;
  /** counted failures of the shop's machines in the past winters */
  observed: number;
  /** failures the model, rebuilt before each of those winters, expected for the same machines */
  expected: number;
  /** (observed + a) ÷ (expected + a) */
  ratio: number;
  /** observed + a: the shape of the ratio's gamma posterior */
  shape: number;
}

export interface Calibration {
  seasons: { from: string; to: string }[];
  prior: number;
  /** per shop × component; a cell without past machines is absent (ratio 1, shape a) */
  cells: Map<string, ShopCalibration>;
}

/**
 * Per shop × component calibration learned from data before `cutoff` only: for each of the last
 * CALIBRATION_WINTERS complete winters before it, the model is rebuilt from the data before that winter and its
 * expected failures are set against the failures counted in it; the sums over the winters give the
 * gamma–Poisson credibility ratio (O + a) ÷ (E + a).
 */
export async function shopCalibration(db: Db, cutoff: string, prior = CALIBRATION_PRIOR): Promise<Calibration> {
  const seasons: { from: string; to: string }[] = [];
  let end = addDays(cutoff, -1);
  for (let i = 0; i < CALIBRATION_WINTERS; i++) {
    const s = lastCompleteSeason(end);
    seasons.push(s);
    end = addDays(s.from, -1);
  }
  const sums = new Map<string, { shopCode: string; component: string; observed: number; expected: number }>();
  for (const s of seasons) {
    const model = await buildWinterModel(db, s.from, s.from, s.to, "F");
    if (!model.machineParts.length) continue;
    const actual = await actualFailures(db, [...new Set(model.machineParts.map((m) => m.component))], s.from, s.to);
    for (const m of model.machineParts) {
      const k = `${m.shopCode}|${m.component}`;
      const cell = sums.get(k) ?? { shopCode: m.shopCode, component: m.component, observed: 0, expected: 0 };
      cell.expected += m.p;
      cell.observed += actual.get(`${m.machineKey}|${m.component}`) ?? 0;
      sums.set(k, cell);
    }
  }
  const cells = new Map<string, ShopCalibration>();
  for (const [k, c] of sums) cells.set(k, { ...c, ratio: credibilityRatio(c.observed, c.expected, prior), shape: c.observed + prior });
  return { seasons, prior, cells };
}

export interface CalibratedPart extends MachinePart {
  /** p before calibration */
  rawP: number;
  ratio: number;
  shape: number;
}

/** The model's parts with each shop × component's ratio multiplied into the hazard: p = 1 − (1 − p_model)^ratio. */
export function calibrateParts(parts: readonly MachinePart[], calibration: Calibration): CalibratedPart[] {
  return parts.map((m) => {
    const c = calibration.cells.get(`${m.shopCode}|${m.component}`);
    const ratio = c?.ratio ?? 1;
    return { ...m, rawP: m.p, p: calibratedProbability(m.p, ratio), ratio, shape: c?.shape ?? calibration.prior };
  });
}
