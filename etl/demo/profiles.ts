/**
 * Which mapping profile (etl/profiles/*.json, the ETL's own) each demo export is written through, so the
 * ETL can read every file back. Each choice is checked against the quirk the scenario plants in that shop:
 * a profile that cannot carry the quirk fails loudly instead of being used silently.
 */
import { readdirSync, readFileSync } from "node:fs";
import path from "node:path";
import { fileURLToPath } from "node:url";
import { profileSchema, type ExportKind, type Profile } from "../profiles/profile-schema.js";

export const PROFILE_DIR = path.resolve(path.dirname(fileURLToPath(import.meta.url)), "../profiles");

type ShopKind = "jobs" | "measurements" | "weather";

interface ShopSystem {
  profiles: Record<ShopKind, string>;
  /** what the profile must do to carry the shop's planted quirk */
  requires: Partial<Record<ShopKind, (p: Profile) => boolean>>;
}

const celsius = (p: Profile): boolean => p.units.temperature === "C";
const system = (name: string, weather = `${name}-weather`): Record<ShopKind, string> => ({
  jobs: `${name}-jobs`,
  measurements: `${name}-measurements`,
  weather,
});

/**
 * S1, S4, S5 and S8 run the month-first °F system; S2 exports in °C (the generic layout); S3 and S7 run the
 * system that writes compression without a unit and resistance as the meter shows it ("42k", "OL"), whose
 * weather comes in the month-first °F layout because that system exports none; S6 runs the day-first,
 * decimal-comma system.
 */
export const shopSystems: Record<string, ShopSystem> = {
  S1: { profiles: system("alder"), requires: {} },
  S2: { profiles: system("generic"), requires: { jobs: celsius, weather: celsius } },
  S3: { profiles: system("cedar", "alder-weather"), requires: { measurements: (p) => p.units.compression === "sniff" } },
  S4: { profiles: system("alder"), requires: {} },
  S5: { profiles: system("alder"), requires: {} },
  S6: {
    profiles: system("birch"),
    requires: { jobs: (p) => p.dateFormat === "dmy" && p.decimalComma, weather: (p) => p.dateFormat === "dmy", measurements: (p) => p.decimalComma },
  },
  S7: { profiles: system("cedar", "alder-weather"), requires: { measurements: (p) => p.units.resistance === "suffixed" } },
  S8: { profiles: system("alder"), requires: {} },
};

export const groupProfiles = { machines: "generic-machines", hours: "generic-hours" } as const;

export function loadProfiles(dir = PROFILE_DIR): Map<string, Profile> {
  const out = new Map<string, Profile>();
  for (const f of readdirSync(dir).filter((n) => n.endsWith(".json")).sort()) {
    const parsed = profileSchema.parse(JSON.parse(readFileSync(path.join(dir, f), "utf8")));
    out.set(parsed.id, parsed);
  }
  return out;
}

export interface ProfileSet {
  machines: Profile;
  hours: Profile;
  shops: Record<string, Record<ShopKind, Profile>>;
}

export function resolveProfiles(available = loadProfiles()): ProfileSet {
  const choose = (id: string, kind: ExportKind, ok: (p: Profile) => boolean, slot: string): Profile => {
    const p = available.get(id);
    if (!p) throw new Error(`${slot}: profile ${id} is not in etl/profiles`);
    if (p.kind !== kind) throw new Error(`${slot}: profile ${id} is a ${p.kind} profile, not ${kind}`);
    if (!ok(p)) throw new Error(`${slot}: profile ${id} cannot carry the shop's planted quirk`);
    return p;
  };
  const always = (): boolean => true;
  const shops: ProfileSet["shops"] = {};
  for (const [shop, sys] of Object.entries(shopSystems)) {
    const pick = (kind: ShopKind): Profile => choose(sys.profiles[kind], kind, sys.requires[kind] ?? always, `${shop} ${kind}`);
    shops[shop] = { jobs: pick("jobs"), measurements: pick("measurements"), weather: pick("weather") };
  }
  return {
    machines: choose(groupProfiles.machines, "machines", always, "machines"),
    hours: choose(groupProfiles.hours, "hours", always, "telematics hours"),
    shops,
  };
}
