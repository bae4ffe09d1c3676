import { FieldReader } from "./fields.js";
import { reject } from "./reject.js";
import { fahrenheitToCelsius } from "./units.js";
import { normaliseCode } from "./values.js";

export interface WeatherStage {
  shop_code: string;
  date: string;
  tmin_c: number;
  tmax_c: number | null;
  source_unit: string;
}

/** One shop-day of weather, temperatures converted to °C from the profile's unit. */
export function transformWeather(f: FieldReader, shop: string | undefined): WeatherStage {
  const unit = f.profile.units.temperature;
  const toC = (v: number | null) => (v === null ? null : Math.round((unit === "F" ? fahrenheitToCelsius(v) : v) * 10) / 10);
  const tmin = f.number("tmin", "minimum temperature")!;
  const tmax = f.number("tmax", "maximum temperature");
  for (const [v, label] of [[tmin, "minimum temperature"], [tmax, "maximum temperature"]] as const) {
    const c = toC(v);
    if (c !== null && (c < -70 || c > 60)) reject("absurd_value", `${label} ${v} °${unit} is beyond any recorded weather`);
  }
  if (tmax !== null && tmax < tmin) reject("tmin_above_tmax", `minimum temperature ${tmin} °${unit} is above the maximum ${tmax} °${unit}`);
  const stage: WeatherStage = {
    shop_code: normaliseCode(f.text("shop_code") ?? shop ?? ""),
    date: f.date("date", "date")!,
    tmin_c: toC(tmin)!,
    tmax_c: toC(tmax),
    source_unit: unit,
  };
  return stage;
}
