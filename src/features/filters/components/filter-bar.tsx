import { useQuery } from "@tanstack/react-query";
import { useState, type ReactNode } from "react";
import { useFilters } from "../use-filters";
import { shopQueries } from "../api/shop-queries";
import { useTemperatureUnit } from "../hooks/use-temperature-unit";
import { PressureUnitSelect } from "./pressure-unit-select";
import { components, engineFamilies, modelLines } from "@shared/catalog";
import { hourBandLabel, hourBands, temperatureBandLabel, temperatureBandsIn, translateTemperatureBands, type TemperatureUnit } from "@shared/bands";
import type { UrlFilters } from "../use-filters";

type ListKey = "shops" | "engineFamilies" | "modelLines" | "components" | "lots" | "tempBands" | "hourBands";

const field = "mt-1 block w-full rounded border border-line bg-white px-2 py-1 text-sm";

function Field({ label, children }: { label: string; children: ReactNode }) {
  return (
    <label className="block text-xs font-semibold uppercase tracking-wide text-muted">
      {label}
      {children}
    </label>
  );
}

function Toggles({ legend, options, selected, onChange }: { legend: string; options: { id: string; label: string }[]; selected: string[]; onChange: (v: string[]) => void }) {
  return (
    <fieldset>
      <legend className="text-xs font-semibold uppercase tracking-wide text-muted">{legend}</legend>
      <div className="mt-1 flex flex-wrap gap-1">
        {options.map((o) => {
          const on = selected.includes(o.id);
          return (
            <button
              key={o.id}
              type="button"
              aria-pressed={on}
              onClick={() => onChange(on ? selected.filter((s) => s !== o.id) : [...selected, o.id])}
              className={`rounded-full border px-2.5 py-0.5 text-xs ${on ? "border-accent bg-accent text-white" : "border-line bg-white hover:border-accent"}`}
            >
              {o.label}
            </button>
          );
        })}
      </div>
    </fieldset>
  );
}

const single = (v: string) => (v ? [v] : []);

/**
 * The analytics filters, written to the URL so a link reproduces the view and the filters follow the analyst
 * from page to page. `show` hides the controls a page does not use.
 */
export function FilterBar({ hide = [] }: { hide?: (keyof UrlFilters)[] }) {
  const { filters, setFilters, problems, typed } = useFilters();
  const shops = useQuery(shopQueries.list());
  const [unit, setUnit] = useTemperatureUnit();
  const [open, setOpen] = useState(false);
  const [lot, setLot] = useState(filters.lots.join(","));
  const set = (k: ListKey, v: string[]) => setFilters({ [k]: v } as Partial<UrlFilters>);
  const active = Object.entries(filters).filter(([, v]) => (Array.isArray(v) ? v.length > 0 : v !== undefined)).length;
  const shown = (k: keyof UrlFilters) => !hide.includes(k);
  // a switch of unit carries the chosen bands over to the new unit's bands that overlap them (the sets' edges differ)
  const switchUnit = (u: TemperatureUnit) => {
    if (u !== unit && filters.tempBands.length) setFilters({ tempBands: translateTemperatureBands(filters.tempBands, u) });
    setUnit(u);
  };
  // the unit's bands, and any chosen band of the other unit (a link from someone reading in it) so it can be cleared
  const bandOptions = [...temperatureBandsIn(unit).map((b) => b.id), ...filters.tempBands.filter((id) => !temperatureBandsIn(unit).some((b) => b.id === id))];

  return (
    <section aria-label="Filters" className="rounded-lg border border-line bg-card p-3 shadow-sm">
      <div className="flex flex-wrap items-end gap-3">
        <Field label="From">
          <input type="date" className={field} value={typed.from ?? ""} aria-invalid={problems.some((x) => x.startsWith("The From date"))} onChange={(e) => setFilters({ from: e.target.value || undefined })} />
        </Field>
        <Field label="To">
          <input type="date" className={field} value={typed.to ?? ""} aria-invalid={problems.some((x) => x.startsWith("The From date"))} onChange={(e) => setFilters({ to: e.target.value || undefined })} />
        </Field>
        {shown("engineFamilies") && (
          <Field label="Engine family">
            <select className={field} value={filters.engineFamilies[0] ?? ""} onChange={(e) => set("engineFamilies", single(e.target.value))}>
              <option value="">Any</option>
              {engineFamilies.map((f) => <option key={f.code} value={f.code}>{f.code}</option>)}
            </select>
          </Field>
        )}
        {shown("modelLines") && (
          <Field label="Model line">
            <select className={field} value={filters.modelLines[0] ?? ""} onChange={(e) => set("modelLines", single(e.target.value))}>
              <option value="">Any</option>
              {modelLines.map((m) => <option key={m.code} value={m.code}>{m.name}</option>)}
            </select>
          </Field>
        )}
        {shown("components") && (
          <Field label="Component">
            <select className={field} value={filters.components[0] ?? ""} onChange={(e) => set("components", single(e.target.value))}>
              <option value="">Any</option>
              {components.filter((c) => c.code !== "SVC-PM").map((c) => <option key={c.code} value={c.code}>{c.name}</option>)}
            </select>
          </Field>
        )}
        <div className="ml-auto flex items-end gap-2">
          <div role="group" aria-label="Temperature unit" className="flex overflow-hidden rounded border border-line text-sm">
            {(["C", "F"] as const).map((u) => (
              <button key={u} type="button" aria-pressed={unit === u} onClick={() => switchUnit(u)} className={`px-2 py-1 ${unit === u ? "bg-slate text-paper" : "bg-white"}`}>
                °{u}
              </button>
            ))}
          </div>
          <PressureUnitSelect />
          <button type="button" aria-expanded={open} onClick={() => setOpen((o) => !o)} className="rounded border border-line bg-white px-3 py-1 text-sm hover:border-accent">
            {open ? "Fewer filters" : "More filters"}
          </button>
          {active > 0 && (
            <button
              type="button"
              onClick={() => {
                setLot("");
                setFilters({ from: undefined, to: undefined, buildFrom: undefined, buildTo: undefined, shops: [], engineFamilies: [], modelLines: [], components: [], lots: [], tempBands: [], hourBands: [] });
              }}
              className="rounded px-2 py-1 text-sm text-accent underline"
            >
              Clear {active}
            </button>
          )}
        </div>
      </div>
      {problems.length > 0 && (
        <ul role="alert" className="mt-2 space-y-0.5 text-sm text-alert">
          {problems.map((x) => <li key={x}>{x}</li>)}
        </ul>
      )}
      {open && (
        <div className="mt-3 grid gap-3 border-t border-line pt-3 md:grid-cols-2">
          {shops.data && shops.data.shops.length > 1 && (
            <Toggles legend="Shops" options={shops.data.shops.map((s) => ({ id: s.code, label: `${s.code} ${s.name}` }))} selected={filters.shops} onChange={(v) => set("shops", v)} />
          )}
          <div className="flex flex-wrap gap-3">
            <Field label="Built from">
              <input type="month" className={field} value={typed.buildFrom ?? ""} onChange={(e) => setFilters({ buildFrom: e.target.value || undefined })} />
            </Field>
            <Field label="Built to">
              <input type="month" className={field} value={typed.buildTo ?? ""} onChange={(e) => setFilters({ buildTo: e.target.value || undefined })} />
            </Field>
            <Field label="Supplier lot">
              <input
                className={field}
                value={lot}
                placeholder="e.g. a lot code"
                onChange={(e) => setLot(e.target.value)}
                onBlur={() => set("lots", lot.split(",").map((s) => s.trim()).filter(Boolean))}
                onKeyDown={(e) => e.key === "Enter" && set("lots", lot.split(",").map((s) => s.trim()).filter(Boolean))}
              />
            </Field>
          </div>
          {shown("tempBands") && <Toggles legend="Daily minimum" options={bandOptions.map((id) => ({ id, label: temperatureBandLabel(id, unit) }))} selected={filters.tempBands} onChange={(v) => set("tempBands", v)} />}
          {shown("hourBands") && <Toggles legend="Hour meter" options={hourBands.map((b) => ({ id: b.id, label: hourBandLabel(b.id) }))} selected={filters.hourBands} onChange={(v) => set("hourBands", v)} />}
        </div>
      )}
    </section>
  );
}
