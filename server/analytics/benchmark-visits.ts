/**
 * Which shop needs a visit: above the 99.8 % funnel limit → visit; above the 95 % limit, or a Wilson lower limit
 * above the group rate (the shop's or a technician's) → watch. Visits first, then by comeback rate.
 */
import { pct } from "./benchmark-figures.js";
import type { ShopBenchmark, Visit } from "../../shared/schemas/benchmarks.js";

/** The visits among the rows; peers only for a group-wide caller. */
export function visits(rows: readonly ShopBenchmark[], groupWide: boolean): Visit[] {
  const out: (Visit & { rate: number })[] = [];
  for (const r of rows) {
    if (r.peer && !groupWide) continue;
    const reasons: string[] = [];
    let severity: Visit["severity"] | null = null;
    const cb = r.comeback;
    if (cb.funnel === "above_998") {
      severity = "visit";
      reasons.push(`Comeback rate ${cb.words}.`);
    } else if (cb.funnel === "above_95") {
      severity = "watch";
      reasons.push(`Comeback rate ${cb.words}.`);
    } else if (cb.aboveGroup) {
      severity = "watch";
      reasons.push(`Comeback rate ${pct(cb.value!)}: its 95 % interval (${pct(cb.lower!)}–${pct(cb.upper!)}) lies above the group rate.`);
    }
    for (const t of r.technicians ?? []) {
      if (!t.aboveGroup || t.comeback.value === null) continue;
      severity ??= "watch";
      reasons.push(
        `Technician ${t.techId} (${t.name}): ${pct(t.comeback.value)} of ${t.comeback.n} lines came back (95 % interval ${pct(t.comeback.lower!)}–${pct(t.comeback.upper!)}), above the group rate.`,
      );
    }
    if (severity) out.push({ key: r.key, label: r.label, severity, reasons, rate: cb.value ?? 0 });
  }
  out.sort((a, b) => (a.severity !== b.severity ? (a.severity === "visit" ? -1 : 1) : b.rate - a.rate));
  return out.map(({ rate: _rate, ...v }) => v);
}
