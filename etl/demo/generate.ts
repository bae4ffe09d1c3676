/**
 * generateDemo({ out, seed, scale, anchor }): writes the demo world's exports (SCENARIO.md) into `out` and
 * returns the manifest, which lists the files in load order with kind, profile and shop. Shops are simulated
 * and written one at a time and rows are streamed, so memory stays bounded by the largest shop. The history
 * ends on the day before `anchor` (anchor.ts: whole years, then pad); without one, on the generator's own
 * window end.
 */
import { mkdir, writeFile } from "node:fs/promises";
import path from "node:path";
import { CALENDAR_ANCHOR, demoTimeline, type DemoClock } from "./anchor.js";
import { isoOf, yearOf } from "./calendar.js";
import { emptyTally, addTally, backwardsTypo, decimalShift, futureYear, modelVariant, unknownModel, type FaultTally } from "./faults.js";
import { buildFleet, yymm, type Machine } from "./fleet.js";
import { jobRecord, measurementRows, techEfficiency, type LineContext } from "./lines.js";
import { openProfileWriter, renderRow, type ProfileWriter, type WrittenFile } from "./profile-writer.js";
import { resolveProfiles } from "./profiles.js";
import type { Profile } from "../profiles/profile-schema.js";
import { stream, type Rng } from "./prng.js";
import { injections, models, processes, shops, warranty, WEATHER_START, WINDOW_START } from "./scenario.js";
import { componentDetail, pickMode, technicianRoster } from "./shop-floor.js";
import { simulateMachine, TechPicker, type JobEvent } from "./simulate.js";
import { fToC, simulateWeather } from "./weather.js";

export interface GenerateOptions {
  out: string;
  seed?: number;
  scale?: number;
  /** 'YYYY-MM-DD': the history ends the day before. Defaults to CALENDAR_ANCHOR (nothing moved). */
  anchor?: string;
  onProgress?: (done: number, total: number) => void;
}

export interface ManifestFile {
  file: string;
  kind: "machines" | "jobs" | "measurements" | "weather" | "hours";
  profile: string;
  shop: string | null;
  rows: number;
  bytes: number;
  sha256: string;
  injected?: Partial<FaultTally>;
}

/**
 * Raised whenever the generator writes different files for the same seed, scale and anchor (a renamed model line,
 * open work at the end of history), so a demo folder written by an older generator is written again, not reloaded.
 */
export const GENERATOR_VERSION = 3;

export interface Manifest {
  generator: "ironledger-demo";
  version: number;
  seed: number;
  scale: number;
  /** the history ends the day before this date */
  anchor: string;
  /** how the generator's own calendar was moved to end there: whole years (in days), then days simulated past its end */
  shift: { years: number; days: number; padDays: number };
  window: { from: string; to: string };
  machines: number;
  files: ManifestFile[];
  injected: FaultTally;
  technicians: { id: string; shop: string; name: string }[];
}

const nonZero = (t: FaultTally): Partial<FaultTally> => Object.fromEntries(Object.entries(t).filter(([, v]) => v > 0));

async function writeAll<T>(w: ProfileWriter, rows: Iterable<T>, write: (row: T) => boolean): Promise<void> {
  for (const row of rows) if (!write(row)) await w.drained();
}

export async function generateDemo(options: GenerateOptions): Promise<Manifest> {
  const seed = options.seed ?? 1;
  const scale = options.scale ?? 1;
  const timeline = demoTimeline(options.anchor ?? CALENDAR_ANCHOR);
  const clock: DemoClock = timeline;
  const { lastDay, shiftDays } = timeline;
  const dateOf = (day: number): string => isoOf(day + shiftDays);
  const out = path.resolve(options.out);
  await mkdir(out, { recursive: true });
  const profiles = resolveProfiles();
  const fleet = buildFleet(seed, scale, clock);
  const techs = new TechPicker();
  const efficiency = new Map<string, number>();
  const technicians = shops.flatMap((s, i) => technicianRoster(stream(seed, "roster", i), s.code, s.technicians));
  for (const t of technicians) efficiency.set(t.id, techEfficiency(seed, t.id));
  const total = emptyTally();
  const files: ManifestFile[] = [];
  const entry = (file: string, kind: ManifestFile["kind"], profile: Profile, shop: string | null, written: WrittenFile, tally?: FaultTally): ManifestFile => {
    if (tally) addTally(total, tally);
    return {
      file, kind, profile: profile.id, shop, rows: written.rows, bytes: written.bytes, sha256: written.sha256,
      ...(tally ? { injected: nonZero(tally) } : {}),
    };
  };

  const hoursWriter = openProfileWriter(path.join(out, "telematics-hours.csv"), profiles.hours);
  const hoursTally = emptyTally();
  const hoursRng = stream(seed, "faults-hours");
  const shopFiles: ManifestFile[] = [];
  let done = 0;

  for (let s = 0; s < shops.length; s++) {
    const shop = shops[s]!;
    const chosen = profiles.shops[shop.code]!;
    const weather = simulateWeather(seed, shop, WEATHER_START, lastDay);
    const weatherWriter = openProfileWriter(path.join(out, `${shop.code}-weather.csv`), chosen.weather);
    const weatherDays = Array.from({ length: lastDay - WEATHER_START + 1 }, (_, i) => i);
    await writeAll(weatherWriter, weatherDays, (i) =>
      weatherWriter.write({ shop_code: shop.code, date: dateOf(WEATHER_START + i), tmin: fToC(weather.tminF[i]!), tmax: fToC(weather.tmaxF[i]!) }),
    );
    const weatherFile = await weatherWriter.close();

    const events: JobEvent[] = [];
    for (const m of fleet) {
      if (m.shop !== s) continue;
      const sim = simulateMachine(seed, m, weather, techs, clock);
      for (const e of sim.events) events.push(e);
      await writeAll(hoursWriter, sim.telematics, (r) => {
        let meter = r.meter;
        const u = hoursRng.float();
        if (meter >= 100 && u < injections.backwardsTypoPerReading) {
          meter = backwardsTypo(meter);
          hoursTally.backwardsHourTypo++;
        } else if (meter >= 100 && u < injections.backwardsTypoPerReading + injections.decimalShiftPerReading) {
          meter = decimalShift(meter);
          hoursTally.decimalShiftedHours++;
        }
        return hoursWriter.write({ serial: m.serial, reading_date: dateOf(r.day), hours: meter, source: "telematics" });
      });
      options.onProgress?.(++done, fleet.length);
    }
    const phantoms = phantomEvents(stream(seed, "phantoms", s), s, Math.round(events.length * injections.serialNotInMaster), techs, clock);
    events.push(...phantoms);
    events.sort((a, b) => a.openDay - b.openDay || (a.serial < b.serial ? -1 : a.serial > b.serial ? 1 : 0) || lineOrder(a) - lineOrder(b));

    const jobsWriter = openProfileWriter(path.join(out, `${shop.code}-jobs.csv`), chosen.jobs);
    const measWriter = openProfileWriter(path.join(out, `${shop.code}-measurements.csv`), chosen.measurements);
    const tally = emptyTally();
    tally.serialNotInMaster = phantoms.length;
    const faults = stream(seed, "faults", s);
    let roSeq = 0;
    let lineNo = 0;
    let prev: JobEvent | null = null;
    for (const e of events) {
      if (!prev || prev.serial !== e.serial || prev.openDay !== e.openDay) {
        roSeq++;
        lineNo = 0;
      }
      lineNo++;
      prev = e;
      const machine = e.machine >= 0 ? fleet[e.machine]! : null;
      const ctx: LineContext = {
        shopCode: shop.code, roNumber: String((s + 1) * 100000 + roSeq), lineNo, machine,
        family: machine?.family ?? familyOfSerial(e.serial), cylinders: machine?.cylinders ?? 4,
        labourRate: shop.labourRate, techEfficiency: efficiency.get(e.tech) ?? 1, shiftDays, lastDay,
      };
      const record = jobRecord(e, ctx);
      const faulty = injectJobFaults(faults, record, e, shop.blankCauseRate, tally, dateOf, yearOf(lastDay + shiftDays));
      const cells = renderRow(chosen.jobs, record);
      if (!jobsWriter.writeCells(cells)) await jobsWriter.drained();
      // lines with a rejected or repaired fault are never repeated, so each such fault reaches the loader once
      if (faults.chance(injections.duplicateLine) && !faulty) {
        tally.exactDuplicate++;
        if (!jobsWriter.writeCells(cells)) await jobsWriter.drained();
      }
      for (const row of measurementRows(seed, e, ctx)) if (!measWriter.write(row.record, row.drift)) await measWriter.drained();
    }
    const jobsFile = await jobsWriter.close();
    const measFile = await measWriter.close();
    shopFiles.push(
      entry(`${shop.code}-weather.csv`, "weather", chosen.weather, shop.code, weatherFile),
      entry(`${shop.code}-jobs.csv`, "jobs", chosen.jobs, shop.code, jobsFile, tally),
      entry(`${shop.code}-measurements.csv`, "measurements", chosen.measurements, shop.code, measFile),
    );
  }
  const hoursFile = await hoursWriter.close();

  const machinesWriter = openProfileWriter(path.join(out, "machines.csv"), profiles.machines);
  const machineTally = emptyTally();
  const modelRng = stream(seed, "faults-models");
  await writeAll(machinesWriter, fleet, (m) => machinesWriter.write(machineRecord(m, modelRng, machineTally, clock)));
  const machinesFile = await machinesWriter.close();

  files.push(
    entry("machines.csv", "machines", profiles.machines, null, machinesFile, machineTally),
    entry("telematics-hours.csv", "hours", profiles.hours, null, hoursFile, hoursTally),
    ...shopFiles,
  );
  const manifest: Manifest = {
    generator: "ironledger-demo", version: GENERATOR_VERSION, seed, scale, anchor: timeline.anchor,
    shift: { years: timeline.years, days: shiftDays, padDays: timeline.padDays },
    window: { from: timeline.from, to: timeline.to }, machines: fleet.length,
    files, injected: total, technicians,
  };
  await writeFile(path.join(out, "manifest.json"), `${JSON.stringify(manifest, null, 2)}\n`);
  return manifest;
}

const LINE_ORDER = { failure: 0, install: 1, pm: 2 } as const;
const lineOrder = (e: JobEvent): number => LINE_ORDER[e.lineType];

function familyOfSerial(serial: string): Machine["family"] {
  const code = serial.split("-")[0];
  return models.find((m) => m.code === code)?.family ?? "K26-4R";
}

/**
 * Applies the per-line faults to a canonical job record. Returns true when the line carries a fault the
 * loader rejects or repairs (anything but a blank cause), so that such a line is never also duplicated.
 * `dateOf` writes a generator day as the record does; future dates land after `lastYear`, the history's last.
 */
function injectJobFaults(
  rng: Rng, r: Record<string, unknown>, e: JobEvent, blankCauseRate: number, tally: FaultTally, dateOf: (day: number) => string, lastYear: number,
): boolean {
  const counted = (): number => Object.values(tally).reduce((a, b) => a + b, 0) - tally.blankCause;
  const before = counted();
  if (e.meterNote) tally.meterReplacement++;
  const meter = r.hour_meter as number;
  const u = rng.float();
  if (!e.meterNote && meter >= 100 && u < injections.backwardsTypoPerReading) {
    r.hour_meter = backwardsTypo(meter);
    tally.backwardsHourTypo++;
  } else if (!e.meterNote && meter >= 100 && u < injections.backwardsTypoPerReading + injections.decimalShiftPerReading) {
    r.hour_meter = decimalShift(meter);
    tally.decimalShiftedHours++;
  }
  const v = rng.float();
  if (v < injections.futureDate) {
    // an open line has no close date to mistype
    const column = rng.chance(0.5) || r.closed_date === null ? "opened_date" : "closed_date";
    r[column] = futureYear(String(r[column]), lastYear);
    tally.futureDate++;
  } else if (v < injections.futureDate + injections.closeBeforeOpen) {
    r.closed_date = dateOf(e.openDay - rng.int(1, 5));
    tally.closeBeforeOpen++;
  }
  if (e.lineType === "failure" && rng.chance(blankCauseRate)) {
    r.cause = "";
    tally.blankCause++;
  }
  if (rng.chance(injections.negativeLabour)) {
    r.labor_hours = -(r.labor_hours as number);
    tally.negativeLabour++;
  }
  return e.machine < 0 || counted() > before;
}

/** Lines on machines that are not in the registry (sold elsewhere, serviced here): "serial not in master". */
function phantomEvents(rng: Rng, shop: number, count: number, techs: TechPicker, clock: DemoClock): JobEvent[] {
  const month = (day: number): string => yymm(day + clock.shiftDays);
  return Array.from({ length: count }, (_, i) => {
    const model = rng.pick(models);
    const procs = processes.filter((p) => p.families.includes(model.family) && (!p.models || p.models.includes(model.code)));
    const proc = rng.pick(procs);
    const day = rng.int(WINDOW_START, clock.lastDay - 5);
    const hours = rng.uniform(50, 4000);
    const detail = componentDetail[proc.code]!;
    return {
      machine: -1, serial: `${model.code}-${month(day - rng.int(200, 900))}${90000 + shop * 1000 + i}`, shop, openDay: day, closeDay: day + rng.int(0, 2),
      trueHours: hours, meter: hours, meterNote: "", lineType: "failure", component: proc.code, mode: pickMode(rng, detail), comeback: false,
      tech: techs.pick(rng, shop), payType: "customer", orderDay: day, receivedDay: day + rng.int(0, 2), backOrdered: false,
      ambientF: null, pmOp: -1, socketCorroded: false, lot: `${detail.lotPrefix}-${month(day - 30)}`, seed: rng.nextUint32(),
    } satisfies JobEvent;
  });
}

function machineRecord(m: Machine, rng: Rng, tally: FaultTally, clock: DemoClock): Record<string, string | number | boolean | null> {
  const dateOf = (day: number): string => isoOf(day + clock.shiftDays);
  let model: string = m.model;
  const u = rng.float();
  if (u < injections.unknownModel) {
    model = unknownModel(rng, m.model);
    tally.unknownModel++;
    tally.modelVariant++;
  } else if (u < injections.modelVariant) {
    model = modelVariant(rng, m.model);
    tally.modelVariant++;
  }
  const heater = m.blockHeaterDay !== null && m.blockHeaterDay <= clock.lastDay;
  return {
    serial: m.serial, model_code: model, engine_serial: m.engineSerial, build_date: dateOf(m.buildDay), delivery_date: dateOf(m.deliveryDay),
    delivery_hours: m.deliveryHours, home_shop: shops[m.shop]!.code, heater_plug_lot: m.plugLot ?? "", block_heater_fitted: heater,
    block_heater_date: heater ? dateOf(m.blockHeaterDay!) : null,
    warranty_base_months: warranty.baseMonths, warranty_base_hours: warranty.baseHours,
    warranty_engine_months: warranty.engineMonths, warranty_engine_hours: warranty.engineHours,
  };
}
