import { engineFamilies, modelLines } from "../../shared/catalog.js";
import { checkRange, FieldReader, mapCode } from "./fields.js";
import { reject } from "./reject.js";
import { normaliseCode, normaliseIdentifier } from "./values.js";

const modelByCode = new Map<string, (typeof modelLines)[number]>(modelLines.map((m) => [m.code, m]));

export interface MachineStage {
  serial: string;
  model_code: string;
  model_line: string;
  engine_family: string;
  cold_start_aid: string;
  engine_serial: string | null;
  build_date: string | null;
  delivery_date: string | null;
  delivery_hours: number | null;
  home_shop: string;
  /** the day the machine came to home_shop (optional): the date of a move, when the row names another home shop than the warehouse's */
  home_shop_since: string | null;
  heater_plug_lot: string | null;
  block_heater_fitted: boolean;
  block_heater_date: string | null;
  warranty_base_months: number | null;
  warranty_base_hours: number | null;
  warranty_engine_months: number | null;
  warranty_engine_hours: number | null;
}

/** A model code as written ("skl ", "S-KL", a shop's own code) → Ironledger's model line, or null. */
export function resolveModel(table: Record<string, string>, raw: string): (typeof modelLines)[number] | null {
  const mapped = mapCode(table, raw);
  return modelByCode.get(mapped) ?? modelByCode.get(mapped.replace(/[-\s]+/g, "")) ?? null;
}

/** One machine-master row: normalised serial, model line and engine family from the catalog, warranty terms. */
export function transformMachine(f: FieldReader, shop: string | undefined): MachineStage {
  const rawModel = f.text("model_code")!;
  const model = resolveModel(f.profile.codes.model, rawModel);
  if (model === null) reject("unknown_code", `model code "${rawModel}" is not in this shop's code table or Ironledger's model list`);
  const family = engineFamilies.find((e) => e.code === model.engineFamily)!;
  const built = f.date("build_date", "build date");
  const delivered = f.date("delivery_date", "delivery date");
  if (built !== null && delivered !== null && delivered < built) reject("delivered_before_built", `delivered ${delivered} before it was built ${built}`);
  const deliveryHours = f.hours("delivery_hours", "delivery hours");
  checkRange(deliveryHours, "delivery hours", "h", 100_000);
  const months = (c: string, label: string) => {
    const v = f.integer(c, label, 0, 240);
    return v;
  };
  const hours = (c: string, label: string) => {
    const v = f.integer(c, label, 0, 100_000);
    return v;
  };
  const engineSerial = f.text("engine_serial");
  const lot = f.text("heater_plug_lot");
  const stage: MachineStage = {
    serial: normaliseIdentifier(f.text("serial")!),
    model_code: normaliseCode(rawModel),
    model_line: model.code,
    engine_family: family.code,
    cold_start_aid: family.coldStartAid,
    engine_serial: engineSerial === null ? null : normaliseIdentifier(engineSerial),
    build_date: built,
    delivery_date: delivered,
    delivery_hours: deliveryHours === null ? null : Math.round(deliveryHours * 10) / 10,
    home_shop: normaliseCode(f.text("home_shop") ?? shop ?? ""),
    home_shop_since: f.date("home_shop_since", "home shop since"),
    heater_plug_lot: lot === null ? null : normaliseCode(lot),
    block_heater_fitted: f.flag("block_heater_fitted", "block heater fitted") ?? false,
    block_heater_date: f.date("block_heater_date", "block heater date"),
    warranty_base_months: months("warranty_base_months", "base warranty months"),
    warranty_base_hours: hours("warranty_base_hours", "base warranty hours"),
    warranty_engine_months: months("warranty_engine_months", "engine warranty months"),
    warranty_engine_hours: hours("warranty_engine_hours", "engine warranty hours"),
  };
  return stage;
}
