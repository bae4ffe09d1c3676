/**
 * Numbers, money, dates and readings for display, the one place for them: Intl with the reader's locale and the
 * group's currency. Each kind of quantity has one rule for its decimals, so the same figure reads the same on
 * every page. CSV cells never go through here: they carry raw numbers (shared/csv-cell.ts).
 */

export type PressureUnit = "psi" | "kPa" | "bar";
/**
 * Kinds of quantity with fixed decimals: engine hours 0, rates per 1,000 h 2–3 significant, percentages 1,
 * ratios 2; "plain" (labour hours, part quantities) up to 2, trailing zeros dropped.
 */
export type QuantityKind = "hours" | "rate" | "percent" | "ratio" | "plain";
/** Readings as stored: resistance in ohms, voltage in volts, pressure in kPa. */
export type ReadingKind = "resistance" | "voltage" | "pressure";

export interface FormatSettings {
  /** a BCP 47 tag, e.g. "en-US" (navigator.language in the browser) */
  locale: string;
  /** an ISO 4217 code, e.g. "USD" (the group's currency) */
  currency: string;
  /** the unit pressures are shown in; kPa when not given */
  pressureUnit?: PressureUnit;
  /** the zone date-times are shown in; the runtime's own when not given */
  timeZone?: string;
}

/** NIST SP 811 (2008), Appendix B.8: 1 psi = 6.894 757 kPa; 1 bar = 100 kPa (exact). */
export const KPA_PER_PSI = 6.894757;
export const KPA_PER_BAR = 100;

export function kpaTo(kpa: number, unit: PressureUnit): number {
  return unit === "psi" ? kpa / KPA_PER_PSI : unit === "bar" ? kpa / KPA_PER_BAR : kpa;
}
export function toKpa(value: number, unit: PressureUnit): number {
  return unit === "psi" ? value * KPA_PER_PSI : unit === "bar" ? value * KPA_PER_BAR : value;
}

const ISO_DATE = /^(\d{4})-(\d{2})-(\d{2})$/;
/** SI style (NIST SP 811 §7.2): a space between a number and its unit symbol, here one that never breaks. */
const NBSP = "\u00a0";
const MISSING = "–";

const QUANTITY: Record<QuantityKind, Intl.NumberFormatOptions> = {
  hours: { maximumFractionDigits: 0 },
  rate: { minimumSignificantDigits: 2, maximumSignificantDigits: 3 },
  percent: { minimumFractionDigits: 1, maximumFractionDigits: 1 },
  ratio: { minimumFractionDigits: 2, maximumFractionDigits: 2 },
  plain: { maximumFractionDigits: 2 },
};

/** Decimals per unit shown: Ω to 0.1, kΩ to 0.01, V to 0.01, psi whole, kPa whole, bar to 0.01. */
const UNIT_DECIMALS = { "Ω": 1, "kΩ": 2, V: 2, psi: 0, kPa: 0, bar: 2 } as const;
type UnitSymbol = keyof typeof UNIT_DECIMALS;
/** Binary multiples under their everyday names, as file managers show them (common practice, no source). */
const FILE_UNITS = ["KB", "MB", "GB", "TB"] as const;

export interface Format {
  readonly locale: string;
  readonly currency: string;
  /** an integer with the locale's group separators; non-integers are rounded */
  count(n: number | null | undefined): string;
  /** a number with the decimals of its kind, no unit */
  quantity(kind: QuantityKind, n: number | null | undefined): string;
  /** an amount with the group's currency, in the currency's own decimals (2 for USD and EUR) */
  money(n: number | null | undefined): string;
  /** an amount with the group's currency rounded to whole units, for rates of cost (per 1,000 h) */
  moneyWhole(n: number | null | undefined): string;
  /** a fraction (0.125) shown as a percentage with 1 decimal (12.5 %) */
  percent(fraction: number | null | undefined): string;
  /** an ISO date ('YYYY-MM-DD') in the locale's medium date, the same calendar day in every time zone */
  date(iso: string | null | undefined): string;
  /** an instant (ISO string or Date) in the locale's medium date and short time */
  dateTime(at: string | Date | null | undefined): string;
  /** a stored reading with its unit: ohms as Ω (kΩ from 1,000 Ω), volts as V, kPa in the preferred pressure unit */
  reading(kind: ReadingKind, value: number | null | undefined): string;
  /** a number with its unit symbol and the unit's decimals */
  withUnit(value: number | null | undefined, unit: UnitSymbol): string;
  /** a pressure held in `storedIn`, shown in `shownIn` (the preferred unit when not given) with its symbol */
  pressure(value: number | null | undefined, storedIn: PressureUnit, shownIn?: PressureUnit): string;
  /** a pressure held in `storedIn` as a bare number in `shownIn`, with that unit's decimals (for table cells under a unit header) */
  pressureNumber(value: number | null | undefined, storedIn: PressureUnit, shownIn?: PressureUnit): string;
  /** a p-value to 3 decimals, "< 0.001" below that (in the locale's decimal mark) */
  pValue(p: number | null | undefined): string;
  /** a file size, 1,024-based as file managers show it: "512 bytes", "1.5 KB", "200 MB" (1 decimal below 10) */
  fileSize(bytes: number | null | undefined): string;
}

const isNum = (n: number | null | undefined): n is number => typeof n === "number" && Number.isFinite(n);

/** A formatter for one locale and currency. Missing or non-finite values read "–". */
export function createFormat(settings: FormatSettings): Format {
  const { locale, currency } = settings;
  const pressureUnit = settings.pressureUnit ?? "kPa";
  const cache = new Map<string, Intl.NumberFormat>();
  const nf = (key: string, options: Intl.NumberFormatOptions) => {
    let f = cache.get(key);
    if (!f) cache.set(key, (f = new Intl.NumberFormat(locale, options)));
    return f;
  };
  const countFormat = nf("count", { maximumFractionDigits: 0 });
  const moneyFormat = nf("money", { style: "currency", currency });
  const moneyWholeFormat = nf("moneyWhole", { style: "currency", currency, minimumFractionDigits: 0, maximumFractionDigits: 0 });
  const percentFormat = nf("percent", { style: "percent", minimumFractionDigits: 1, maximumFractionDigits: 1 });
  const dateFormat = new Intl.DateTimeFormat(locale, { dateStyle: "medium", timeZone: "UTC" });
  const dateTimeFormat = new Intl.DateTimeFormat(locale, { dateStyle: "medium", timeStyle: "short", timeZone: settings.timeZone });

  const withUnit = (value: number | null | undefined, unit: UnitSymbol): string => {
    if (!isNum(value)) return MISSING;
    const d = UNIT_DECIMALS[unit];
    return `${nf(`u${d}`, { minimumFractionDigits: d, maximumFractionDigits: d }).format(value)}${NBSP}${unit}`;
  };

  return {
    locale,
    currency,
    count: (n) => (isNum(n) ? countFormat.format(Math.round(n)) : MISSING),
    quantity: (kind, n) => (isNum(n) ? nf(`q:${kind}`, QUANTITY[kind]).format(n) : MISSING),
    money: (n) => (isNum(n) ? moneyFormat.format(n) : MISSING),
    moneyWhole: (n) => (isNum(n) ? moneyWholeFormat.format(n) : MISSING),
    percent: (fraction) => (isNum(fraction) ? percentFormat.format(fraction) : MISSING),
    date: (iso) => {
      if (!iso) return MISSING;
      const m = ISO_DATE.exec(iso);
      if (!m) return iso;
      // the calendar date at UTC midnight, shown in UTC: no zone can move it to the day before
      return dateFormat.format(new Date(Date.UTC(Number(m[1]), Number(m[2]) - 1, Number(m[3]))));
    },
    dateTime: (at) => {
      if (at === null || at === undefined || at === "") return MISSING;
      const d = at instanceof Date ? at : new Date(at);
      return Number.isNaN(d.getTime()) ? String(at) : dateTimeFormat.format(d);
    },
    reading: (kind, value) => {
      if (!isNum(value)) return MISSING;
      if (kind === "voltage") return withUnit(value, "V");
      if (kind === "resistance") return Math.abs(value) >= 1000 ? withUnit(value / 1000, "kΩ") : withUnit(value, "Ω");
      return withUnit(kpaTo(value, pressureUnit), pressureUnit);
    },
    withUnit,
    pressure: (value, storedIn, shownIn = pressureUnit) => (isNum(value) ? withUnit(kpaTo(toKpa(value, storedIn), shownIn), shownIn) : MISSING),
    pressureNumber: (value, storedIn, shownIn = pressureUnit) => {
      if (!isNum(value)) return MISSING;
      const d = UNIT_DECIMALS[shownIn];
      return nf(`u${d}`, { minimumFractionDigits: d, maximumFractionDigits: d }).format(kpaTo(toKpa(value, storedIn), shownIn));
    },
    pValue: (p) => {
      if (!isNum(p)) return MISSING;
      const three = nf("p", { minimumFractionDigits: 3, maximumFractionDigits: 3 });
      return p < 0.001 ? `<${NBSP}${three.format(0.001)}` : three.format(p);
    },
    fileSize: (bytes) => {
      if (!isNum(bytes)) return MISSING;
      if (Math.abs(bytes) < 1024) return `${countFormat.format(Math.round(bytes))}${NBSP}${Math.round(bytes) === 1 ? "byte" : "bytes"}`;
      let v = bytes / 1024;
      let u = 0;
      while (Math.abs(v) >= 1024 && u < FILE_UNITS.length - 1) {
        v /= 1024;
        u++;
      }
      const d = Math.abs(v) < 10 ? 1 : 0;
      return `${nf(`f${d}`, { maximumFractionDigits: d }).format(v)}${NBSP}${FILE_UNITS[u]}`;
    },
  };
}

/** ISO 4217 alphabetic codes are three capital letters; Intl knows the ones in use. */
export function isCurrencyCode(code: string): boolean {
  if (!/^[A-Z]{3}$/.test(code)) return false;
  const supported = (Intl as { supportedValuesOf?: (k: string) => string[] }).supportedValuesOf?.("currency");
  return supported ? supported.includes(code) : true;
}

const PSI_FIGURES = /(\d+(?:\.\d+)?)(?:–(\d+(?:\.\d+)?))?\s?psi\b/g;

/**
 * Text whose pressures are written in psi ("300–350 psi: marginal") with every figure and range given in the
 * reader's unit instead ("20.68–24.13 bar: marginal"), so a band reads in the same unit as the readings beside it.
 */
export function pressuresIn(text: string, fmt: Format, unit: PressureUnit): string {
  return text.replace(PSI_FIGURES, (_, a: string, b?: string) => (b ? `${fmt.pressureNumber(Number(a), "psi", unit)}–${fmt.pressure(Number(b), "psi", unit)}` : fmt.pressure(Number(a), "psi", unit)));
}
