import { useMemo, useState, type ReactNode } from "react";
import { Link } from "react-router-dom";
import {
  columnVisibilityFeature,
  createColumnHelper,
  rowSortingFeature,
  tableFeatures,
  useTable,
  type ColumnVisibilityState,
  type SortingState,
} from "@tanstack/react-table";
import type { RepairRow, RepairSortKey } from "@shared/schemas/repairs";
import { linesInWords } from "../total-in-words";
import { SortedTable } from "@/components/sorted-table";
import { useFormat } from "@/lib/use-format";
import type { Format } from "@shared/format";

const features = tableFeatures({ rowSortingFeature, columnVisibilityFeature });
const col = createColumnHelper<typeof features, RepairRow>();
/** Column id = server sort key where the server can sort by it; figures and dates in the reader's locale. */
const columnsFor = (fmt: Format) => col.columns([
  col.accessor("openedDate", { id: "opened", header: "Opened", cell: (i) => fmt.date(i.getValue()) }),
  col.accessor("shopCode", { id: "shop", header: "Shop" }),
  col.accessor("roNumber", { id: "ro", header: "Repair order", cell: (i) => <Link className="text-accent hover:underline" to={`/repairs/${i.row.original.id}`}>{i.getValue()}/{i.row.original.lineNo}</Link> }),
  col.accessor("serial", { id: "serial", header: "Serial" }),
  col.accessor("modelLine", { id: "model", header: "Model" }),
  col.accessor("engineFamily", { id: "engineFamily", header: "Engine family" }),
  col.accessor("componentName", { id: "component", header: "Component" }),
  col.accessor("lineType", { id: "lineType", header: "Line type" }),
  col.accessor("payType", { id: "payType", header: "Pay type" }),
  col.accessor("hourMeter", { id: "hours", header: "Hour meter (h)", cell: (i) => fmt.quantity("hours", i.getValue()) }),
  col.accessor("laborHours", { id: "laborHours", header: "Labour (h)", cell: (i) => fmt.quantity("plain", i.getValue()) }),
  col.accessor("complaint", { id: "complaint", header: "Complaint", enableSorting: false, cell: (i) => i.getValue() ?? "—" }),
  col.accessor("cause", { id: "cause", header: "Cause", enableSorting: false, cell: (i) => i.getValue() ?? "—" }),
  col.accessor("supplierLot", { id: "lot", header: "Supplier lot", enableSorting: false, cell: (i) => i.getValue() ?? "—" }),
  col.accessor("closedDate", { id: "closed", header: "Closed", cell: (i) => (i.getValue() === null ? "open" : fmt.date(i.getValue())) }),
]);

const HIDDEN_BY_DEFAULT: ColumnVisibilityState = { engineFamily: false, laborHours: false, cause: false, lot: false, closed: false };

/**
 * Repair lines paged, sorted and filtered on the server: the table only shows the page it is given, with the
 * total in words, and reports sorting changes back. While the next page loads (`loading`) the rows on screen
 * stay, dimmed; `pager` goes below them.
 */
export function RepairTable(props: {
  rows: RepairRow[];
  total: number;
  totalIsEstimate: boolean;
  loading: boolean;
  sort: { id: RepairSortKey; desc: boolean };
  onSort: (s: { id: RepairSortKey; desc: boolean }) => void;
  pager: ReactNode;
}) {
  const fmt = useFormat();
  const columns = useMemo(() => columnsFor(fmt), [fmt]);
  const [visibility, setVisibility] = useState<ColumnVisibilityState>(HIDDEN_BY_DEFAULT);
  const [chooser, setChooser] = useState(false);
  const sorting: SortingState = [{ id: props.sort.id, desc: props.sort.desc }];
  const table = useTable({
    features,
    columns,
    data: props.rows,
    getRowId: (r) => r.id,
    manualSorting: true,
    enableSortingRemoval: false,
    state: { sorting, columnVisibility: visibility },
    onSortingChange: (u) => {
      const next = typeof u === "function" ? u(sorting) : u;
      if (next[0]) props.onSort({ id: next[0].id as RepairSortKey, desc: next[0].desc });
    },
    onColumnVisibilityChange: (u) => setVisibility((v) => (typeof u === "function" ? u(v) : u)),
  });
  return (
    <div>
      <div className="mb-2 flex flex-wrap items-center justify-between gap-2 text-sm">
        <p className="text-muted">{linesInWords(props.total, props.totalIsEstimate, fmt)}</p>
        <div className="relative">
          <button type="button" aria-expanded={chooser} onClick={() => setChooser((c) => !c)} className="rounded border border-line bg-white px-3 py-1">Columns</button>
          {chooser && (
            <fieldset className="absolute right-0 z-10 mt-1 w-56 rounded border border-line bg-card p-2 shadow-lg">
              <legend className="sr-only">Columns shown</legend>
              {table.getAllLeafColumns().map((c) => (
                <label key={c.id} className="flex items-center gap-2 py-0.5">
                  <input type="checkbox" checked={c.getIsVisible()} onChange={() => c.toggleVisibility()} />
                  {String(c.columnDef.header)}
                </label>
              ))}
            </fieldset>
          )}
        </div>
      </div>
      <div aria-busy={props.loading} className={`overflow-x-auto rounded border border-line transition-opacity ${props.loading ? "opacity-60" : ""}`}>
        <SortedTable table={table} cellClass="max-w-72 truncate px-2 py-1.5 tabular-nums" />
      </div>
      {props.pager}
    </div>
  );
}
