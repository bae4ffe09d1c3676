import type { FindingState } from "../../shared/schemas/findings.js";
import { findingStatusLabels } from "../../shared/schemas/findings.js";

/** A finding as the Overview lists it: what changed, in words, and when. */
export interface FindingNews {
  key: string;
  sentence: string;
  status: FindingState["status"];
  change: string;
  at: string;
}

const after = (iso: string, t: Date | null) => t === null || new Date(iso).getTime() > t.getTime();

/**
 * The findings that changed after `since` (null: ever), newest change first: found, moved by a load (stronger,
 * weaker), or worked (status, owner, notes). A dismissed finding is left out unless it grew since its dismissal.
 */
export function findingNews(states: readonly FindingState[], since: Date | null, limit = 6): FindingNews[] {
  const out: FindingNews[] = [];
  for (const s of states) {
    if (s.status === "dismissed" && !s.grewSinceDismissed) continue;
    // what happened to it after `since`, each with its moment; the latest one is what the Overview says
    const happened: { at: string; change: string }[] = [];
    if (after(s.firstSeenAt, since)) happened.push({ at: s.firstSeenAt, change: "new" });
    if (after(s.figuresChangedAt, since) && s.figuresChangedAt !== s.firstSeenAt && (s.trend === "stronger" || s.trend === "weaker")) {
      happened.push({
        at: s.figuresChangedAt,
        change: s.grewSinceDismissed
          ? `grew since it was dismissed (${s.previousObserved ?? "?"} → ${s.observed} failures)`
          : `${s.trend} after a load (${s.previousObserved} → ${s.observed} failures)`,
      });
    }
    if (after(s.changedAt, since) && s.changedAt !== s.firstSeenAt) {
      happened.push({ at: s.changedAt, change: `worked: now ${findingStatusLabels[s.status].toLowerCase()}${s.owner ? `, owner ${s.owner}` : ""}` });
    }
    if (!happened.length) continue;
    const latest = happened.sort((a, b) => (a.at < b.at ? 1 : a.at > b.at ? -1 : 0))[0];
    out.push({ key: s.key, sentence: s.description, status: s.status, change: latest.change, at: latest.at });
  }
  return out.sort((a, b) => (a.at < b.at ? 1 : a.at > b.at ? -1 : 0)).slice(0, limit);
}
