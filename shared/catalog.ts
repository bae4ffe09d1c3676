/**
 * Ironledger's reference codes: component hierarchy (system › assembly › component), failure modes,
 * measurement kinds with their canonical units. The warehouse seeds its dimensions from these, the ETL
 * maps shop codes onto them, and the client labels with them.
 */
export interface ComponentDef {
  code: string;
  name: string;
  system: string;
  assembly: string;
  /** true for the cold-start aids the cluster finder scans by default */
  coldStartAid?: boolean;
}

/** The heater-plug set: the part the exposure aggregate tracks by fitted lot. */
export const HEATER_PLUG = "ENG-CSA-HPLUG";

export const components: readonly ComponentDef[] = [
  { code: "ENG-CSA-HPLUG", name: "Heater-plug set", system: "Engine", assembly: "Cold-start aid", coldStartAid: true },
  { code: "ENG-CSA-GRID", name: "Intake grid heater", system: "Engine", assembly: "Cold-start aid", coldStartAid: true },
  { code: "ENG-CSA-RELAY", name: "Preheat relay / fuse", system: "Engine", assembly: "Cold-start aid", coldStartAid: true },
  { code: "ELE-STR-MOTOR", name: "Starter motor", system: "Electrical", assembly: "Starting" },
  { code: "ELE-PWR-BATT", name: "Battery", system: "Electrical", assembly: "Power supply" },
  { code: "ELE-PWR-ALT", name: "Alternator", system: "Electrical", assembly: "Power supply" },
  { code: "ELE-HAR-CONN", name: "Harness / connector", system: "Electrical", assembly: "Harness" },
  { code: "ENG-FUE-INJ", name: "Injector set", system: "Engine", assembly: "Fuel injection" },
  { code: "ENG-BLK-RING", name: "Rings / cylinder wear", system: "Engine", assembly: "Block and pistons" },
  { code: "ENG-COO-PUMP", name: "Coolant pump", system: "Engine", assembly: "Cooling" },
  { code: "ENG-COO-BLKHTR", name: "Engine block heater", system: "Engine", assembly: "Cooling" },
  { code: "ENG-AIR-TURBO", name: "Turbocharger", system: "Engine", assembly: "Air intake" },
  { code: "HYD-PMP-MAIN", name: "Hydraulic pump", system: "Hydraulics", assembly: "Pump" },
  { code: "HYD-LIN-HOSE", name: "Hydraulic hose", system: "Hydraulics", assembly: "Lines" },
  { code: "UND-TRK-ROLLER", name: "Track roller", system: "Undercarriage", assembly: "Track" },
  { code: "SVC-PM", name: "Planned maintenance", system: "Service", assembly: "Planned maintenance" },
];

export const failureModes = [
  { code: "OPEN", name: "Open circuit" },
  { code: "SHORT", name: "Short circuit" },
  { code: "WEAR", name: "Wear" },
  { code: "LEAK", name: "Leak" },
  { code: "CRACK", name: "Crack / breakage" },
  { code: "NFF", name: "No fault found" },
  { code: "DAMAGE", name: "Customer damage" },
  { code: "CORROSION", name: "Corrosion" },
  { code: "OTHER", name: "Other" },
] as const;

export const engineFamilies = [
  { code: "K18-3G", description: "1.8 L 3-cylinder, individually wired glow plugs, under 19 kW", coldStartAid: "glow_plugs", cylinders: 3 },
  { code: "K26-4R", description: "2.6 L 4-cylinder, glow plugs on a rail bar fed by one wire", coldStartAid: "glow_plugs", cylinders: 4 },
  { code: "K38-4H", description: "3.8 L 4-cylinder, intake grid heater", coldStartAid: "grid_heater", cylinders: 4 },
] as const;

export const modelLines = [
  { code: "WRN", name: "Wrenlet mini excavator", engineFamily: "K18-3G" },
  { code: "DLV", name: "Delvane compact excavator", engineFamily: "K26-4R" },
  { code: "SKL", name: "Skeller skid-steer", engineFamily: "K26-4R" },
  { code: "TMB", name: "Tumbrel compact wheel loader", engineFamily: "K26-4R" },
  { code: "TRN", name: "Trundle compact track loader", engineFamily: "K38-4H" },
  { code: "GRS", name: "Grister track loader", engineFamily: "K38-4H" },
] as const;

/** Measurement kinds and the one canonical unit each is stored in. */
export const measurementKinds = [
  { code: "compression", name: "Cylinder compression", unit: "psi" },
  { code: "plug_resistance", name: "Heater-plug resistance", unit: "ohm" },
  { code: "rail_voltage", name: "Preheat rail voltage", unit: "V" },
  { code: "battery_voltage", name: "Battery voltage", unit: "V" },
  // the conditions and checks of a bench sheet: not gauge readings, but they travel with them (same line, same
  // provenance) and must stay attached when the shop's export of the line arrives, so they are readings too
  { code: "ambient_temperature", name: "Ambient temperature at the test", unit: "C" },
  /** 0 = cold (not run since it cooled down), 1 = warm */
  { code: "engine_state", name: "Engine state at the test", unit: "state" },
  /** 0 = the dash did not ask to wait, 1 = the wait-to-start lamp was lit */
  { code: "preheat_lamp", name: "Wait-to-start lamp", unit: "flag" },
  /** per plug: 0 = no heat, 1 = heats; a plug not tested has no reading */
  { code: "bench_test", name: "Heater-plug bench test", unit: "flag" },
] as const;

export const payTypes = ["customer", "warranty", "internal", "goodwill"] as const;
export const lineTypes = ["failure", "pm", "return_for_parts", "install"] as const;
