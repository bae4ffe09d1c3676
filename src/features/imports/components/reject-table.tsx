import { Link } from "react-router-dom";
import type { RejectPage } from "@shared/schemas/imports";
import { batchPath } from "../batch-path";
import { useFormat } from "@/lib/use-format";


const th = "whitespace-nowrap border-b border-line px-2 py-1.5 font-semibold";
const td = "whitespace-nowrap border-b border-line/60 px-2 py-1 align-top";

/** A page of rejects: line and reason, then the row's raw fields under the file's own column names. */
export function RejectTable({ page, loading }: { page: RejectPage; loading: boolean }) {
  const fmt = useFormat();
  const fixed = page.rows.some((r) => r.fixedBy !== null);
  return (
    <div aria-busy={loading} className={`overflow-x-auto rounded border border-line transition-opacity ${loading ? "opacity-60" : ""}`}>
      <table className="w-full text-left text-xs" aria-label={`Rejects of batch ${page.batch.id}`}>
        <thead className="bg-paper text-muted">
          <tr>
            <th scope="col" className={th}>Line</th>
            <th scope="col" className={th}>Reason</th>
            {fixed && <th scope="col" className={th}>Since</th>}
            {page.columns.map((c, i) => <th key={`${i}-${c}`} scope="col" className={`${th} font-mono`}>{c}</th>)}
          </tr>
        </thead>
        <tbody>
          {page.rows.map((r) => (
            <tr key={r.line}>
              <td className={`${td} tabular-nums`}>{fmt.count(r.line)}</td>
              {/* narrower on a phone, so the "fixed by batch" beside it stays in sight */}
              <td className="min-w-40 border-b border-line/60 px-2 py-1 align-top sm:min-w-72">
                {r.reason}
              </td>
              {fixed && (
                <td className={td}>
                  {r.fixedBy && <Link to={batchPath(r.fixedBy)} className="text-ok hover:underline">fixed by batch {r.fixedBy}</Link>}
                </td>
              )}
              {page.columns.map((c, i) => <td key={`${i}-${c}`} className={`${td} max-w-80 truncate font-mono`} title={r.raw[c]}>{r.raw[c] ?? ""}</td>)}
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}
