/**
 * The generator's own shop-floor detail, where the scenario is silent: labour operations and standard hours,
 * invented part numbers and prices, supplier-lot prefixes, free-text complaint/cause/correction wording,
 * failure-mode mixes, and invented technician names. Part numbers use the invented maker prefix "KW".
 */
import type { Rng } from "./prng.js";
import type { EngineFamily } from "./scenario.js";

export interface ComponentDetail {
  laborOp: string;
  standardHours: Record<EngineFamily, number>;
  partNumber: (family: EngineFamily) => string;
  partDescription: string;
  partQty: (cylinders: number) => number;
  unitCost: number;
  lotPrefix: string;
  modes: readonly [string, number][];
  complaints: readonly string[];
  causes: Record<string, readonly string[]>;
  corrections: readonly string[];
}

const std = (k18: number, k26: number, k38: number): Record<EngineFamily, number> => ({ "K18-3G": k18, "K26-4R": k26, "K38-4H": k38 });
const fam = (f: EngineFamily): string => f.slice(1, 3);
const one = (): number => 1;

export const componentDetail: Record<string, ComponentDetail> = {
  "ENG-CSA-HPLUG": {
    laborOp: "CSA-HP-R", standardHours: std(1.2, 1.8, 1.8), partNumber: (f) => `KW-${fam(f)}-HP410`, partDescription: "Heater plug", partQty: (c) => c, unitCost: 38, lotPrefix: "OC",
    modes: [["OPEN", 1]],
    complaints: ["Hard to start when cold", "Long crank on cold mornings, white smoke", "Will not start below freezing", "Wait-to-start lamp cycles, engine won't fire cold"],
    causes: { OPEN: ["Heater plug open circuit", "Plugs open, no current draw", "Open heater plug found on test"] },
    corrections: ["Replaced heater-plug set", "Replaced heater plugs, cleared codes, verified start"],
  },
  "ENG-CSA-GRID": {
    laborOp: "CSA-GH-R", standardHours: std(1.5, 1.5, 1.5), partNumber: () => "KW-38-GH220", partDescription: "Intake grid heater", partQty: one, unitCost: 265, lotPrefix: "GH",
    modes: [["OPEN", 1]],
    complaints: ["Hard to start when cold", "Cold start needs several attempts", "Heavy smoke after cold start"],
    causes: { OPEN: ["Grid heater element open", "Grid heater burnt out"] },
    corrections: ["Replaced intake grid heater", "Replaced grid heater and gasket"],
  },
  "ENG-CSA-RELAY": {
    laborOp: "CSA-RL-R", standardHours: std(0.6, 0.6, 0.6), partNumber: (f) => `KW-${fam(f)}-PR050`, partDescription: "Preheat relay", partQty: one, unitCost: 46, lotPrefix: "PR",
    modes: [["OPEN", 0.7], ["SHORT", 0.3]],
    complaints: ["No preheat, hard start cold", "Wait-to-start lamp never lights"],
    causes: { OPEN: ["Preheat relay failed open", "Preheat fuse blown"], SHORT: ["Preheat relay contacts welded", "Relay coil shorted"] },
    corrections: ["Replaced preheat relay and fuse", "Replaced relay, tested rail voltage"],
  },
  "ELE-STR-MOTOR": {
    laborOp: "ELE-ST-R", standardHours: std(1.6, 2.0, 2.4), partNumber: (f) => `KW-${fam(f)}-ST300`, partDescription: "Starter motor", partQty: one, unitCost: 410, lotPrefix: "ST",
    modes: [["WEAR", 0.7], ["SHORT", 0.3]],
    complaints: ["Clicks, no crank", "Slow crank", "Starter grinds"],
    causes: { WEAR: ["Starter brushes worn", "Starter drive worn"], SHORT: ["Starter solenoid shorted", "Armature shorted"] },
    corrections: ["Replaced starter motor"],
  },
  "ELE-PWR-BATT": {
    laborOp: "ELE-BT-R", standardHours: std(0.4, 0.4, 0.5), partNumber: (f) => `KW-${fam(f)}-BT120`, partDescription: "Battery", partQty: one, unitCost: 185, lotPrefix: "BT",
    modes: [["WEAR", 1]],
    complaints: ["No crank in the morning", "Battery flat overnight", "Slow crank when cold"],
    causes: { WEAR: ["Battery failed load test", "Weak cell in battery", "Battery sulphated"] },
    corrections: ["Replaced battery", "Replaced battery, cleaned terminals"],
  },
  "ELE-PWR-ALT": {
    laborOp: "ELE-AL-R", standardHours: std(1.2, 1.5, 1.8), partNumber: (f) => `KW-${fam(f)}-AL080`, partDescription: "Alternator", partQty: one, unitCost: 360, lotPrefix: "AL",
    modes: [["WEAR", 0.8], ["SHORT", 0.2]],
    complaints: ["Charge lamp on", "Battery not charging"],
    causes: { WEAR: ["Alternator bearing worn", "Regulator failed"], SHORT: ["Diode pack shorted"] },
    corrections: ["Replaced alternator"],
  },
  "ELE-HAR-CONN": {
    laborOp: "ELE-HR-R", standardHours: std(1.5, 1.5, 1.8), partNumber: (f) => `KW-${fam(f)}-WH010`, partDescription: "Harness section", partQty: one, unitCost: 95, lotPrefix: "WH",
    modes: [["OPEN", 0.35], ["SHORT", 0.25], ["CORROSION", 0.3], ["DAMAGE", 0.1]],
    complaints: ["Intermittent electrical fault", "Gauges drop out", "Machine shuts down randomly"],
    causes: { OPEN: ["Broken wire in harness"], SHORT: ["Harness chafed, shorted to frame"], CORROSION: ["Connector pins corroded"], DAMAGE: ["Harness cut by attachment"] },
    corrections: ["Repaired harness section", "Replaced connector and pins"],
  },
  "ENG-FUE-INJ": {
    laborOp: "ENG-IN-R", standardHours: std(2.4, 3.0, 3.5), partNumber: (f) => `KW-${fam(f)}-IN600`, partDescription: "Injector", partQty: (c) => c, unitCost: 210, lotPrefix: "IN",
    modes: [["WEAR", 0.6], ["LEAK", 0.4]],
    complaints: ["Rough running, smoke", "Loss of power", "Misfire"],
    causes: { WEAR: ["Injector nozzles worn", "Poor spray pattern"], LEAK: ["Injector leaking back", "Injector dribbling"] },
    corrections: ["Replaced injector set"],
  },
  "ENG-BLK-RING": {
    laborOp: "ENG-RG-O", standardHours: std(12, 16, 18), partNumber: (f) => `KW-${fam(f)}-RK900`, partDescription: "Ring and liner kit", partQty: one, unitCost: 1450, lotPrefix: "RK",
    modes: [["WEAR", 1]],
    complaints: ["Blow-by, oil consumption", "Hard starting, low power", "Blue smoke"],
    causes: { WEAR: ["Low compression all cylinders, rings worn", "Cylinder wear, rings worn"] },
    corrections: ["Overhauled engine, rings and liners", "Re-ringed engine"],
  },
  "ENG-COO-PUMP": {
    laborOp: "ENG-WP-R", standardHours: std(2.8, 3.5, 4.0), partNumber: (f) => `KW-${fam(f)}-WP150`, partDescription: "Coolant pump", partQty: one, unitCost: 240, lotPrefix: "WP",
    modes: [["LEAK", 1]],
    complaints: ["Coolant leak", "Overheating"],
    causes: { LEAK: ["Coolant pump seal leaking", "Weep hole leaking"] },
    corrections: ["Replaced coolant pump and gasket"],
  },
  "ENG-COO-BLKHTR": {
    laborOp: "ENG-BH-I", standardHours: std(1.5, 1.5, 1.5), partNumber: (f) => `KW-${fam(f)}-BH700`, partDescription: "Engine block heater kit", partQty: one, unitCost: 175, lotPrefix: "BH",
    modes: [["OTHER", 1]],
    complaints: ["Install engine block heater"],
    causes: { OTHER: ["Customer request, cold-start aid"] },
    corrections: ["Installed engine block heater and cord"],
  },
  "ENG-AIR-TURBO": {
    laborOp: "ENG-TC-R", standardHours: std(4, 4, 4), partNumber: () => "KW-38-TC500", partDescription: "Turbocharger", partQty: one, unitCost: 980, lotPrefix: "TC",
    modes: [["WEAR", 0.5], ["LEAK", 0.3], ["CRACK", 0.2]],
    complaints: ["Loss of power, whistling", "Oil in intake", "Black smoke"],
    causes: { WEAR: ["Turbo shaft play"], LEAK: ["Turbo oil seal leaking"], CRACK: ["Turbine housing cracked"] },
    corrections: ["Replaced turbocharger"],
  },
  "HYD-PMP-MAIN": {
    laborOp: "HYD-PM-R", standardHours: std(4, 5, 6), partNumber: (f) => `KW-${fam(f)}-HP800`, partDescription: "Hydraulic pump", partQty: one, unitCost: 1650, lotPrefix: "HY",
    modes: [["WEAR", 0.7], ["LEAK", 0.3]],
    complaints: ["Slow hydraulics", "Pump noise", "Loss of lift"],
    causes: { WEAR: ["Pump worn, low flow"], LEAK: ["Pump shaft seal leaking"] },
    corrections: ["Replaced main hydraulic pump"],
  },
  "HYD-LIN-HOSE": {
    laborOp: "HYD-HS-R", standardHours: std(0.8, 0.8, 1.0), partNumber: (f) => `KW-${fam(f)}-HS200`, partDescription: "Hydraulic hose", partQty: one, unitCost: 68, lotPrefix: "HS",
    modes: [["LEAK", 0.6], ["CRACK", 0.25], ["DAMAGE", 0.15]],
    complaints: ["Hydraulic oil leak", "Hose burst"],
    causes: { LEAK: ["Hose leaking at crimp"], CRACK: ["Hose cover cracked, burst"], DAMAGE: ["Hose pinched by operator"] },
    corrections: ["Replaced hydraulic hose"],
  },
  "UND-TRK-ROLLER": {
    laborOp: "UND-TR-R", standardHours: std(2.5, 2.5, 2.5), partNumber: () => "KW-38-TR330", partDescription: "Track roller", partQty: one, unitCost: 290, lotPrefix: "TR",
    modes: [["WEAR", 0.8], ["LEAK", 0.2]],
    complaints: ["Track roller noise", "Roller seized"],
    causes: { WEAR: ["Roller bearing worn"], LEAK: ["Roller seal leaking oil"] },
    corrections: ["Replaced track roller"],
  },
};

export const pmDetail = {
  component: "SVC-PM",
  ops: [
    { every: 4, op: "PM-1000", standardHours: 4.0, kit: "KW-PM-1000", description: "1,000 h service kit", cost: 420 },
    { every: 2, op: "PM-500", standardHours: 2.5, kit: "KW-PM-500", description: "500 h service kit", cost: 240 },
    { every: 1, op: "PM-250", standardHours: 1.5, kit: "KW-PM-250", description: "250 h service kit", cost: 130 },
  ],
};

export function pickMode(rng: Rng, detail: ComponentDetail): string {
  return detail.modes[rng.weightedIndex(detail.modes.map(([, w]) => w))]![0];
}

const FIRST = ["Wren", "Tobin", "Marisol", "Idris", "Keld", "Odessa", "Bram", "Sefa", "Lorcan", "Yeva", "Otto", "Pim", "Junia", "Cato", "Rhosyn", "Teodor", "Amara", "Fenn", "Lior", "Saskia"];
const LAST = ["Boltwhistle", "Sprocketson", "Gearhart-Nill", "Ratchetby", "Torquill", "Camshire", "Pistova", "Flangewood", "Shimwell", "Grommetry", "Bushingham", "Cogvane", "Wrenchley", "Axelby", "Sparkwright", "Manifoldt"];

/** Technicians of a shop: ids "S5-T1".."S5-Tn" with invented, clearly fictional display names. */
export function technicianRoster(rng: Rng, shop: string, count: number): { id: string; shop: string; name: string }[] {
  return Array.from({ length: count }, (_, i) => ({ id: `${shop}-T${i + 1}`, shop, name: `${rng.pick(FIRST)} ${rng.pick(LAST)}` }));
}
