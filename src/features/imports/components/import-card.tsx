import { useQuery } from "@tanstack/react-query";
import { ErrorNotice } from "@/components/ui/states";
import { apiPaths } from "@shared/api-paths";
import type { Import } from "@shared/schemas/imports";
import { importQueries, useImportActions } from "../api/import-queries";
import { isActive, kindLabels } from "../import-words";
import { ImportChoicesForm } from "./import-choices";
import { ImportPreview } from "./import-preview";
import { LoadProgress } from "./load-progress";
import { LoadedSummary } from "./loaded-summary";
import { ImportStatusPill } from "./status-pill";
import { useFormat } from "@/lib/use-format";

const fallbackMessages: Partial<Record<Import["status"], string>> = {
  refused: "This file cannot be loaded as it is.",
  failed: "The load stopped; nothing of this file was kept.",
  cancelled: "The load was cancelled; nothing of this file was kept.",
};

/**
 * One upload from check to load. It reads the import's detail (seeded by the list), which polls itself every
 * second while the server is checking, queueing or loading, so a reload picks up where the page left off.
 */
export function ImportCard({ initial }: { initial: Import }) {
  const fmt = useFormat();
  const q = useQuery(importQueries.detail(initial.id));
  const imp = q.data ?? initial;
  const { check, load, cancel } = useImportActions(imp.id);
  const headingId = `import-${imp.id}-name`;
  const message = imp.message ?? fallbackMessages[imp.status];
  const canChoose = imp.status === "ready" || imp.status === "refused" || imp.status === "failed" || imp.status === "cancelled";
  const working = check.isPending || load.isPending || cancel.isPending;
  const actionError = [check, load, cancel].find((m) => m.isError)?.error;

  return (
    <article aria-labelledby={headingId} className="space-y-4 rounded-lg border border-line bg-card p-4 shadow-sm">
      <header className="flex flex-wrap items-start justify-between gap-2">
        <div className="min-w-0">
          <h3 id={headingId} className="break-all font-semibold">{imp.fileName}</h3>
          <p className="text-xs text-muted">
            {fmt.fileSize(imp.sizeBytes)} · sent by {imp.uploadedBy}, {fmt.dateTime(imp.uploadedAt)}
            {imp.kind && ` · ${kindLabels[imp.kind]}`}
            {imp.profile && <> · profile <span className="font-mono">{imp.profile}</span></>}
            {imp.shop && <> · shop <span className="font-mono">{imp.shop}</span></>}
          </p>
        </div>
        <div className="flex items-center gap-3">
          <ImportStatusPill status={imp.status} />
          <a href={apiPaths.importFile(imp.id)} download={imp.fileName} className="text-xs text-accent hover:underline">
            Original file<span className="sr-only"> {imp.fileName}</span>
          </a>
        </div>
      </header>

      {imp.status === "checking" && <p role="status" className="text-sm">Checking every row of the file; the preview shows here when it is done.</p>}
      {(imp.status === "refused" || imp.status === "failed") && message && (
        <p role="alert" className="rounded border border-alert/40 bg-alert/5 p-3 text-sm">{message}</p>
      )}
      {imp.status === "cancelled" && message && <p className="text-sm text-muted">{message}</p>}

      {(imp.status === "queued" || imp.status === "loading") && (
        <LoadProgress fileName={imp.fileName} queued={imp.status === "queued"} progress={imp.progress} cancelling={cancel.isPending} onCancel={() => cancel.mutate()} />
      )}
      {imp.status === "loaded" && imp.batchId && <LoadedSummary batchId={imp.batchId} fileName={imp.fileName} />}

      {imp.preview &&
        (canChoose ? (
          <ImportPreview preview={imp.preview} fileLabel={imp.fileName} />
        ) : (
          <details className="text-sm">
            <summary className="cursor-pointer font-semibold">What the check found</summary>
            <div className="mt-3"><ImportPreview preview={imp.preview} fileLabel={imp.fileName} /></div>
          </details>
        ))}

      {canChoose && (
        <div className="space-y-3">
          <ImportChoicesForm key={`${imp.kind}|${imp.profile}|${imp.shop}|${imp.status}`} imp={imp} pending={check.isPending} onCheck={(c) => check.mutate(c)} />
          {imp.status === "ready" && (
            <button type="button" disabled={working} onClick={() => load.mutate()} className="rounded bg-accent px-4 py-2 text-sm font-semibold text-white disabled:opacity-50">
              {load.isPending ? "Starting the load…" : "Load"}
              <span className="sr-only"> {imp.fileName}</span>
            </button>
          )}
        </div>
      )}

      {actionError && <ErrorNotice error={actionError} />}
      {q.isRefetchError && isActive(imp.status) && (
        <p role="status" className="text-xs text-muted">The server did not answer the last question about this file ({q.error.message}); asking again.</p>
      )}
    </article>
  );
}
