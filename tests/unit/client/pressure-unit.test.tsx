// @vitest-environment happy-dom
import { afterEach, describe, expect, it, vi } from "vitest";
import { cleanup, fireEvent, render, screen } from "@testing-library/react";
import { createFormat } from "@shared/format";
import { PressureUnitSelect } from "@/features/filters/components/pressure-unit-select";
import { defaultPressureUnit } from "@/features/filters/hooks/use-pressure-unit";
import { pressuresIn } from "@shared/format";

afterEach(() => {
  cleanup();
  vi.unstubAllGlobals();
  localStorage.clear();
});

const NBSP = "\u00a0";
const en = createFormat({ locale: "en-US", currency: "USD" });

describe("pressuresIn(text, fmt, unit)", () => {
  // NIST SP 811 (2008) Appendix B.8: 1 psi = 6.894 757 kPa; 1 bar = 100 kPa. 300 psi = 2 068.427 kPa = 20.68 bar,
  // 350 psi = 2 413.165 kPa = 24.13 bar; decimals per shared/format (bar 0.01, kPa whole); separators per CLDR en
  it("writes a psi range in bar", () => {
    expect(pressuresIn("300–350 psi: marginal, re-test or trend", en, "bar")).toBe(`20.68–24.13${NBSP}bar: marginal, re-test or trend`);
  });

  it("writes a single psi figure in kPa with the thousands separator", () => {
    expect(pressuresIn("below 300 psi: ring or cylinder wear", en, "kPa")).toBe(`below 2,068${NBSP}kPa: ring or cylinder wear`);
  });

  it("keeps psi in psi and leaves text without pressures alone", () => {
    expect(pressuresIn("400–500 psi: target", en, "psi")).toBe(`400–500${NBSP}psi: target`);
    expect(pressuresIn("cylinder 3 low: suspect a valve", en, "bar")).toBe("cylinder 3 low: suspect a valve");
  });
});

describe("defaultPressureUnit(locale)", () => {
  it("is psi for US English and kPa (SI) for other locales", () => {
    expect(defaultPressureUnit("en-US")).toBe("psi");
    expect(defaultPressureUnit("en-GB")).toBe("kPa");
    expect(defaultPressureUnit("de-DE")).toBe("kPa");
  });
});

describe("<PressureUnitSelect>", () => {
  it("is a labelled choice that starts at the locale's unit and keeps the reader's choice in localStorage", () => {
    vi.stubGlobal("navigator", { ...navigator, language: "en-US" });
    render(<PressureUnitSelect />);
    const select = screen.getByRole("combobox", { name: "Pressure unit" }) as HTMLSelectElement;
    expect(select.value).toBe("psi");
    fireEvent.change(select, { target: { value: "bar" } });
    expect(localStorage.getItem("ironledger.pressureUnit")).toBe("bar");
    expect(select.value).toBe("bar");
  });

  it("reads a stored choice back", () => {
    localStorage.setItem("ironledger.pressureUnit", "kPa");
    render(<PressureUnitSelect />);
    expect((screen.getByRole("combobox", { name: "Pressure unit" }) as HTMLSelectElement).value).toBe("kPa");
  });
});
