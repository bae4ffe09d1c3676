import { claimStatusLabels, type ClaimSummary } from "@shared/schemas/claims";
import { useFormat } from "@/lib/use-format";

/** Days left to the filing deadline, in words and colour (overdue in the alert colour). */
export function DeadlineBadge({ deadline }: { deadline: ClaimSummary["deadline"] }) {
  const f = useFormat();
  const { state, daysLeft } = deadline;
  const text = state === "overdue" ? `${f.count(-daysLeft)} days overdue` : state === "due_today" ? "due today" : `${daysLeft} day${daysLeft === 1 ? "" : "s"} left`;
  const tone = state === "overdue" ? "bg-alert/10 text-alert border-alert/40" : daysLeft <= 7 ? "bg-ochre/15 text-ink border-ochre/50" : "bg-accent-soft text-accent border-accent/30";
  return <span className={`inline-block whitespace-nowrap rounded-full border px-2 py-0.5 text-xs font-semibold ${tone}`}>{text}</span>;
}

export function StatusPill({ status }: { status: ClaimSummary["status"] }) {
  const tone: Record<ClaimSummary["status"], string> = {
    draft: "bg-line/60 text-ink",
    submitted: "bg-accent-soft text-accent",
    accepted: "bg-ok/10 text-ok",
    partly_accepted: "bg-ochre/15 text-ink",
    rejected: "bg-alert/10 text-alert",
    credited: "bg-ok text-white",
    written_off: "bg-line text-muted",
  };
  return <span className={`inline-block rounded px-2 py-0.5 text-xs font-semibold ${tone[status]}`}>{claimStatusLabels[status]}</span>;
}

