import { ErrorNotice } from "@/components/ui/states";
import { useClaimActions } from "@/features/claims/api/claim-queries";
import type { ClaimDetail, ClaimSend } from "@shared/schemas/claims";

export function sendStateText(s: ClaimSend): string {
  if (s.status === "sent") return `Sent to ${s.toAddress} on ${new Date(s.sentAt!).toLocaleString()}${s.attempts > 1 ? ` after ${s.attempts} attempts` : ""}.`;
  if (s.status === "queued") return `Queued for a retry to ${s.toAddress} (${s.attempts} attempt${s.attempts === 1 ? "" : "s"} so far): ${s.lastError ?? ""}`;
  if (s.status === "failed") return `Not sent to ${s.toAddress}: ${s.lastError ?? "the mail server refused it."}`;
  return `Sending to ${s.toAddress}…`;
}

/** E-mails the packet to the engine family's warranty address; a refused send is queued and retried. */
export function SendPanel({ claim }: { claim: ClaimDetail }) {
  const { send } = useClaimActions(claim.id);
  const last = claim.lastSend;
  const pending = last && (last.status === "queued" || last.status === "sending");
  return (
    <div className="space-y-2 text-sm">
      <p>Packet goes to <b>{claim.warrantyEmail}</b> (engine family {claim.engineFamily}).</p>
      {last && (
        <p role="status" data-testid="send-state" className={last.status === "sent" ? "text-ok" : last.status === "failed" ? "text-alert" : "text-ochre"}>
          {sendStateText(last)}
        </p>
      )}
      {claim.sendAvailable ? (
        <button type="button" disabled={send.isPending || Boolean(pending)} onClick={() => send.mutate()} className="rounded bg-accent px-3 py-1.5 font-semibold text-white disabled:opacity-50">
          {send.isPending ? "Sending…" : last?.status === "sent" ? "Send again" : "Send packet"}
        </button>
      ) : (
        <p className="text-muted">Mail is not configured here: download the packet instead.</p>
      )}
      {send.isError && <ErrorNotice error={send.error} />}
    </div>
  );
}
