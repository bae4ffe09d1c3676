import { Link } from "react-router-dom";
import { createColumnHelper, tableFeatures, useTable } from "@tanstack/react-table";
import { apiPaths } from "@shared/api-paths";
import type { Batch } from "@shared/schemas/imports";
import { batchPath } from "../batch-path";
import { kindLabels, secondsInWords } from "../import-words";
import { useFormat } from "@/lib/use-format";
import { useMemo } from "react";
import type { Format } from "@shared/format";
import { BatchStatus } from "./status-pill";

const features = tableFeatures({});
const col = createColumnHelper<typeof features, Batch>();
const columnsFor = (fmt: Format) => {
  const figure = (header: string) => ({ header, cell: (i: { getValue: () => number }) => fmt.count(i.getValue()), meta: { numeric: true } });
  return col.columns([
    col.accessor("fileName", {
      id: "file",
      header: "File",
      cell: (i) => (
        <span className="flex flex-col">
          <Link to={batchPath(i.row.original.id)} className="max-w-64 truncate font-semibold text-accent hover:underline" title={i.getValue()}>{i.getValue()}</Link>
          <span className="text-xs text-muted">
            batch {i.row.original.id}
            {i.row.original.importId && <> · <a href={apiPaths.importFile(i.row.original.importId)} download={i.getValue()} className="hover:underline">original<span className="sr-only"> of {i.getValue()}</span></a></>}
          </span>
        </span>
      ),
    }),
    col.accessor("kind", { header: "Kind", cell: (i) => kindLabels[i.getValue()] }),
    col.accessor("profile", {
      header: "Profile",
      cell: (i) => (
        <span className="font-mono" title={i.row.original.profileVersion === null ? undefined : `version ${i.row.original.profileVersion} of the profile`}>
          {i.getValue()}
          {i.row.original.profileVersion !== null && <span className="text-muted"> v{i.row.original.profileVersion}</span>}
        </span>
      ),
    }),
    col.accessor("shop", { header: "Shop", cell: (i) => <span className="font-mono">{i.getValue() ?? "several"}</span> }),
    col.accessor("loadedBy", { header: "By" }),
    col.accessor("startedAt", { header: "When", cell: (i) => <time dateTime={i.getValue()}>{fmt.dateTime(i.getValue())}</time> }),
    col.accessor("durationMs", { header: "Took", cell: (i) => (i.getValue() === null ? "—" : secondsInWords(i.getValue()! / 1000)) }),
    col.accessor("status", { header: "Status", cell: (i) => <BatchStatus status={i.getValue()} /> }),
    col.accessor("read", figure("Read")),
    col.accessor("inserted", figure("Inserted")),
    col.accessor("updated", figure("Updated")),
    col.accessor("unchanged", figure("Unchanged")),
    col.accessor("rejected", {
      header: "Rejected",
      meta: { numeric: true },
      cell: (i) =>
        i.getValue() === 0 ? "0" : (
          <Link to={batchPath(i.row.original.id)} className="font-semibold text-alert hover:underline">
            {fmt.count(i.getValue())}<span className="sr-only"> rejects of batch {i.row.original.id}</span>
          </Link>
        ),
    }),
  ]);
};

/** The load history, newest first: one row per batch, each leading to its rejects. Scrolls sideways on a phone. */
export function BatchTable({ batches }: { batches: Batch[] }) {
  const fmt = useFormat();
  const columns = useMemo(() => columnsFor(fmt), [fmt]);
  const table = useTable({ features, columns, data: batches, getRowId: (b) => b.id });
  return (
    // relative: the screen-reader-only spans in the cells are absolutely placed and would otherwise widen the page
    <div className="relative overflow-x-auto rounded border border-line">
      <table className="w-full text-left text-sm" aria-label="Load history">
        <thead className="bg-paper text-muted">
          {table.getHeaderGroups().map((g) => (
            <tr key={g.id}>
              {g.headers.map((h) => (
                <th key={h.id} scope="col" className={`whitespace-nowrap border-b border-line px-2 py-1.5 font-semibold ${(h.column.columnDef.meta as { numeric?: boolean } | undefined)?.numeric ? "text-right" : ""}`}>
                  <table.FlexRender header={h} />
                </th>
              ))}
            </tr>
          ))}
        </thead>
        <tbody>
          {table.getRowModel().rows.map((r) => (
            <tr key={r.id} className="border-b border-line/60 align-top hover:bg-accent-soft/40">
              {r.getAllCells().map((c) => (
                <td key={c.id} className={`whitespace-nowrap px-2 py-1.5 ${(c.column.columnDef.meta as { numeric?: boolean } | undefined)?.numeric ? "text-right tabular-nums" : ""}`}>
                  <table.FlexRender cell={c} />
                </td>
              ))}
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}
