/**
 * Winter readiness answers: the forecast with stock advice per shop × part number, and the backtest of the
 * same method on the last complete winter held out.
 */
import type { Db } from "../../db/database.js";
import type { ShopScope } from "../../../shared/schemas/me.js";
import type { WinterBacktest, WinterBacktestRow, WinterCalibration, WinterForecast, WinterForecastQuery, WinterLeadTime } from "../../../shared/schemas/winter.js";
import { HttpError } from "../../errors.js";
import { scopeIncludes } from "../../db/queries/scope.js";
import { backOrderWaits, dataEnd, listWinterStock, shopNames } from "../../db/queries/winter.js";
import {
  addDays,
  calibratedCount,
  CALIBRATION_PRIOR,
  forecastCount,
  lastCompleteSeason,
  leadTimeSummary,
  nextSeason,
  orderBy,
  stockToHold,
} from "../../analytics/winter-forecast.js";
import {
  actualFailures,
  buildWinterModel,
  calibrateParts,
  CALIBRATION_WINTERS,
  LOT_MIN_FAILURES,
  LOT_P,
  shopCalibration,
  type CalibratedPart,
  type Calibration,
} from "./winter-model.js";

/** Fewest back-ordered lines for the measured 90th percentile to be used as the planning lead time. */
export const MIN_LEAD_LINES = 5;
/** Planning lead time when past winters hold too few back-ordered lines (common practice, no source). */
export const DEFAULT_LEAD_DAYS = 14;

export const FORECAST_METHOD =
  "For each machine at the shop at the data's end (last valid hour reading within a year): the part's age a in engine hours since it was fitted (delivery or last counted replacement), carried forward to the period's start at the machine's hours per month r (from its valid readings over its last year; the fleet median when it has under 60 days of them), and the hours it runs in the period h = r × months. " +
  "Weibull fits (maximum likelihood, right censoring, delayed entry) per component × engine family; a heater-plug lot is fitted on its own when it has at least " +
  `${LOT_MIN_FAILURES} failures and a likelihood-ratio test of one Weibull against two gives p < ${LOT_P}. ` +
  "Probability of failure in the period p = 1 − exp(−k·[((a+h)/η)^β − (a/η)^β]), where k = Σ w_shop·RR ÷ Σ w_fit·RR is the shop's cold factor: RR are measured failure-rate ratios per daily-minimum band (failures per machine-day in the band ÷ overall), w_shop the shop's share of days per band in the same calendar months of past years, w_fit the fleet's share of machine-days per band over the data the fit came from. " +
  `Shop calibration: each shop's own record corrects the model for what the cold factor does not capture (failures that stay hidden until a cold day, the shop's own fleet and use). For each of the ${CALIBRATION_WINTERS} complete winters before the data's end, the model is rebuilt from the data before that winter and its expected failures E for each shop × component are set against the failures O counted there; ` +
  `the ratio (O + ${CALIBRATION_PRIOR}) ÷ (E + ${CALIBRATION_PRIOR}) multiplies the hazard, so p becomes 1 − (1 − p)^ratio. Adding ${CALIBRATION_PRIOR} expected failures to both sides pulls a shop with a short record towards 1 (the gamma–Poisson, or empirical Bayes, credibility estimate). ` +
  `Expected failures = Σp after calibration; the interval is the 5 % and 95 % points of a negative binomial count (a Poisson count whose ratio is uncertain: shape O + ${CALIBRATION_PRIOR}), summed over components by convolution, so a shop with a short record gets a wider interval.`;

export const INTERVAL_NOTE =
  "The interval counts the chance in which parts fail and the uncertainty of the shop's calibration ratio; it leaves out the uncertainty of the fitted Weibull parameters, the rate ratios and the hours forecast, and a change from one winter to the next beyond what the past winters showed, so the true spread is wider.";

export const STOCK_METHOD =
  "Planning lead time: the 90th percentile of order → receipt days of back-ordered lines of the part number ordered in past winters (November–March), so that nine back-orders in ten arrive in time; " +
  `with fewer than ${MIN_LEAD_LINES} such lines, ${DEFAULT_LEAD_DAYS} days (common practice, no source). ` +
  "Demand over the lead time D ~ Poisson(expected failures per day of the period × lead-time days); no overdispersion is estimated. " +
  "Quantity to hold = the smallest q with P(D ≤ q) ≥ the service level; gap = max(0, hold − on hand); order by = period start − planning lead time.";

export const CAUTION =
  "A forecast of part demand, not a diagnosis: before replacing a cold-start part, test it as the maker's service manual describes, and follow local codes and licensed practice for electrical and engine-heating work.";

const round = (x: number, d = 4) => Math.round(x * 10 ** d) / 10 ** d;

function leadTimes(parts: { partNumber: string; component: string }[], waits: { partNumber: string; days: number }[]): WinterLeadTime[] {
  return parts.map((p) => {
    const s = leadTimeSummary(waits.filter((w) => w.partNumber === p.partNumber).map((w) => w.days));
    const measured = s.lines >= MIN_LEAD_LINES && s.p90 !== null;
    return {
      partNumber: p.partNumber,
      component: p.component,
      backOrderedLines: s.lines,
      medianDays: s.median,
      p90Days: s.p90,
      planningDays: measured ? Math.ceil(s.p90 as number) : DEFAULT_LEAD_DAYS,
      basis: measured
        ? `90th percentile of ${s.lines} back-ordered lines ordered in past winters`
        : `${s.lines} back-ordered lines in past winters, too few to measure: ${DEFAULT_LEAD_DAYS} days assumed`,
    };
  });
}

/** Groups machine parts by a key, keeping the key's first-seen order sorted by the key. */
function groupBy<T>(items: readonly T[], key: (t: T) => string): Map<string, T[]> {
  const out = new Map<string, T[]>();
  for (const it of items) {
    const k = key(it);
    const list = out.get(k);
    if (list) list.push(it);
    else out.set(k, [it]);
  }
  return new Map([...out].sort((a, b) => a[0].localeCompare(b[0])));
}

/** The default period (the winter ahead of the data's end: nextSeason) or the one asked for. */
function periodOf(q: WinterForecastQuery, end: string): { from: string; to: string } {
  const season = nextSeason(end);
  const from = q.from ?? season.from;
  const to = q.to ?? (q.from ? `${Number(from.slice(0, 4)) + (from.slice(5) >= "04-01" ? 1 : 0)}-03-31` : season.to);
  if (to < from) throw new HttpError(400, "VALIDATION_FAILED", "The To date is before the From date");
  return { from, to };
}

async function lastDay(db: Db): Promise<string> {
  const end = await dataEnd(db);
  if (!end) throw new HttpError(404, "NO_DATA", "There are no repair lines yet: load the exports first");
  return end;
}

/** The forecast and stock advice for the shops in scope. `today` decides "order now". */
export async function winterForecast(db: Db, scope: ShopScope, q: WinterForecastQuery, today: string): Promise<WinterForecast> {
  const end = await lastDay(db);
  const { from, to } = periodOf(q, end);
  const cutoff = addDays(end, 1);
  const model = await buildWinterModel(db, cutoff, from, to, q.unit);
  const calibration = await shopCalibration(db, cutoff);
  const [names, waits, stock] = await Promise.all([
    shopNames(db),
    backOrderWaits(db, model.parts.map((p) => p.partNumber), cutoff),
    listWinterStock(db, scope),
  ]);
  const leads = leadTimes(model.parts, waits);
  const leadOf = new Map(leads.map((l) => [l.partNumber, l]));
  const onHand = new Map(stock.map((s) => [`${s.shopCode}|${s.partNumber}`, s.quantity]));
  const componentName = new Map(model.parts.map((p) => [p.component, p.componentName]));

  const inScope = calibrateParts(model.machineParts, calibration).filter((m) => scopeIncludes(scope, m.shopCode));
  const rows = [...groupBy(inScope, (m) => `${m.shopCode}|${m.partNumber}`).values()].map((list) => {
    const first = list[0];
    const c = calibratedCount([{ expected: list.reduce((s, m) => s + m.p, 0), shape: first.shape }]);
    const lead = leadOf.get(first.partNumber);
    const leadDays = lead?.planningDays ?? DEFAULT_LEAD_DAYS;
    const perDay = c.expected / model.period.days;
    const demand = perDay * leadDays;
    const hold = stockToHold(demand, q.serviceLevel);
    const have = onHand.get(`${first.shopCode}|${first.partNumber}`) ?? null;
    const when = orderBy(from, leadDays, today);
    return {
      shopCode: first.shopCode,
      shopName: names.get(first.shopCode) ?? first.shopCode,
      component: first.component,
      componentName: componentName.get(first.component) ?? first.component,
      partNumber: first.partNumber,
      machines: list.length,
      coldFactor: round(first.coldFactor),
      calibration: round(first.ratio),
      modelExpected: round(list.reduce((s, m) => s + m.rawP, 0), 3),
      climateShares: (model.climate.get(first.shopCode) ?? []).map((x) => round(x)),
      periodHours: Math.round(list.reduce((s, m) => s + m.hours, 0)),
      expected: round(c.expected, 3),
      lower: c.lower,
      upper: c.upper,
      perDay: round(perDay, 5),
      leadTimeDays: leadDays,
      leadTimeDemand: round(demand, 3),
      hold,
      onHand: have,
      gap: Math.max(0, hold - (have ?? 0)),
      orderBy: when.date,
      orderNow: when.now,
    };
  });
  return {
    period: { from, to, days: model.period.days, months: round(model.period.months, 2) },
    dataEnd: end,
    today,
    serviceLevel: q.serviceLevel,
    unit: q.unit,
    fits: model.fits.map((f) => ({ ...f, shape: round(f.shape), scale: Math.round(f.scale) })),
    bands: model.bands.map((b) => ({ ...b, rateRatio: round(b.rateRatio), fitShare: round(b.fitShare) })),
    leadTimes: leads,
    rows,
    calibration: calibrationView(calibration, scope),
    method:
      FORECAST_METHOD +
      (model.unfitted.length
        ? ` Not forecast (fewer than 5 failures to fit): ${model.unfitted.map((u) => `${u.component} on ${u.engineFamily} (${u.failures})`).join(", ")}.`
        : ""),
    intervalNote: INTERVAL_NOTE,
    stockMethod: STOCK_METHOD,
    caution: CAUTION,
  };
}

function calibrationView(c: Calibration, scope: ShopScope): WinterCalibration {
  return {
    prior: c.prior,
    seasons: c.seasons,
    cells: [...c.cells.values()]
      .filter((x) => scopeIncludes(scope, x.shopCode))
      .sort((a, b) => a.shopCode.localeCompare(b.shopCode) || a.component.localeCompare(b.component))
      .map((x) => ({ shopCode: x.shopCode, component: x.component, observed: x.observed, expected: round(x.expected, 3), ratio: round(x.ratio) })),
  };
}

/** Calibrated parts grouped by component, as the cells of {@link calibratedCount}. */
const cellsOf = (list: readonly CalibratedPart[]) =>
  [...groupBy(list, (m) => m.component).values()].map((ps) => ({ expected: ps.reduce((s, m) => s + m.p, 0), shape: ps[0].shape }));

function backtestRow(shopCode: string, shopName: string, component: string | null, list: readonly CalibratedPart[], actual: Map<string, number>): WinterBacktestRow {
  const c = calibratedCount(cellsOf(list));
  const raw = forecastCount(list.map((m) => m.rawP));
  const act = list.reduce((s, m) => s + (actual.get(`${m.machineKey}|${m.component}`) ?? 0), 0);
  return {
    shopCode,
    shopName,
    component,
    machines: new Set(list.map((m) => m.machineKey)).size,
    forecast: round(c.expected, 3),
    lower: c.lower,
    upper: c.upper,
    actual: act,
    error: round(act - c.expected, 3),
    relativeError: c.expected > 0 ? round((act - c.expected) / c.expected, 4) : null,
    inside: act >= c.lower && act <= c.upper,
    calibration: component === null ? null : round(list[0].ratio),
    modelForecast: round(raw.expected, 3),
    modelLower: raw.lower,
    modelUpper: raw.upper,
    modelInside: act >= raw.lower && act <= raw.upper,
  };
}

/**
 * Holds out the last complete 1 November – 31 March season, rebuilds every input from the data before its
 * first day (the shop calibration too, from the winters before it), forecasts each shop and compares with the
 * counted failures of the same machines in the season. Each row also carries the uncalibrated model's figures.
 */
export async function winterBacktest(db: Db, scope: ShopScope): Promise<WinterBacktest> {
  const end = await lastDay(db);
  const season = lastCompleteSeason(end);
  const model = await buildWinterModel(db, season.from, season.from, season.to, "F");
  const calibration = await shopCalibration(db, season.from);
  const names = await shopNames(db);
  const components = [...new Set(model.parts.map((p) => p.component))];
  const actual = await actualFailures(db, components, season.from, season.to);
  const inScope = calibrateParts(model.machineParts, calibration).filter((m) => scopeIncludes(scope, m.shopCode));
  const shops = [...groupBy(inScope, (m) => m.shopCode)].map(([shop, list]) => backtestRow(shop, names.get(shop) ?? shop, null, list, actual));
  const rows = [...groupBy(inScope, (m) => `${m.shopCode}|${m.component}`)].map(([, list]) =>
    backtestRow(list[0].shopCode, names.get(list[0].shopCode) ?? list[0].shopCode, list[0].component, list, actual),
  );
  const all = calibratedCount([...groupBy(inScope, (m) => `${m.shopCode}|${m.component}`).values()].flatMap(cellsOf));
  const rawAll = forecastCount(inScope.map((m) => m.rawP));
  const totalActual = shops.reduce((s, r) => s + r.actual, 0);
  const inside = shops.filter((s) => s.inside).length;
  const modelInside = shops.filter((s) => s.modelInside).length;
  return {
    season,
    trainedBefore: season.from,
    shops,
    rows,
    total: {
      forecast: round(all.expected, 3),
      lower: all.lower,
      upper: all.upper,
      actual: totalActual,
      inside: totalActual >= all.lower && totalActual <= all.upper,
      modelForecast: round(rawAll.expected, 3),
      modelLower: rawAll.lower,
      modelUpper: rawAll.upper,
    },
    coverage: { inside, shops: shops.length, share: shops.length ? round(inside / shops.length) : 0, level: 0.9, modelInside },
    fits: model.fits.map((f) => ({ ...f, shape: round(f.shape), scale: Math.round(f.scale) })),
    calibration: calibrationView(calibration, scope),
    method:
      `Season ${season.from} to ${season.to} held out. Fits, rate ratios, climate shares, hours per month and part ages were all rebuilt from data dated before ${season.from}, ` +
      `and so was each shop's calibration: the model was rebuilt before each of the winters ${calibration.seasons.map((x) => `${x.from.slice(0, 4)}–${x.to.slice(2, 4)}`).join(" and ")} and its expected failures set against those counted there, ratio (O + ${calibration.prior}) ÷ (E + ${calibration.prior}). ` +
      "The forecast then ran as for the coming winter, for the machines in service at each shop on that day, and is compared with the counted failures (comebacks left out) of those machines in the season. " +
      "A shop is inside when its count lies in its 90 % interval; with the parameters' own uncertainty left out, coverage below 90 % is expected. The model's figures before calibration are shown beside, for comparison.",
  };
}
