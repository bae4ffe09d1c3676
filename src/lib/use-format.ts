import { useMemo } from "react";
import { useQuery } from "@tanstack/react-query";
import { createFormat, type Format } from "@shared/format";
import { FALLBACK_CURRENCY } from "@shared/schemas/settings";
import { settingsQueries } from "@/lib/settings-queries";

const browserLocale = (): string => (typeof navigator !== "undefined" && navigator.language) || "en-US";

/**
 * Numbers, money and dates in the reader's locale (the browser's language) and the group's currency. The page
 * loader primes the settings; this only reads the cache (no request of its own), so until they arrive, or
 * where no loader ran, money is shown in the fallback currency.
 */
export function useFormat(): Format {
  const { data } = useQuery({ ...settingsQueries.current(), enabled: false });
  const currency = data?.currency ?? FALLBACK_CURRENCY;
  return useMemo(() => createFormat({ locale: browserLocale(), currency }), [currency]);
}
