import type { ReactNode } from "react";
import { Link } from "react-router-dom";
import { dateTimeInWords } from "@/features/imports/import-words";

interface Saved {
  version: number;
  savedBy: string;
  savedAt: string;
  note: string | null;
}

/**
 * The versions of something an admin edits (an import profile, a warranty policy): who saved each, when and why,
 * with columns of the caller's after them; each version links to itself, the one shown is highlighted.
 */
export function VersionHistory<H extends Saved>(props: {
  label: string;
  history: readonly H[];
  current: number;
  hrefOf: (version: number) => string;
  extra: { header: string; cell: (h: H) => ReactNode; numeric?: boolean }[];
}) {
  const th = "border-b border-line px-2 py-1.5";
  return (
    <div className="overflow-x-auto">
      <table className="w-full text-left text-sm" aria-label={props.label}>
        <thead className="text-muted">
          <tr>
            <th scope="col" className={th}>Version</th>
            <th scope="col" className={th}>Saved by</th>
            <th scope="col" className={th}>When</th>
            <th scope="col" className={th}>Why</th>
            {props.extra.map((c) => <th key={c.header} scope="col" className={`${th}${c.numeric ? " text-right" : ""}`}>{c.header}</th>)}
          </tr>
        </thead>
        <tbody>
          {props.history.map((h) => (
            <tr key={h.version} className={h.version === props.current ? "bg-accent-soft/40" : ""}>
              <td className="px-2 py-1.5"><Link to={props.hrefOf(h.version)} className="text-accent underline">{h.version}</Link></td>
              <td className="px-2 py-1.5">{h.savedBy === "defaults" ? "shipped with Ironledger" : h.savedBy}</td>
              <td className="whitespace-nowrap px-2 py-1.5">{dateTimeInWords(h.savedAt)}</td>
              <td className="px-2 py-1.5">{h.note ?? "—"}</td>
              {props.extra.map((c) => <td key={c.header} className={`px-2 py-1.5${c.numeric ? " text-right tabular-nums" : " text-xs"}`}>{c.cell(h)}</td>)}
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}
