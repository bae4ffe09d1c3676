import { afterEach, describe, expect, it } from "vitest";
import { createFormat, isCurrencyCode, KPA_PER_BAR, KPA_PER_PSI, kpaTo, toKpa } from "../../../shared/format.js";

// Expected strings are the Unicode CLDR locale data (the data Intl implements): en-US groups with "," and
// marks decimals with "."; de-DE groups with "." and marks decimals with ","; fr-FR groups with U+202F NARROW
// NO-BREAK SPACE and marks decimals with ","; de-DE and fr-FR put the currency sign and the percent sign after
// the number behind U+00A0 NO-BREAK SPACE (CLDR numbers: symbols and currencyFormat/percentFormat patterns).
// Medium dates are CLDR's dateFormats "medium": en "MMM d, y", de "dd.MM.y", fr "d MMM y" (March = "mars").
const NNBSP = "\u202f";
const NBSP = "\u00a0";

const en = createFormat({ locale: "en-US", currency: "USD", timeZone: "UTC" });
const de = createFormat({ locale: "de-DE", currency: "EUR", timeZone: "UTC" });
const fr = createFormat({ locale: "fr-FR", currency: "EUR", timeZone: "UTC" });

describe("createFormat({ locale, currency })", () => {
  it("count(n) groups thousands the locale's way (CLDR)", () => {
    expect(en.count(1234567)).toBe("1,234,567");
    expect(de.count(1234567)).toBe("1.234.567");
    expect(fr.count(1234567)).toBe(`1${NNBSP}234${NNBSP}567`);
    expect(en.count(12.6)).toBe("13");
    expect(en.count(null)).toBe("–");
  });

  it("quantity(kind, n) keeps one rule of decimals per kind", () => {
    expect(en.quantity("hours", 12345.6)).toBe("12,346");
    expect(de.quantity("percent", 1234.54)).toBe("1.234,5");
    expect(fr.quantity("percent", 1234.54)).toBe(`1${NNBSP}234,5`);
    expect(en.quantity("percent", 12)).toBe("12.0");
    expect(en.quantity("ratio", 1.5)).toBe("1.50");
    expect(de.quantity("ratio", 1.5)).toBe("1,50");
    // rates per 1,000 h: at least 2, at most 3 significant digits
    expect(en.quantity("rate", 0.012345)).toBe("0.0123");
    expect(en.quantity("rate", 1.5)).toBe("1.5");
    expect(en.quantity("rate", 2)).toBe("2.0");
    expect(de.quantity("rate", 0.4567)).toBe("0,457");
  });

  it("money(n) carries the currency in the locale's pattern (CLDR)", () => {
    expect(en.money(1234.5)).toBe("$1,234.50");
    expect(de.money(1234.5)).toBe(`1.234,50${NBSP}€`);
    expect(fr.money(1234.5)).toBe(`1${NNBSP}234,50${NBSP}€`);
    expect(createFormat({ locale: "en-US", currency: "EUR" }).money(-5)).toBe("-€5.00");
    // ISO 4217: the yen has no minor unit
    expect(createFormat({ locale: "en-US", currency: "JPY" }).money(1234.4)).toBe("¥1,234");
    expect(en.money(undefined)).toBe("–");
    expect(en.moneyWhole(1234.5)).toBe("$1,235");
    expect(de.moneyWhole(1234.4)).toBe(`1.234${NBSP}€`);
  });

  it("percent(fraction) shows a fraction as a percentage with 1 decimal (CLDR percent pattern)", () => {
    expect(en.percent(0.125)).toBe("12.5%");
    expect(de.percent(0.125)).toBe(`12,5${NBSP}%`);
    expect(fr.percent(0.125)).toBe(`12,5${NBSP}%`);
  });

  describe("date(iso)", () => {
    const zone = process.env.TZ;
    afterEach(() => {
      if (zone === undefined) delete process.env.TZ;
      else process.env.TZ = zone;
    });

    it("shows the locale's medium date (CLDR)", () => {
      expect(en.date("2026-03-05")).toBe("Mar 5, 2026");
      expect(de.date("2026-03-05")).toBe("05.03.2026");
      expect(fr.date("2026-03-05")).toBe("5 mars 2026");
    });

    it("keeps the calendar day in a zone behind and a zone ahead of UTC", () => {
      for (const tz of ["Pacific/Honolulu", "Pacific/Kiritimati"]) {
        process.env.TZ = tz;
        expect(createFormat({ locale: "en-US", currency: "USD" }).date("2026-01-01")).toBe("Jan 1, 2026");
      }
    });

    it("returns text that is not an ISO date unchanged", () => {
      expect(en.date("sometime")).toBe("sometime");
      expect(en.date(null)).toBe("–");
    });
  });

  it("dateTime(at) shows date and time in the zone asked for (CLDR medium date, short time)", () => {
    // CLDR 42+ puts U+202F before "PM"; runtimes that patch it back to a plain space exist, so either is accepted
    expect(en.dateTime("2026-03-05T14:30:00Z")).toMatch(/^Mar 5, 2026, 2:30[ \u202f]PM$/);
    expect(de.dateTime("2026-03-05T14:30:00Z")).toBe("05.03.2026, 14:30");
    expect(createFormat({ locale: "de-DE", currency: "EUR", timeZone: "Europe/Berlin" }).dateTime("2026-03-05T14:30:00Z")).toBe("05.03.2026, 15:30");
  });

  describe("reading(kind, value)", () => {
    it("shows ohms below 1,000 as Ω and from 1,000 as kΩ", () => {
      expect(en.reading("resistance", 0.8)).toBe(`0.8${NBSP}Ω`);
      expect(en.reading("resistance", 1500)).toBe(`1.50${NBSP}kΩ`);
      expect(de.reading("resistance", 1500)).toBe(`1,50${NBSP}kΩ`);
    });

    it("shows volts with 2 decimals", () => {
      expect(en.reading("voltage", 12.6)).toBe(`12.60${NBSP}V`);
      expect(fr.reading("voltage", 12.6)).toBe(`12,60${NBSP}V`);
    });

    it("shows a pressure stored in kPa in the preferred unit (NIST SP 811 factors)", () => {
      const kpa = 689.4757; // NIST SP 811 Appendix B.8: 100 psi × 6.894 757 kPa/psi
      expect(createFormat({ locale: "en-US", currency: "USD", pressureUnit: "psi" }).reading("pressure", kpa)).toBe(`100${NBSP}psi`);
      expect(createFormat({ locale: "en-US", currency: "USD", pressureUnit: "bar" }).reading("pressure", kpa)).toBe(`6.89${NBSP}bar`);
      expect(createFormat({ locale: "de-DE", currency: "EUR", pressureUnit: "kPa" }).reading("pressure", 2757.9)).toBe(`2.758${NBSP}kPa`);
    });
  });
});

describe("createFormat({ pressureUnit }).pressure(value, storedIn, shownIn?)", () => {
  // NIST SP 811 (2008) Appendix B.8: 1 psi = 6.894 757 kPa, 1 bar = 100 kPa; separators per CLDR (see the top)
  const psiReader = createFormat({ locale: "en-US", currency: "USD", pressureUnit: "psi" });
  const barReader = createFormat({ locale: "de-DE", currency: "EUR", pressureUnit: "bar" });

  it("converts a reading held in psi into the reader's unit and writes the unit", () => {
    // 400 psi × 6.894 757 = 2 757.902 8 kPa = 27.579 bar
    expect(psiReader.pressure(400, "psi")).toBe(`400${NBSP}psi`);
    expect(barReader.pressure(400, "psi")).toBe(`27,58${NBSP}bar`);
    expect(psiReader.pressure(400, "psi", "kPa")).toBe(`2,758${NBSP}kPa`);
    expect(fr.pressure(400, "psi")).toBe(`2${NNBSP}758${NBSP}kPa`);
  });

  it("converts bar and kPa into psi", () => {
    // 1 bar = 100 / 6.894 757 psi = 14.503 77 psi
    expect(psiReader.pressure(30, "bar")).toBe(`435${NBSP}psi`);
    expect(psiReader.pressure(2000, "kPa")).toBe(`290${NBSP}psi`);
  });

  it("pressureNumber gives the bare figure with the shown unit's decimals", () => {
    expect(barReader.pressureNumber(350, "psi")).toBe("24,13");
    expect(psiReader.pressureNumber(2413.16, "kPa")).toBe("350");
    expect(psiReader.pressureNumber(null, "psi")).toBe("–");
  });
});

describe("createFormat({ locale }).pValue(p)", () => {
  // decimal marks per CLDR (see the top); 3 decimals with "< 0.001" below is the reporting style of the
  // APA Publication Manual (7th ed.), §6.36
  it("shows 3 decimals and a floor of < 0.001 in the locale's decimal mark", () => {
    expect(en.pValue(0.0432)).toBe("0.043");
    expect(de.pValue(0.0432)).toBe("0,043");
    expect(en.pValue(0.00002)).toBe(`<${NBSP}0.001`);
    expect(de.pValue(0.0004)).toBe(`<${NBSP}0,001`);
    expect(en.pValue(null)).toBe("–");
  });
});

describe("createFormat({ locale }).fileSize(bytes)", () => {
  // 1,024-based multiples as file managers show them (common practice, no source); separators per CLDR
  it("keeps bytes below 1,024 and groups them", () => {
    expect(en.fileSize(512)).toBe(`512${NBSP}bytes`);
    expect(en.fileSize(1)).toBe(`1${NBSP}byte`);
  });

  it("shows 1 decimal below 10 and none from 10, in the locale's marks", () => {
    expect(en.fileSize(1536)).toBe(`1.5${NBSP}KB`);
    expect(de.fileSize(1536)).toBe(`1,5${NBSP}KB`);
    expect(en.fileSize(200 * 1024 * 1024)).toBe(`200${NBSP}MB`);
    expect(de.fileSize(1000 * 1024 * 1024 * 1024)).toBe(`1.000${NBSP}GB`);
    expect(en.fileSize(1536 * 1024 * 1024 * 1024)).toBe(`1.5${NBSP}TB`);
    expect(en.fileSize(undefined)).toBe("–");
  });
});

describe("pressure conversion", () => {
  // NIST SP 811 (2008) Appendix B.8: psi → Pa 6.894 757 E+03; bar → Pa 1.0 E+05 (exact)
  it("uses the NIST SP 811 factors", () => {
    expect(KPA_PER_PSI).toBe(6.894757);
    expect(KPA_PER_BAR).toBe(100);
    expect(toKpa(1, "psi")).toBeCloseTo(6.894757, 9);
    expect(toKpa(2.5, "bar")).toBe(250);
    // 1 bar = 100 / 6.894 757 psi = 14.503 77 psi (NIST SP 811 factors, divided)
    expect(kpaTo(100, "psi")).toBeCloseTo(14.50377, 5);
    expect(kpaTo(toKpa(435, "psi"), "psi")).toBeCloseTo(435, 9);
  });
});

describe("isCurrencyCode(code)", () => {
  it("accepts ISO 4217 codes and refuses other text", () => {
    for (const c of ["USD", "EUR", "GBP", "JPY", "CAD"]) expect(isCurrencyCode(c)).toBe(true);
    for (const c of ["usd", "US", "DOLLAR", "", "XQZ"]) expect(isCurrencyCode(c)).toBe(false);
  });
});
