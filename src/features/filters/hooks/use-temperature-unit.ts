import { useCallback, useSyncExternalStore } from "react";

const KEY = "ironledger.temperatureUnit";
const listeners = new Set<() => void>();
const read = (): "C" | "F" => {
  try {
    return localStorage.getItem(KEY) === "F" ? "F" : "C";
  } catch {
    return "C";
  }
};

/** The unit as stored now, for code outside React (a page's cache priming). */
export const currentTemperatureUnit = (): "C" | "F" => read();

/**
 * The user's temperature unit (°C or °F), kept in this browser's localStorage and shared by every page.
 * Hand-written over useSyncExternalStore rather than a storage-hook library: one key with two values needs no dependency.
 */
export function useTemperatureUnit(): ["C" | "F", (u: "C" | "F") => void] {
  const unit = useSyncExternalStore(
    (cb) => {
      listeners.add(cb);
      return () => listeners.delete(cb);
    },
    read,
    () => "C" as const,
  );
  const set = useCallback((u: "C" | "F") => {
    try {
      localStorage.setItem(KEY, u);
    } catch {
      /* private mode: keep it for this page only */
    }
    listeners.forEach((l) => l());
  }, []);
  return [unit, set];
}
