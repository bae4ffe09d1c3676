import { pressureUnits, usePressureUnit } from "../hooks/use-pressure-unit";
import type { PressureUnit } from "@shared/format";

/** A labelled choice of the unit pressures are shown in; the choice is kept for every page. */
export function PressureUnitSelect({ className = "" }: { className?: string }) {
  const [unit, setUnit] = usePressureUnit();
  return (
    <label className={`flex items-center gap-1 text-sm ${className}`}>
      <span className="text-xs font-semibold uppercase tracking-wide text-muted">Pressure unit</span>
      <select className="rounded border border-line bg-white px-2 py-1 text-sm" value={unit} onChange={(e) => setUnit(e.target.value as PressureUnit)}>
        {pressureUnits.map((u) => <option key={u} value={u}>{u}</option>)}
      </select>
    </label>
  );
}
