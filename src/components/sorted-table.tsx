import type { ReactTable } from "@tanstack/react-table";
import type { columnVisibilityFeature, rowSortingFeature } from "@tanstack/react-table";

type Features = { rowSortingFeature: typeof rowSortingFeature; columnVisibilityFeature: typeof columnVisibilityFeature };

/**
 * A table whose rows the server sorted and paged: header buttons report sorting (with aria-sort), the body shows
 * the rows it is given. `cellClass` styles the cells; `rowTitle` gives a row a tooltip.
 */
export function SortedTable<TData extends object>(props: {
  table: ReactTable<Features, TData, unknown>;
  label?: string;
  cellClass?: string;
  rowTitle?: (row: TData) => string | undefined;
}) {
  const { table } = props;
  return (
    <table className="w-full text-left text-sm" aria-label={props.label}>
      <thead className="bg-paper text-muted">
        {table.getHeaderGroups().map((g) => (
          <tr key={g.id}>
            {g.headers.map((h) => {
              const sorted = h.column.getIsSorted();
              return (
                <th key={h.id} scope="col" aria-sort={sorted === "asc" ? "ascending" : sorted === "desc" ? "descending" : "none"} className="whitespace-nowrap border-b border-line px-2 py-1.5">
                  {h.column.getCanSort() ? (
                    <button type="button" onClick={h.column.getToggleSortingHandler()} className="font-semibold hover:text-ink">
                      <table.FlexRender header={h} /> {sorted === "asc" ? "↑" : sorted === "desc" ? "↓" : ""}
                    </button>
                  ) : (
                    <span className="font-semibold"><table.FlexRender header={h} /></span>
                  )}
                </th>
              );
            })}
          </tr>
        ))}
      </thead>
      <tbody>
        {table.getRowModel().rows.map((r) => (
          <tr key={r.id} className="border-b border-line/60 hover:bg-accent-soft/40" title={props.rowTitle?.(r.original)}>
            {r.getVisibleCells().map((c) => (
              <td key={c.id} className={props.cellClass ?? "px-2 py-1.5 tabular-nums"}><table.FlexRender cell={c} /></td>
            ))}
          </tr>
        ))}
      </tbody>
    </table>
  );
}
