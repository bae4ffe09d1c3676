/** A claim's audit row as one sentence, from the action and the changes it recorded. */
import { claimStatusLabels, type ClaimStatus } from "../../../shared/schemas/claims.js";

const money = (v: unknown) =>
  typeof v === "number" && Number.isFinite(v) ? v.toLocaleString("en-US", { minimumFractionDigits: 2, maximumFractionDigits: 2 }) : "–";
const str = (v: unknown) => (v === null || v === undefined ? "" : String(v));
const days = (n: number) => `${n.toLocaleString("en-US")} day${n === 1 ? "" : "s"}`;
const label = (s: unknown) => (typeof s === "string" && s in claimStatusLabels ? claimStatusLabels[s as ClaimStatus].toLowerCase() : str(s));
const kb = (bytes: unknown) => (typeof bytes === "number" ? `${(bytes / 1024).toLocaleString("en-US", { maximumFractionDigits: 1 })} KB` : "");

function statusSentence(c: Record<string, unknown>): string {
  const move = (c.status ?? {}) as { from?: unknown; to?: unknown };
  const to = move.to;
  switch (to) {
    case "submitted": {
      const how =
        c.via === "mail" ? `the packet e-mailed on ${str(c.filedOn)}` : c.via === "other" ? `another way on ${str(c.filedOn)}, reference ${str(c.reference)}` : "a way not recorded";
      const late = typeof c.daysLate === "number" && c.daysLate > 0 ? ` It went ${days(c.daysLate)} after the deadline of ${str(c.deadline)}; the late filing was confirmed.` : "";
      return `Marked submitted: the claim went to the maker by ${how}, for ${money(c.amountClaimed)}.${late}`;
    }
    case "accepted":
      return `Recorded the maker's acceptance: ${money(c.amountPaid)} paid of ${money(c.amountClaimed)} claimed.`;
    case "partly_accepted":
      return `Recorded a partial acceptance: ${money(c.amountPaid)} paid of ${money(c.amountClaimed)} claimed. The maker's reason: ${str(c.reason)}`;
    case "rejected":
      return `Recorded the maker's rejection. The maker's reason: ${str(c.reason)}`;
    case "credited":
      return `Recorded the maker's credit of ${money(c.amountCredited)}.`;
    case "written_off":
      return `Wrote the claim off${c.amountClaimed !== undefined ? ` (${money(c.amountClaimed)} not recovered)` : ""}. Reason: ${str(c.reason)}`;
    default:
      return `Moved the claim from ${label(move.from)} to ${label(to)}.`;
  }
}

/** One sentence for an audit row; an action this module does not know is told as its changes in words. */
export function auditSentence(action: string, changes: Record<string, unknown>): string {
  const c = changes;
  switch (action) {
    case "created":
      if (typeof c.revision === "number" && c.revision > 1)
        return `Made version ${c.revision} of claim ${str(c.claimNumber)} after the maker's rejection, with ${str(c.lines)} repair line${c.lines === 1 ? "" : "s"}; filing deadline ${str(c.deadline)}. What was corrected: ${str(c.correction)}`;
      return `Made ${c.kind === "campaign" ? "campaign case" : "claim"} ${str(c.claimNumber)} in draft with ${str(c.lines)} repair line${c.lines === 1 ? "" : "s"}${typeof c.amountClaimed === "number" ? `, claiming ${money(c.amountClaimed)}` : ""}${typeof c.linesApart === "number" && c.linesApart > 0 ? ` (${c.linesApart} not covered or undecided, listed apart)` : ""}; filing deadline ${str(c.deadline)}.`;
    case "status":
      return statusSentence(c);
    case "line included":
      return `Included repair line ${str(c.line)} in the amount claimed although ${str(c.why).replace(/^\w/, (x) => x.toLowerCase())} Reason: ${str(c.reason)} The amount claimed is now ${money(c.amountClaimed)}.`;
    case "line left out":
      return `Left repair line ${str(c.line)} out of the amount claimed again; the amount claimed is now ${money(c.amountClaimed)}.`;
    case "resubmitted":
      return `Corrected after the rejection as version ${str(c.revision)}. What was corrected: ${str(c.correction)}`;
    case "attachment added":
      return `Added the attachment ${str(c.attachment)} (${str(c.type)}${c.bytes !== undefined ? `, ${kb(c.bytes)}` : ""}).`;
    case "attachment removed":
      return `Removed the attachment ${str(c.attachment)} before sending.`;
    case "narrative edited": {
      const parts = Array.isArray(c.parts) ? (c.parts as unknown[]).map(str) : [];
      return `Edited the narrative: ${parts.length > 1 ? `${parts.slice(0, -1).join(", ")} and ${parts.at(-1)}` : (parts[0] ?? "no part")}.`;
    }
    case "note added":
      return `Added a note${c.by === "shop" ? " for the clerk (from the shop)" : c.by === "clerk" ? " for the shop" : ""}.`;
    case "send requested":
      return `Asked for the packet to be e-mailed to ${str(c.to)}.`;
    case "packet sent":
      return `The packet went to ${str(c.to)}${typeof c.attempts === "number" && c.attempts > 1 ? ` after ${c.attempts} attempts` : ""}.`;
    case "send failed":
      return `The packet did not go to ${str(c.to)}: ${str(c.error)}`;
    default: {
      const parts = Object.entries(c).map(([k, v]) => `${k} ${typeof v === "object" && v !== null ? JSON.stringify(v) : str(v)}`);
      return `${action.replace(/^\w/, (x) => x.toUpperCase())}${parts.length ? `: ${parts.join("; ")}` : ""}.`;
    }
  }
}
