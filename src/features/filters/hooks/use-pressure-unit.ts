import { useCallback, useSyncExternalStore } from "react";
import type { PressureUnit } from "@shared/format";

const KEY = "ironledger.pressureUnit";
const UNITS: readonly PressureUnit[] = ["psi", "kPa", "bar"];
const listeners = new Set<() => void>();

// psi for a browser set to US English (where gauges read psi), kPa, the SI unit, everywhere else
export const defaultPressureUnit = (locale: string | undefined): PressureUnit => (locale === "en-US" ? "psi" : "kPa");

const browserLocale = () => (typeof navigator !== "undefined" ? navigator.language : undefined);
const read = (): PressureUnit => {
  try {
    const stored = localStorage.getItem(KEY);
    if (stored && (UNITS as readonly string[]).includes(stored)) return stored as PressureUnit;
  } catch {
    /* no storage: fall back to the locale's unit */
  }
  return defaultPressureUnit(browserLocale());
};

/** The reader's pressure unit (psi, kPa or bar), kept in this browser's localStorage and shared by every page. */
export function usePressureUnit(): [PressureUnit, (u: PressureUnit) => void] {
  const unit = useSyncExternalStore(
    (cb) => {
      listeners.add(cb);
      return () => listeners.delete(cb);
    },
    read,
    () => "kPa" as const,
  );
  const set = useCallback((u: PressureUnit) => {
    try {
      localStorage.setItem(KEY, u);
    } catch {
      /* private mode: keep it for this page only */
    }
    listeners.forEach((l) => l());
  }, []);
  return [unit, set];
}

export const pressureUnits = UNITS;
