import { Link } from "react-router-dom";

import { claimStatusLabels, claimStatusSchema, type ClaimDetail } from "@shared/schemas/claims";
import { useFormat } from "@/lib/use-format";

const label = (s: string) => {
  const p = claimStatusSchema.safeParse(s);
  return p.success ? claimStatusLabels[p.data] : s;
};

/** Every version of the claim, oldest first; each one stays readable with its own packet and audit trail. */
export function ClaimVersions({ claim }: { claim: ClaimDetail }) {
  const f = useFormat();
  if (claim.versions.length <= 1) return null;
  return (
    <ol className="space-y-1 text-sm" aria-label="Versions of the claim">
      {claim.versions.map((v) => (
        <li key={v.id} className="flex flex-wrap gap-x-3">
          {v.id === claim.id ? <b>Version {v.revision} (this one)</b> : <Link to={`/claims/${v.id}`} className="font-semibold text-accent hover:underline">Version {v.revision}</Link>}
          <span>{label(v.status)}</span>
          <span className="tabular-nums">{f.money(v.amountClaimed)}</span>
          <span className="text-muted">made {v.createdAt.slice(0, 10)}</span>
          {v.reason && <span className="text-alert">Maker's reason: {v.reason}</span>}
          {v.correction && <span>Corrected: {v.correction}</span>}
        </li>
      ))}
    </ol>
  );
}
