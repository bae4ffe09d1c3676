import type { ImportPreview as Preview } from "@shared/schemas/imports";
import { Counts } from "./counts";
import { cellText, previewColumns } from "../import-words";
import { useFormat } from "@/lib/use-format";

const th = "whitespace-nowrap border-b border-line px-2 py-1.5 font-semibold";
const td = "whitespace-nowrap border-b border-line/60 px-2 py-1 align-top";

/** What a check found over the whole file, nothing stored: counts, header notes, shops, first rows and first rejects. */
export function ImportPreview({ preview, fileLabel }: { preview: Preview; fileLabel: string }) {
  const fmt = useFormat();
  const { header } = preview;
  const columns = preview.columns?.length ? preview.columns : previewColumns(preview.rows);
  const rawWidth = Math.max(1, ...preview.rejects.map((r) => r.raw.length));
  return (
    <div className="space-y-4">
      <Counts
        label={`What loading ${fileLabel} would do`}
        items={[
          ["Rows read", preview.read],
          ["Would insert", preview.inserted],
          ["Would update", preview.updated],
          ["Unchanged", preview.unchanged],
          ["Rejected", preview.rejected],
        ]}
      />

      {(header.ignored.length > 0 || header.absent.length > 0 || header.encoding || preview.mergedLines.length > 0) && (
        <div className="space-y-2 rounded border border-line bg-paper/60 p-3 text-sm">
          <h4 className="font-semibold">About the file's layout</h4>
          {header.encoding && <p>Encoding: {header.encoding}.</p>}
          {header.ignored.length > 0 && (
            <div>
              <p>Columns ignored:</p>
              <ul className="ml-5 list-disc">
                {header.ignored.map((c) => (
                  <li key={c.position}>
                    column {c.position} <q className="font-mono">{c.column}</q>: {c.reason}
                  </li>
                ))}
              </ul>
            </div>
          )}
          {header.absent.length > 0 && (
            <p>
              Not in this file, so left as stored on the rows it updates: {header.absent.map((a, i) => <span key={a}>{i > 0 && ", "}<span className="font-mono">{a}</span></span>)}.
            </p>
          )}
          {preview.mergedLines.length > 0 && (
            <div>
              <p>Lines a quote left open ran together (each line was read on its own):</p>
              <ul className="ml-5 list-disc">
                {preview.mergedLines.map((m) => (
                  <li key={m.first}>{m.first === m.last ? `line ${fmt.count(m.first)}` : `lines ${fmt.count(m.first)}–${fmt.count(m.last)}`}</li>
                ))}
              </ul>
            </div>
          )}
        </div>
      )}

      {preview.shops.length > 0 && (
        <p className="text-sm">
          <span className="font-semibold">Shops named in the rows: </span>
          {preview.shops.map((s, i) => (
            <span key={s.code}>{i > 0 && ", "}<span className="font-mono">{s.code}</span> ({fmt.count(s.rows)} {s.rows === 1 ? "row" : "rows"})</span>
          ))}
        </p>
      )}

      {preview.rows.length > 0 && (
        <div>
          <h4 className="mb-1 text-sm font-semibold">First rows as they would land</h4>
          <div className="overflow-x-auto rounded border border-line">
            <table className="w-full text-left text-xs" aria-label={`First rows of ${fileLabel} as they would land`}>
              <thead className="bg-paper text-muted">
                <tr>
                  <th scope="col" className={th}>Line</th>
                  {columns.map((c) => <th key={c} scope="col" className={`${th} font-mono`}>{c}</th>)}
                </tr>
              </thead>
              <tbody>
                {preview.rows.map((r) => (
                  <tr key={r.line}>
                    <td className={`${td} tabular-nums`}>{fmt.count(r.line)}</td>
                    {columns.map((c) => <td key={c} className={`${td} tabular-nums`}>{c in r.values ? cellText(r.values[c], fmt) : ""}</td>)}
                  </tr>
                ))}
              </tbody>
            </table>
          </div>
        </div>
      )}

      {preview.rejects.length > 0 && (
        <div>
          <h4 className="mb-1 text-sm font-semibold">First rejected rows{preview.rejected > preview.rejects.length && ` (${fmt.count(preview.rejects.length)} of ${fmt.count(preview.rejected)})`}</h4>
          <div className="overflow-x-auto rounded border border-line">
            <table className="w-full text-left text-xs" aria-label={`First rejected rows of ${fileLabel}`}>
              <thead className="bg-paper text-muted">
                <tr>
                  <th scope="col" className={th}>Line</th>
                  <th scope="col" className={th}>Reason</th>
                  <th scope="col" colSpan={rawWidth} className={th}>Fields as written</th>
                </tr>
              </thead>
              <tbody>
                {preview.rejects.map((r) => (
                  <tr key={r.line}>
                    <td className={`${td} tabular-nums`}>{fmt.count(r.line)}</td>
                    <td className="min-w-64 border-b border-line/60 px-2 py-1 align-top">
                      {r.reason}
                    </td>
                    {Array.from({ length: rawWidth }, (_, i) => <td key={i} className={`${td} font-mono`}>{r.raw[i] ?? ""}</td>)}
                  </tr>
                ))}
              </tbody>
            </table>
          </div>
        </div>
      )}
    </div>
  );
}
