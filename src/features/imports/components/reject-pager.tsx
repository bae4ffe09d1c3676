import { REJECT_PAGE_SIZES } from "../reject-params";
import { useFormat } from "@/lib/use-format";


/** Previous / Next by offset, where the page sits among the rejects the filter keeps, and the page size. */
export function RejectPager(props: { offset: number; limit: number; total: number; loading: boolean; onOffset: (offset: number) => void; onLimit: (limit: number) => void }) {
  const fmt = useFormat();
  const { offset, limit, total } = props;
  const last = Math.min(total, offset + limit);
  const step = (label: string, to: number | null) => (
    <button type="button" disabled={to === null || props.loading} onClick={to === null ? undefined : () => props.onOffset(to)} className="rounded border border-line bg-white px-3 py-1 disabled:opacity-40">
      {label}
    </button>
  );
  return (
    <nav aria-label="Pages of rejects" className="mt-2 flex flex-wrap items-center gap-2 text-sm">
      {step("Previous", offset > 0 ? Math.max(0, offset - limit) : null)}
      <span aria-live="polite" className="tabular-nums">{total === 0 ? "No rows" : `Rows ${fmt.count(offset + 1)}–${fmt.count(last)} of ${fmt.count(total)}`}</span>
      {step("Next", last < total ? offset + limit : null)}
      <label className="ml-auto">
        Rows per page{" "}
        <select value={limit} onChange={(e) => props.onLimit(Number(e.target.value))} className="rounded border border-line bg-white px-1 py-0.5">
          {REJECT_PAGE_SIZES.map((n) => <option key={n} value={n}>{n}</option>)}
        </select>
      </label>
    </nav>
  );
}
