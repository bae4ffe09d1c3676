import { useQuery } from "@tanstack/react-query";
import { Link } from "react-router-dom";
import { batchQueries } from "../api/batch-queries";
import { batchPath } from "../batch-path";
import { Counts } from "./counts";
import { DashboardsState } from "./dashboards-state";
import { secondsInWords } from "../import-words";
import { useFormat } from "@/lib/use-format";

/** A finished load: what the batch did, and the way to its rejects. */
export function LoadedSummary({ batchId, fileName }: { batchId: string; fileName: string }) {
  const fmt = useFormat();
  const q = useQuery(batchQueries.summary(batchId));
  const b = q.data?.batch;
  return (
    <div className="space-y-2">
      {b ? (
        <>
          <p className="text-sm">
            {b.status === "already_loaded"
              ? `This file was loaded before, so nothing changed (batch ${b.id}).`
              : `Batch ${b.id}${b.durationMs === null ? "" : `, loaded in ${secondsInWords(b.durationMs / 1000)}`}.`}
          </p>
          <DashboardsState batch={b} />
          <Counts label={`What loading ${fileName} did`} items={[["Rows read", b.read], ["Inserted", b.inserted], ["Updated", b.updated], ["Unchanged", b.unchanged], ["Rejected", b.rejected]]} />
        </>
      ) : q.isError ? (
        <p className="text-sm text-muted">The batch's counts could not be read just now ({q.error.message}).</p>
      ) : (
        <p className="text-sm text-muted">Reading the batch's counts…</p>
      )}
      <Link to={batchPath(batchId)} className="inline-block rounded border border-line bg-white px-3 py-1.5 text-sm font-semibold text-accent hover:border-accent">
        {b ? `Rejects of batch ${b.id} (${fmt.count(b.rejected)})` : `Rejects of batch ${batchId}`}
      </Link>
    </div>
  );
}
