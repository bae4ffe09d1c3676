/**
 * The invented demo world of ../shared/SCENARIO.md as data: shops and climate, fleet mix, failure processes,
 * planted signals and injected faults. Temperatures here are °F (the scenario's thresholds); the writer converts.
 * Labour standards, prices, part numbers and texts are the generator's own invention where the scenario is silent.
 */
import { dayOf } from "./calendar.js";

export const WINDOW_START = dayOf("2020-07-01");
export const WINDOW_END = dayOf("2025-06-30");
export const BUILD_START = dayOf("2020-03-01");
export const BUILD_END = dayOf("2024-12-31");
/** Weather is simulated (and exported) from here, so machines delivered before the window see real days. */
export const WEATHER_START = dayOf("2020-03-01");
export const WEATHER_BURN_IN_DAYS = 60;

export type EngineFamily = "K18-3G" | "K26-4R" | "K38-4H";
export type ModelCode = "WRN" | "DLV" | "SKL" | "TMB" | "TRN" | "GRS";

export interface ShopDef {
  code: string;
  town: string;
  zone: string;
  djfMeanTminF: number;
  julMeanTminF: number;
  sigmaF: number;
  machines: number;
  cold: boolean;
  /** mean Tmax − Tmin, °F (invented: wide in the desert, narrow on the coast) */
  diurnalRangeF: number;
  technicians: number;
  /** labour rate per hour in the group currency (invented) */
  labourRate: number;
  /** share of deliveries with a block heater fitted at delivery */
  blockHeaterAtDelivery: number;
  blankCauseRate: number;
}

export const shops: readonly ShopDef[] = [
  { code: "S1", town: "Skarvik Junction", zone: "subarctic continental", djfMeanTminF: -4, julMeanTminF: 52, sigmaF: 10, machines: 500, cold: true, diurnalRangeF: 20, technicians: 5, labourRate: 132, blockHeaterAtDelivery: 0.3, blankCauseRate: 0.08 },
  { code: "S2", town: "Brisholt", zone: "cold continental", djfMeanTminF: 6, julMeanTminF: 58, sigmaF: 9, machines: 560, cold: true, diurnalRangeF: 19, technicians: 6, labourRate: 128, blockHeaterAtDelivery: 0.3, blankCauseRate: 0.08 },
  { code: "S3", town: "Ottermere", zone: "cold lake-effect", djfMeanTminF: 14, julMeanTminF: 60, sigmaF: 8, machines: 620, cold: true, diurnalRangeF: 16, technicians: 6, labourRate: 136, blockHeaterAtDelivery: 0.3, blankCauseRate: 0.08 },
  { code: "S4", town: "Lindqvale", zone: "cool continental", djfMeanTminF: 23, julMeanTminF: 63, sigmaF: 8, machines: 560, cold: false, diurnalRangeF: 18, technicians: 5, labourRate: 124, blockHeaterAtDelivery: 0.1, blankCauseRate: 0.2 },
  { code: "S5", town: "Maplewick", zone: "maritime cool", djfMeanTminF: 30, julMeanTminF: 56, sigmaF: 6, machines: 500, cold: false, diurnalRangeF: 13, technicians: 5, labourRate: 140, blockHeaterAtDelivery: 0, blankCauseRate: 0.08 },
  { code: "S6", town: "Dorran Bay", zone: "mild coastal", djfMeanTminF: 37, julMeanTminF: 55, sigmaF: 5, machines: 440, cold: false, diurnalRangeF: 11, technicians: 4, labourRate: 138, blockHeaterAtDelivery: 0, blankCauseRate: 0.08 },
  { code: "S7", town: "Redgulch Mesa", zone: "high desert", djfMeanTminF: 17, julMeanTminF: 57, sigmaF: 10, machines: 380, cold: true, diurnalRangeF: 28, technicians: 4, labourRate: 120, blockHeaterAtDelivery: 0.3, blankCauseRate: 0.08 },
  { code: "S8", town: "Sunmarsh", zone: "humid subtropical", djfMeanTminF: 44, julMeanTminF: 74, sigmaF: 7, machines: 440, cold: false, diurnalRangeF: 17, technicians: 5, labourRate: 126, blockHeaterAtDelivery: 0, blankCauseRate: 0.08 },
];

export const models: readonly { code: ModelCode; family: EngineFamily; machines: number }[] = [
  { code: "WRN", family: "K18-3G", machines: 600 },
  { code: "DLV", family: "K26-4R", machines: 850 },
  { code: "SKL", family: "K26-4R", machines: 1050 },
  { code: "TMB", family: "K26-4R", machines: 400 },
  { code: "TRN", family: "K38-4H", machines: 700 },
  { code: "GRS", family: "K38-4H", machines: 400 },
];

export const cylinders: Record<EngineFamily, number> = { "K18-3G": 3, "K26-4R": 4, "K38-4H": 4 };

export const delivery = { lagMedianDays: 60, lagSigmaLog: 0.5, lagMinDays: 14, lagMaxDays: 240, hoursMin: 0.5, hoursMax: 5 };

export const usage = { annualMedianHours: 650, annualSigmaLog: 0.45, winterFactorCold: 0.6, winterFactorOther: 0.9 };

export const readings = { pmIntervalHours: 250, pmJitterHours: 30, telematicsShare: 0.4 };

export const warranty = { baseMonths: 24, baseHours: 2000, engineMonths: 36, engineHours: 3000 };

/** Cold factor on the hazard as a function of the day's Tmin (°F). */
export type ColdFactor = (tminF: number) => number;

/** Stage-1 wear factor w(Tmin) of a good cold-start aid. */
export const coldStartWear: ColdFactor = (t) => (t >= 32 ? 1 : t >= 20 ? 1.2 : t >= 0 ? 1.5 : 2);
/** Stage-1 wear factor of lot BT-2109: much steeper. */
export const badLotWear: ColdFactor = (t) => (t >= 32 ? 1 : t >= 20 ? 3 : t >= 0 ? 8 : 12);
/** Stage-2 daily manifestation probability q(Tmin) of a latent cold-start-aid failure. */
export const manifestation = (t: number): number => (t < 20 ? 0.6 : t < 32 ? 0.05 : t < 45 ? 0.003 : 0.0005);

export interface ComponentProcess {
  code: string;
  families: readonly EngineFamily[];
  /** restricts to these model lines (track rollers) */
  models?: readonly ModelCode[];
  beta: number;
  eta: number;
  coldFactor?: ColdFactor;
  /** intrinsic failure, then daily manifestation q(Tmin) */
  twoStage?: boolean;
  engineCoverage: boolean;
}

const ALL: readonly EngineFamily[] = ["K18-3G", "K26-4R", "K38-4H"];

export const processes: readonly ComponentProcess[] = [
  { code: "ENG-CSA-HPLUG", families: ["K18-3G", "K26-4R"], beta: 1.8, eta: 9000, coldFactor: coldStartWear, twoStage: true, engineCoverage: true },
  { code: "ENG-CSA-GRID", families: ["K38-4H"], beta: 1.3, eta: 14000, coldFactor: coldStartWear, twoStage: true, engineCoverage: true },
  { code: "ENG-CSA-RELAY", families: ALL, beta: 1.0, eta: 25000, engineCoverage: true },
  { code: "ELE-STR-MOTOR", families: ALL, beta: 2.0, eta: 8000, coldFactor: (t) => (t < 20 ? 1.3 : 1), engineCoverage: false },
  { code: "ELE-PWR-BATT", families: ALL, beta: 2.5, eta: 5500, coldFactor: (t) => (t < 0 ? 1.5 : 1), engineCoverage: false },
  { code: "ELE-PWR-ALT", families: ALL, beta: 2.0, eta: 10000, engineCoverage: false },
  { code: "ENG-FUE-INJ", families: ALL, beta: 1.5, eta: 12000, engineCoverage: true },
  { code: "ENG-BLK-RING", families: ALL, beta: 3.5, eta: 14000, engineCoverage: true },
  { code: "ENG-COO-PUMP", families: ALL, beta: 1.6, eta: 11000, engineCoverage: true },
  { code: "ENG-AIR-TURBO", families: ["K38-4H"], beta: 2.0, eta: 12000, engineCoverage: true },
  { code: "HYD-PMP-MAIN", families: ALL, beta: 2.2, eta: 12000, engineCoverage: false },
  { code: "HYD-LIN-HOSE", families: ALL, beta: 1.0, eta: 3000, engineCoverage: false },
  { code: "UND-TRK-ROLLER", families: ["K38-4H"], models: ["TRN", "GRS"], beta: 2.5, eta: 4500, engineCoverage: false },
  { code: "ELE-HAR-CONN", families: ALL, beta: 1.0, eta: 18000, engineCoverage: false },
];

export const badLot = {
  lot: "BT-2109",
  supplier: "Brannet Thermal",
  family: "K26-4R" as EngineFamily,
  buildFrom: dayOf("2021-09-01"),
  buildTo: dayOf("2021-12-31"),
  eta: 4000,
  beta: 1.8,
};
/** Good heater-plug lots come from this invented supplier, one lot code per month: "OC-YYMM". */
export const goodPlugSupplier = { name: "Ostrel Ceramics", lotPrefix: "OC" };

export const comebacks = {
  p: 0.04,
  minDays: 2,
  maxDays: 25,
  /** stay inside the 100 engine-hour comeback window of the KPI definition */
  maxHours: 95,
  byTech: { "S5-T2": 0.3 } as Record<string, number>,
  byShop: { S5: 0.08 } as Record<string, number>,
  /** share of a shop's lines done by a named technician; the rest share evenly */
  techShare: { "S5-T2": 0.3, "S3-T4": 0.25 } as Record<string, number>,
};

export const backOrders = {
  winterFrom: dayOf("2022-11-01"),
  winterTo: dayOf("2023-02-28"),
  winterFamily: "K26-4R" as EngineFamily,
  winterP: 0.7,
  winterMedianDays: 55,
  winterSigmaLog: 0.35,
  winterCapDays: 120,
  otherP: 0.08,
  otherMedianDays: 6,
  otherSigmaLog: 0.5,
  otherCapDays: 45,
  stockedMaxDays: 2,
  /** cold shops: share of back-ordered cold-start-aid lines that also get a block-heater install */
  workaroundShare: 0.6,
  socketCorrodedAgeMonths: 24,
  socketCorrodedShare: 0.3,
  socketCorrodedExtraHours: 1.0,
  blockHeaterStandardHours: 1.5,
  /** baseline retrofits per cold-shop machine (without a heater) per winter */
  retrofitRatePerWinter: 0.0015,
};

export const quirks = {
  driftTech: "S3-T4",
  kpaPerPsi: 6.895,
  ambientSpreadF: 10,
};

/** Injected bad rows (SCENARIO.md "Injected bad rows"). Rates are per job line unless said otherwise. */
export const injections = {
  duplicateLine: 0.02,
  backwardsTypoPerReading: 0.005,
  meterReplacements: 10,
  futureDate: 0.002,
  closeBeforeOpen: 0.003,
  /** per machine in the registry; `unknownModel` is part of `modelVariant` */
  modelVariant: 0.01,
  unknownModel: 0.003,
  serialNotInMaster: 0.005,
  decimalShiftPerReading: 0.002,
  negativeLabour: 0.001,
};

export const spn = { plugOpen: 520210, relayOpen: 520211, gridOpen: 520212 };
