import { PAGE_SIZES } from "../repair-list-params";
import { countInWords } from "../total-in-words";
import { useFormat } from "@/lib/use-format";

/**
 * First / Previous / Next through the repair list, the page number out of the (maybe estimated) number of
 * pages, and the page size. A step is null where there is no page to go to; while a page loads, the steps
 * wait for it (the buttons would otherwise lead from the page still on screen).
 */
export function RepairPager(props: {
  page: number;
  pageSize: number;
  total: number;
  totalIsEstimate: boolean;
  loading: boolean;
  onFirst: (() => void) | null;
  onPrevious: (() => void) | null;
  onNext: (() => void) | null;
  onPageSize: (n: number) => void;
}) {
  const fmt = useFormat();
  const pages = Math.max(1, Math.ceil(props.total / props.pageSize), props.page);
  const step = (label: string, go: (() => void) | null) => (
    <button type="button" disabled={!go || props.loading} onClick={go ?? undefined} className="rounded border border-line bg-white px-3 py-1 disabled:opacity-40">
      {label}
    </button>
  );
  return (
    <nav aria-label="Pages" className="mt-2 flex flex-wrap items-center gap-2 text-sm">
      {step("First", props.onFirst)}
      {step("Previous", props.onPrevious)}
      <span aria-live="polite">Page {fmt.count(props.page)} of {countInWords(pages, props.totalIsEstimate, fmt)}</span>
      {step("Next", props.onNext)}
      <label className="ml-auto">Rows per page{" "}
        <select value={props.pageSize} onChange={(e) => props.onPageSize(Number(e.target.value))} className="rounded border border-line bg-white px-1 py-0.5">
          {PAGE_SIZES.map((n) => <option key={n} value={n}>{fmt.count(n)}</option>)}
        </select>
      </label>
    </nav>
  );
}
