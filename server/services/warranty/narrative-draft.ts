import type { ClusterSnapshot, RepairLineEvidence } from "../../../shared/schemas/claims.js";
import type { Narrative } from "../../../shared/schemas/claim-story.js";

const sentence = (s: string | null) => {
  const t = (s ?? "").trim();
  if (!t) return "";
  const capital = t.charAt(0).toUpperCase() + t.slice(1);
  return /[.!?]$/.test(capital) ? capital : `${capital}.`;
};
const hours = (h: number | null) => (h === null ? "hours not recorded" : `${Math.round(h).toLocaleString("en-US")} h on the hour meter`);

/** The most frequent non-empty text among the lines, with how many lines carry it. */
function commonest(values: readonly (string | null)[]): { text: string; count: number } | null {
  const n = new Map<string, number>();
  for (const v of values) if (v?.trim()) n.set(v.trim(), (n.get(v.trim()) ?? 0) + 1);
  const best = [...n.entries()].sort((a, b) => b[1] - a[1] || a[0].localeCompare(b[0]))[0];
  return best ? { text: best[0], count: best[1] } : null;
}

/**
 * A first draft of a claim's narrative from what the repair orders already say (complaint, cause, correction, the
 * readings' verdicts, the cover) and, for a campaign case, the cluster's figures. The clerk edits it; nothing here
 * is sent until they save it.
 */
export function narrativeDraft(c: { kind: "repair" | "campaign"; lines: readonly RepairLineEvidence[]; cluster: ClusterSnapshot | null }): Narrative {
  if (c.kind === "repair" || c.lines.length === 1) {
    const l = c.lines[0];
    if (!l) return { found: "", done: "", why: "" };
    const readings = [
      ...l.interpretation.plugs.filter((p) => p.verdict !== "healthy").map((p) => `plug ${p.position} ${p.raw} (${p.label})`),
      ...(l.interpretation.compression ? [`compression averaging ${Math.round(l.interpretation.compression.average)} psi, lowest cylinder ${l.interpretation.compression.lowest.position} at ${Math.round(l.interpretation.compression.lowest.mean)} psi`] : []),
    ];
    const codes = l.faultCodes.map((f) => `SPN ${f.spn} FMI ${f.fmi}${f.meaning ? ` (${f.meaning})` : ""}`);
    return {
      found: [
        `${l.machine.modelLine} serial ${l.machine.serial} (engine family ${l.machine.engineFamily}), ${hours(l.hourMeter)}, repair order ${l.roNumber} line ${l.lineNo} opened ${l.openedDate}.`,
        sentence(l.complaint),
        sentence(l.cause),
        readings.length ? `Readings: ${readings.join("; ")}.` : "",
        codes.length ? `Fault codes: ${codes.join(", ")}.` : "",
      ].filter(Boolean).join(" "),
      done: [sentence(l.correction), l.partNumber ? `Part ${l.partNumber}${l.partDescription ? ` (${l.partDescription})` : ""}${l.partQty ? ` × ${l.partQty}` : ""}${l.supplierLot ? `, supplier lot ${l.supplierLot}` : ""}.` : ""].filter(Boolean).join(" "),
      why: `A failure of the ${l.component.name.toLowerCase()} in normal use, within the maker's cover: ${l.eligibility.summary}`,
    };
  }
  const first = [...c.lines].sort((a, b) => a.openedDate.localeCompare(b.openedDate))[0];
  const last = [...c.lines].sort((a, b) => b.openedDate.localeCompare(a.openedDate))[0];
  const machines = new Set(c.lines.map((l) => l.machine.serial)).size;
  const correction = commonest(c.lines.map((l) => l.correction));
  const cl = c.cluster?.cluster;
  return {
    found: `${c.lines.length.toLocaleString("en-US")} failures of the ${first.component.name.toLowerCase()} on ${machines.toLocaleString("en-US")} machines, repair orders opened ${first.openedDate} to ${last.openedDate}.${cl ? ` ${sentence(cl.description)}` : ""}`,
    done: correction ? `${sentence(correction.text)} (${correction.count.toLocaleString("en-US")} of ${c.lines.length.toLocaleString("en-US")} lines.)` : "",
    why: cl
      ? `The failures concentrate beyond what the fleet's engine hours and weather explain (observed ${cl.observed}, expected ${cl.expected.toFixed(1)}; ratio ${cl.ratio.toFixed(1)}, 95 % limits ${cl.lower.toFixed(1)}–${cl.upper.toFixed(1)}), which points to the part as built or supplied rather than to use or servicing.`
      : "",
  };
}
