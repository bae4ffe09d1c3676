import type { ClaimDetail } from "@shared/schemas/claims";
import { useFormat } from "@/lib/use-format";

const describe = (changes: Record<string, unknown>) =>
  Object.entries(changes)
    .map(([k, v]) => {
      if (v && typeof v === "object" && "from" in v && "to" in v) return `${k}: ${String((v as { from: unknown }).from)} → ${String((v as { to: unknown }).to)}`;
      return `${k}: ${typeof v === "object" ? JSON.stringify(v) : String(v)}`;
    })
    .join("; ");

/** Who changed what and when, oldest first. */
export function AuditTrail({ audit }: { audit: ClaimDetail["audit"] }) {
  const fmt = useFormat();
  return (
    <ol className="space-y-1 text-sm" aria-label="Audit trail">
      {audit.map((a) => (
        <li key={a.id} className="grid grid-cols-[auto_minmax(0,1fr)] gap-x-2 border-b border-line/50 py-1 sm:grid-cols-[10rem_8rem_minmax(0,1fr)]">
          <time dateTime={a.at} className="text-muted tabular-nums">{fmt.dateTime(a.at)}</time>
          <span>{a.actorName}</span>
          <span className="col-span-2 break-words sm:col-span-1"><b>{a.action}</b> {a.text ? <span>{a.text}</span> : <span className="text-muted">{describe(a.changes)}</span>}</span>
        </li>
      ))}
    </ol>
  );
}
