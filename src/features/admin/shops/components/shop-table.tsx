import { createColumnHelper, tableFeatures, useTable } from "@tanstack/react-table";
import type { AdminShop } from "@shared/schemas/shops-admin";

const features = tableFeatures({});
const col = createColumnHelper<typeof features, AdminShop>();

const count = (n: number) => n.toLocaleString("en");
const orDash = (v: string | null) => v ?? <span className="text-muted">—</span>;
const place = (s: AdminShop) => (s.lat === null || s.lon === null ? null : `${s.lat}, ${s.lon}`);

/** One table of the register; `onEdit` opens a shop's form (its button comes first, in reach on a phone). Scrolls sideways on a phone. */
export function ShopTable({ shops, onEdit }: { shops: AdminShop[]; onEdit: (shop: AdminShop) => void }) {
  const columns = col.columns([
    col.display({
      id: "edit",
      header: () => <span className="sr-only">Edit</span>,
      cell: (i) => (
        <button type="button" onClick={() => onEdit(i.row.original)} className="rounded border border-slate bg-white px-2 py-1 text-xs font-semibold">
          Edit<span className="sr-only"> shop {i.row.original.code}</span>
        </button>
      ),
    }),
    col.accessor("code", { header: "Code", cell: (i) => <span className="font-mono font-semibold">{i.getValue()}</span> }),
    col.accessor("name", { header: "Name" }),
    col.accessor("region", { header: "Region", cell: (i) => orDash(i.getValue()) }),
    col.accessor("town", { header: "Town", cell: (i) => orDash(i.getValue()) }),
    col.accessor(place, { id: "place", header: "Lat, lon", cell: (i) => orDash(i.getValue()) }),
    col.accessor("climateZone", { header: "Climate zone", cell: (i) => orDash(i.getValue()) }),
    col.accessor("timeZone", { header: "Time zone", cell: (i) => orDash(i.getValue()) }),
    col.accessor("weatherStation", { header: "Weather station", cell: (i) => orDash(i.getValue()) }),
    col.accessor("exportProfile", { header: "Export profile", cell: (i) => (i.getValue() ? <span className="font-mono">{i.getValue()}</span> : orDash(null)) }),
    col.accessor("machines", { header: "Machines", cell: (i) => count(i.getValue()), meta: { numeric: true } }),
    col.accessor("repairLines", { header: "Repair lines", cell: (i) => count(i.getValue()), meta: { numeric: true } }),
  ]);
  const table = useTable({ features, columns, data: shops, getRowId: (s) => s.code });
  const numeric = (meta: unknown) => (meta as { numeric?: boolean } | undefined)?.numeric;
  return (
    // relative: the screen-reader-only spans in the cells are absolutely placed and would otherwise widen the page
    <div className="relative overflow-x-auto rounded border border-line">
      <table className="w-full text-left text-sm" aria-label="Registered shops">
        <thead className="bg-paper text-muted">
          {table.getHeaderGroups().map((g) => (
            <tr key={g.id}>
              {g.headers.map((h) => (
                <th key={h.id} scope="col" className={`whitespace-nowrap border-b border-line px-2 py-1.5 font-semibold ${numeric(h.column.columnDef.meta) ? "text-right" : ""}`}>
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
                <td key={c.id} className={`whitespace-nowrap px-2 py-1.5 ${numeric(c.column.columnDef.meta) ? "text-right tabular-nums" : ""}`}>
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
