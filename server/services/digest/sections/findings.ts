import { listFindingStates } from "../../../db/queries/findings.js";
import { findingStatusLabels, type FindingState } from "../../../../shared/schemas/findings.js";
import { capped, hasRole, type SectionSource } from "../section.js";

export interface FindingsData {
  states: FindingState[];
  /** ISO instant: found or changed after it counts */
  since: string;
}

const after = (at: string, since: string) => Date.parse(at) > Date.parse(since);

/**
 * Findings found, worked (status, owner, note) or moved by a load since the last digest, each with its state:
 * new ones first, then the changed ones, most recently changed first.
 */
export function buildFindings(d: FindingsData, t: { link: (path: string) => string }) {
  const found = d.states.filter((s) => after(s.firstSeenAt, d.since));
  const changed = d.states.filter((s) => !after(s.firstSeenAt, d.since) && (after(s.changedAt, d.since) || after(s.figuresChangedAt, d.since)));
  const last = (s: FindingState) => Math.max(Date.parse(s.changedAt), Date.parse(s.figuresChangedAt));
  changed.sort((a, b) => last(b) - last(a));
  const state = (s: FindingState) =>
    [
      `status ${findingStatusLabels[s.status].toLowerCase()}`,
      s.owner ? `owner ${s.owner}` : null,
      s.trend === "stronger" ? `stronger after the last load (${s.previousObserved} → ${s.observed} failures)` : null,
      s.trend === "weaker" ? `weaker after the last load (${s.previousObserved} → ${s.observed} failures)` : null,
      s.grewSinceDismissed ? "grown since it was dismissed" : null,
    ]
      .filter(Boolean)
      .join(", ");
  const lines = [...found.map((s) => `New (${state(s)}): ${s.description}`), ...changed.map((s) => `Changed (${state(s)}): ${s.description}`)];
  return {
    key: "findings",
    title: "Findings new or changed since your last digest",
    lines: lines.length ? capped(lines, 12, "findings") : ["No finding was found or changed since your last digest."],
    links: [{ label: "Open the findings", url: t.link("/clusters") }],
  };
}

/** Analysts and directors: the findings are group-wide (their words may name any shop). */
export const findingsSection: SectionSource<FindingsData> = {
  key: "findings",
  appliesTo: (r) => hasRole(r, "analyst", "director") && r.scope.kind === "all",
  load: async (ctx) => ({ states: await listFindingStates(ctx.db), since: ctx.since.toISOString() }),
  build: buildFindings,
};
