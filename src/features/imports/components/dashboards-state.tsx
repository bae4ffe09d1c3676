import { useEffect, useRef } from "react";
import { useQuery, useQueryClient } from "@tanstack/react-query";
import type { Batch } from "@shared/schemas/imports";
import { overviewQueries } from "@/features/overview/api/overview-queries";
import { batchQueries } from "../api/batch-queries";
import { DASHBOARDS_POLL_MS, dashboardsInWords } from "../dashboards-words";

/**
 * Whether the dashboards show a loaded batch yet: "Dashboards updating…" while the server computes its
 * answers for the new data (asked again every two seconds), then "Dashboards current as of hh:mm". When it
 * turns current, the Overview this browser holds is marked stale, so opening it fetches the new one.
 * Shows nothing for a batch that did not load, or when the server cannot say.
 */
export function DashboardsState({ batch }: { batch: Pick<Batch, "id" | "dashboards"> }) {
  const qc = useQueryClient();
  const updating = batch.dashboards?.state === "updating";
  const live = useQuery({
    ...batchQueries.summary(batch.id),
    enabled: updating,
    refetchInterval: (q) => (q.state.data?.batch.dashboards?.state === "current" ? false : DASHBOARDS_POLL_MS),
  });
  const d = (updating ? live.data?.batch.dashboards : undefined) ?? batch.dashboards;
  const current = d?.state === "current";
  const wasUpdating = useRef(false);
  useEffect(() => {
    if (d?.state === "updating") wasUpdating.current = true;
    else if (current && wasUpdating.current) {
      wasUpdating.current = false;
      void qc.invalidateQueries({ queryKey: overviewQueries.all() });
    }
  }, [d?.state, current, qc]);
  const words = dashboardsInWords(d);
  if (!words) return null;
  return (
    <p role="status" aria-live="polite" className={`text-sm ${current ? "text-ok" : "text-muted"}`}>
      {!current && <span aria-hidden className="mr-1 inline-block h-2 w-2 animate-pulse rounded-full bg-ochre align-middle" />}
      {words}
    </p>
  );
}
