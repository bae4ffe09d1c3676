import { useQuery } from "@tanstack/react-query";
import { Card, EmptyState, ErrorNotice, Skeleton } from "@/components/ui/states";
import { claimQueries } from "@/features/claims/api/claim-queries";
import { ApiError } from "@/lib/api-error";
import type { PrimeCache } from "@/app/page-loader";
import { useFormat } from "@/lib/use-format";

// prefetched, not awaited: a server without the SMTP fake answers 404 no_mail_capture, which this page shows
// in place as an empty state; awaiting it would send that answer to the area's error boundary instead
export const primeCache: PrimeCache = (qc) => {
  void qc.prefetchQuery(claimQueries.capturedMail());
};

export function Component() {
  const fmt = useFormat();
  const q = useQuery(claimQueries.capturedMail());
  return (
    <div className="space-y-4">
      <h1 className="text-2xl font-bold">Captured mail</h1>
      <p className="text-muted">What the local SMTP fake received, newest first. Nothing here left the machine.</p>
      {q.isPending ? (
        <Skeleton lines={5} />
      ) : q.isError ? (
        q.error instanceof ApiError && q.error.code === "no_mail_capture" ? <EmptyState title="No captured mail here">{q.error.message}</EmptyState> : <ErrorNotice error={q.error} onRetry={() => q.refetch()} />
      ) : q.data.mail.length === 0 ? (
        <EmptyState title="No mail captured yet" />
      ) : (
        <ul className="space-y-3" aria-label="Captured mail">
          {q.data.mail.map((m) => (
            <li key={m.id}>
              <Card title={m.subject || "(no subject)"}>
                <p className="text-sm text-muted">From {m.from} to {m.to.join(", ")} · {fmt.dateTime(m.receivedAt)}</p>
                <pre className="mt-2 whitespace-pre-wrap text-xs">{m.text}</pre>
                {m.attachments.length > 0 && (
                  <p className="mt-2 text-sm">Attached: {m.attachments.map((a) => `${a.filename} (${a.contentType}, ${(a.sizeBytes / 1024).toFixed(1)} KB)`).join("; ")}</p>
                )}
              </Card>
            </li>
          ))}
        </ul>
      )}
    </div>
  );
}
