import type { ReactNode } from "react";
import { apiPaths } from "@shared/api-paths";
import type { Batch } from "@shared/schemas/imports";
import { Counts } from "./counts";
import { kindLabels, secondsInWords } from "../import-words";
import { BatchStatus } from "./status-pill";
import { DashboardsState } from "./dashboards-state";
import { useFormat } from "@/lib/use-format";

/** One batch in a few lines: the file, how it was read, who loaded it and when, and what it did. */
export function BatchSummary({ batch: b }: { batch: Batch }) {
  const fmt = useFormat();
  const fact = (label: string, value: ReactNode) => (
    <div className="min-w-0">
      <dt className="text-xs text-muted">{label}</dt>
      <dd className="break-words">{value}</dd>
    </div>
  );
  return (
    <div className="space-y-3">
      <dl className="grid grid-cols-2 gap-3 text-sm sm:grid-cols-4">
        {fact("File", <>{b.fileName}{b.importId && <> · <a href={apiPaths.importFile(b.importId)} download={b.fileName} className="text-accent hover:underline">original</a></>}</>)}
        {fact("Kind and profile", <>{kindLabels[b.kind]} · <span className="font-mono">{b.profile}</span>{b.profileVersion !== null && <>, version {b.profileVersion}</>}</>)}
        {fact("Shop", <span className="font-mono">{b.shop ?? "several"}</span>)}
        {fact("Status", <BatchStatus status={b.status} />)}
        {fact("Loaded by", b.loadedBy)}
        {fact("Started", <time dateTime={b.startedAt}>{fmt.dateTime(b.startedAt)}</time>)}
        {fact("Took", b.durationMs === null ? "—" : secondsInWords(b.durationMs / 1000))}
      </dl>
      <DashboardsState batch={b} />
      <Counts label={`What batch ${b.id} did`} items={[["Rows read", b.read], ["Inserted", b.inserted], ["Updated", b.updated], ["Unchanged", b.unchanged], ["Rejected", b.rejected]]} />
    </div>
  );
}
