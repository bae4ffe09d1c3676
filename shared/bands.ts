/**
 * Exposure bands shared by the warehouse aggregates, the analytics routes and the charts.
 *
 * Hour bands (engine hours on the meter): 0–500, 500–1k, 1k–2k, 2k–3k, 3k–4k, 4k–6k, ≥6k h.
 *
 * Temperature bands (daily minimum) come in two sets, one per unit the user reads in, each on round values of
 * its own unit: <0, 0–20, 20–32, 32–45, ≥45 °F and <−20, −20–−10, −10–0, 0–5, ≥5 °C. Readings are kept in °C;
 * the °F edges convert to −17.78, −6.67, 0 and 7.22 °C. The warehouse stores a finer partition, the storage
 * bands, cut at the edges of both sets (−20, −17.78, −10, −6.67, 0, 5, 7.22 °C), so that each band of either
 * set is a union of storage bands and one stored aggregate answers in both units.
 */
export interface Band {
  id: string;
  /** inclusive lower edge; null = open below */
  lo: number | null;
  /** exclusive upper edge; null = open above */
  hi: number | null;
}

export const hourBands: readonly Band[] = [
  { id: "0-500", lo: 0, hi: 500 },
  { id: "500-1k", lo: 500, hi: 1000 },
  { id: "1k-2k", lo: 1000, hi: 2000 },
  { id: "2k-3k", lo: 2000, hi: 3000 },
  { id: "3k-4k", lo: 3000, hi: 4000 },
  { id: "4k-6k", lo: 4000, hi: 6000 },
  { id: "6k+", lo: 6000, hi: null },
];

export type TemperatureUnit = "C" | "F";

/** t/°C = (t/°F − 32)/1.8 (NIST SP 811, B.8), and back. */
export const fahrenheitToCelsius = (f: number): number => ((f - 32) * 5) / 9;
export const celsiusToFahrenheit = (c: number): number => (c * 9) / 5 + 32;

/** A temperature band: lo and hi in °C (as the warehouse keeps readings), `loIn`/`hiIn` in the set's own unit. */
export interface TemperatureBand extends Band {
  unit: TemperatureUnit;
  loIn: number | null;
  hiIn: number | null;
}

/** The bands of a set from its inner edges (ascending, in the set's unit) and ids (one more than the edges). */
function bandSet(unit: TemperatureUnit, edges: readonly number[], ids: readonly string[]): readonly TemperatureBand[] {
  const toC = unit === "F" ? fahrenheitToCelsius : (v: number) => v;
  return ids.map((id, i) => {
    const loIn = i === 0 ? null : edges[i - 1];
    const hiIn = i === edges.length ? null : edges[i];
    return { id, unit, loIn, hiIn, lo: loIn === null ? null : toC(loIn), hi: hiIn === null ? null : toC(hiIn) };
  });
}

export const temperatureEdgesF = [0, 20, 32, 45] as const;
export const temperatureEdgesC = [-20, -10, 0, 5] as const;

/** The °F set (DOMAIN.md): ids unchanged since the bands were °F only. */
export const fahrenheitBands = bandSet("F", temperatureEdgesF, ["below-0F", "0-20F", "20-32F", "32-45F", "45F-up"]);
/** The °C set: round Celsius edges. */
export const celsiusBands = bandSet("C", temperatureEdgesC, ["below-minus20C", "minus20-minus10C", "minus10-0C", "0-5C", "5C-up"]);

/** The bands a user reading in `unit` sees, coldest first. */
export const temperatureBandsIn = (unit: TemperatureUnit): readonly TemperatureBand[] => (unit === "F" ? fahrenheitBands : celsiusBands);

/** Every band id of either set (what a tempBands filter accepts). */
export const temperatureBandIds: readonly string[] = [...celsiusBands, ...fahrenheitBands].map((b) => b.id);

/**
 * The storage bands: the partition of the °C line at the edges of both sets (union of their edges; 0 °C is
 * also 32 °F). A storage band that is exactly a band of one set carries that band's id; the others are named
 * by their two edges, each in the unit it is round in. lo/hi in °C.
 */
export const storageBands: readonly Band[] = (() => {
  const named = [
    "below-minus20C", // < −20 °C
    "minus20C-0F", // −20 °C … 0 °F
    "0F-minus10C", // 0 °F … −10 °C
    "minus10C-20F", // −10 °C … 20 °F
    "20F-0C", // 20 °F … 0 °C
    "0-5C", // 0 … 5 °C
    "5C-45F", // 5 °C … 45 °F
    "45F-up", // ≥ 45 °F
  ];
  const edges = [...new Set([...celsiusBands, ...fahrenheitBands].flatMap((b) => [b.lo, b.hi]).filter((e): e is number => e !== null))].sort((a, b) => a - b);
  if (edges.length + 1 !== named.length) throw new Error("storage band names do not match the edges of the two sets");
  return named.map((id, i) => ({ id, lo: i === 0 ? null : edges[i - 1], hi: i === edges.length ? null : edges[i] }));
})();

const within = (inner: Band, outer: Band) =>
  (outer.lo === null || (inner.lo !== null && inner.lo >= outer.lo)) && (outer.hi === null || (inner.hi !== null && inner.hi <= outer.hi));

/** The band of either set (or storage band) with this id. */
export function findTemperatureBand(id: string): TemperatureBand | undefined {
  return celsiusBands.find((b) => b.id === id) ?? fahrenheitBands.find((b) => b.id === id);
}

/** The storage bands a band of either set is the union of (a storage id stands for itself; unknown ids for nothing). */
export function storageBandsOf(id: string): string[] {
  if (storageBands.some((s) => s.id === id) && !findTemperatureBand(id)) return [id];
  const band = findTemperatureBand(id);
  return band ? storageBands.filter((s) => within(s, band)).map((s) => s.id) : [];
}

/** The storage bands of a filter's list of band ids, without repeats, in storage order. */
export function storageBandsOfAll(ids: readonly string[]): string[] {
  const wanted = new Set(ids.flatMap(storageBandsOf));
  return storageBands.filter((s) => wanted.has(s.id)).map((s) => s.id);
}

/** The band of `unit`'s set that a storage band lies in. */
export function unitBandOfStorage(storageId: string, unit: TemperatureUnit): string | undefined {
  const s = storageBands.find((b) => b.id === storageId);
  return s && temperatureBandsIn(unit).find((b) => within(s, b))?.id;
}

/** The position of a band in its set, coldest = 1 (both sets have five bands); undefined for other ids. */
export function temperatureBandOrdinal(id: string): number | undefined {
  const band = findTemperatureBand(id);
  return band ? temperatureBandsIn(band.unit).indexOf(band) + 1 : undefined;
}

/**
 * Selected bands carried into `unit`'s set: the bands of that set that overlap any selected one, so no day
 * the selection held is lost (the sets' edges differ, so a selection can only be widened, never kept exactly).
 */
export function translateTemperatureBands(ids: readonly string[], unit: TemperatureUnit): string[] {
  const storage = new Set(storageBandsOfAll(ids));
  return temperatureBandsIn(unit).filter((b) => storageBandsOf(b.id).some((s) => storage.has(s))).map((b) => b.id);
}

/** The band a value falls in (lo inclusive, hi exclusive). */
export function bandOf(bands: readonly Band[], value: number): Band {
  const b = bands.find((x) => (x.lo === null || value >= x.lo) && (x.hi === null || value < x.hi));
  if (!b) throw new Error(`value ${value} falls in no band`);
  return b;
}

/**
 * A band's label in `unit` (default: the band's own): a band of that unit's set shows its round edges
 * ("0 to 20 °F", "−10 to 0 °C"); any other band (of the other set, or a storage band) its edges converted to
 * one decimal ("−17.8 to −6.7 °C"). A real minus sign throughout.
 */
export function temperatureBandLabel(id: string, unit?: TemperatureUnit): string {
  const set = findTemperatureBand(id);
  const b: Band | undefined = set ?? storageBands.find((x) => x.id === id);
  if (!b) return id;
  const u = unit ?? set?.unit ?? "C";
  const native = set?.unit === u;
  const show = (c: number | null, own: number | null) => {
    const v = native ? own! : u === "F" ? celsiusToFahrenheit(c!) : c!;
    return (native ? String(v) : v.toFixed(1)).replace("-", "−");
  };
  const lo = b.lo === null ? null : show(b.lo, set?.loIn ?? null);
  const hi = b.hi === null ? null : show(b.hi, set?.hiIn ?? null);
  if (lo === null) return `below ${hi} °${u}`;
  if (hi === null) return `${lo} °${u} and above`;
  return `${lo} to ${hi} °${u}`;
}

export function hourBandLabel(id: string): string {
  const b = hourBands.find((x) => x.id === id);
  if (!b) return id;
  return b.hi === null ? `${b.lo!.toLocaleString("en-US")} h and over` : `${b.lo!.toLocaleString("en-US")}–${b.hi.toLocaleString("en-US")} h`;
}
