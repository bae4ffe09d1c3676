import { useMemo } from "react";
import { useFormat } from "@/lib/use-format";
import { cautionsAt } from "@shared/measurement-interpretation";
import { familyOptions, summariseBenchSheet, type PartsOutlook, type Statement } from "@shared/bench-sheet-summary";
import type { EngineSpec } from "@shared/schemas/engine-specs";
import { draftToSheet, type BenchDraft } from "../draft";
import { Cautions } from "./touch";

function Statements({ title, items, empty }: { title: string; items: Statement[]; empty: string }) {
  return (
    <div>
      <h3 className="font-semibold">{title}</h3>
      {items.length === 0 ? (
        <p className="text-sm text-muted">{empty}</p>
      ) : (
        <ul className="mt-1 list-disc space-y-1 pl-5">
          {items.map((s) => (
            <li key={s.text}>{s.text} <span className="text-xs text-muted">({s.provenance})</span></li>
          ))}
        </ul>
      )}
    </div>
  );
}

/** What the readings point to, what they rule out and what to do next, from the same rules as the values above. */
export function SheetSummary({ draft, parts, spec, temperatureUnit }: { draft: BenchDraft; parts: PartsOutlook | null; spec: EngineSpec | null; temperatureUnit: "C" | "F" }) {
  const fmt = useFormat();
  const s = useMemo(
    () => summariseBenchSheet(draftToSheet(draft).sheet, { parts, pressure: (psi) => fmt.pressure(psi, "psi", draft.pressureUnit), ...familyOptions(spec) }),
    [draft, parts, spec, fmt],
  );
  const blockHeater = s.nextSteps.some((n) => n.text.includes("block heater"));
  return (
    <section aria-labelledby="bench-summary" className="rounded-xl border-2 border-slate bg-card p-4">
      <h2 id="bench-summary" className="text-lg font-bold">What the readings point to</h2>
      <div className="mt-2 space-y-3 text-base" aria-live="polite">
        <Statements title="Points to" items={s.pointsTo} empty="Nothing yet: enter readings above." />
        <Statements title="Rules out" items={s.rulesOut} empty="Nothing ruled out yet." />
        <Statements title="Next steps (decision support)" items={s.nextSteps} empty="No step suggested yet." />
      </div>
      {/* the deference to the service manual follows in the box below */}
      {blockHeater && <Cautions items={cautionsAt("block-heater", temperatureUnit).slice(0, -1)} title="Before you plug in a block heater" />}
      <Cautions items={cautionsAt("decision", temperatureUnit)} title="These readings are decision support" />
    </section>
  );
}
