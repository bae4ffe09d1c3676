import type { Format, PressureUnit } from "@shared/format";

const PSI_FIGURES = /(\d+(?:\.\d+)?)(?:–(\d+(?:\.\d+)?))?\s?psi\b/g;

/**
 * Text whose pressures are written in psi ("300–350 psi: marginal") with every figure and range given in the
 * reader's unit instead ("20.68–24.13 bar: marginal"), so a band reads in the same unit as the readings beside it.
 */
export function pressuresIn(text: string, fmt: Format, unit: PressureUnit): string {
  return text.replace(PSI_FIGURES, (_, a: string, b?: string) => (b ? `${fmt.pressureNumber(Number(a), "psi", unit)}–${fmt.pressure(Number(b), "psi", unit)}` : fmt.pressure(Number(a), "psi", unit)));
}
