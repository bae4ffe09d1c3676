import type { ReactNode } from "react";
import { ApiError, isRetryable } from "@/lib/api-error";

export function Skeleton({ lines = 3, label = "Loading" }: { lines?: number; label?: string }) {
  return (
    <div role="status" aria-label={label} className="animate-pulse space-y-2">
      {Array.from({ length: lines }, (_, i) => (
        <div key={i} className="h-4 rounded bg-line/70" style={{ width: `${90 - i * 12}%` }} />
      ))}
    </div>
  );
}

export function EmptyState({ title, children }: { title: string; children?: ReactNode }) {
  return (
    <div className="rounded-lg border border-dashed border-line bg-card p-6 text-center">
      <p className="font-semibold">{title}</p>
      {children && <div className="mt-1 text-sm text-muted">{children}</div>}
    </div>
  );
}

/** An error in words; Retry only where trying again can help (network, 5xx), never for a refusal or a 404. */
export function ErrorNotice({ error, onRetry }: { error: unknown; onRetry?: () => void }) {
  const message = error instanceof ApiError || error instanceof Error ? error.message : "Something went wrong.";
  const rid = error instanceof ApiError ? error.requestId : undefined;
  return (
    <div role="alert" className="rounded-lg border border-alert/40 bg-alert/5 p-4 text-sm">
      <p className="font-semibold text-alert">That did not work</p>
      <p className="mt-1">{message}</p>
      {rid && <p className="mt-1 text-xs text-muted">Request id {rid}</p>}
      {onRetry && isRetryable(error) && (
        <button type="button" onClick={onRetry} className="mt-3 rounded bg-alert px-3 py-1.5 text-white">
          Retry
        </button>
      )}
    </div>
  );
}

/** A page-sized notice for a route error boundary: a heading, words, and the ways out. */
export function ErrorPanel({ title, children, actions }: { title: string; children: ReactNode; actions: ReactNode }) {
  return (
    <div className="mx-auto mt-10 max-w-lg rounded-lg border border-line bg-card p-6 sm:p-8" role="alert">
      <h1 className="text-xl font-bold">{title}</h1>
      <div className="mt-2 space-y-1 text-muted">{children}</div>
      <div className="mt-4 flex flex-wrap gap-3">{actions}</div>
    </div>
  );
}

export function Card({ title, children, actions }: { title?: string; children: ReactNode; actions?: ReactNode }) {
  return (
    <section className="rounded-lg border border-line bg-card p-4 shadow-sm">
      {(title || actions) && (
        <div className="mb-3 flex items-center justify-between gap-2">
          {title && <h2 className="text-base font-semibold">{title}</h2>}
          {actions}
        </div>
      )}
      {children}
    </section>
  );
}
