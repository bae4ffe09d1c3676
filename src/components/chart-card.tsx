import { useState, type ReactNode } from "react";
import type * as Plot from "@observablehq/plot";
import { PlotFigure } from "./plot-figure";
import { downloadText, tableCsv, type CsvColumn } from "@/lib/csv";
import { useFormat } from "@/lib/use-format";

export interface ChartColumn extends CsvColumn {
  format?: (v: unknown) => string;
}

/**
 * A titled chart with a "Table" toggle showing the same numbers and a CSV download of them.
 * `options` is a pure Plot spec built from `rows`.
 */
export function ChartCard(props: {
  title: string;
  subtitle?: ReactNode;
  options: Plot.PlotOptions;
  rows: readonly Record<string, unknown>[];
  columns: readonly ChartColumn[];
  filename: string;
  footer?: ReactNode;
}) {
  const [table, setTable] = useState(false);
  const fmt = useFormat();
  // a column without its own rule still groups thousands in the reader's locale
  const cell = (c: ChartColumn, v: unknown) => (c.format ? c.format(v) : typeof v === "number" ? fmt.quantity("plain", v) : String(v ?? ""));
  return (
    <section className="rounded-lg border border-line bg-card p-4 shadow-sm" aria-label={props.title}>
      <div className="mb-2 flex flex-wrap items-start justify-between gap-2">
        <div>
          <h2 className="text-base font-semibold">{props.title}</h2>
          {props.subtitle && <p className="text-sm text-muted">{props.subtitle}</p>}
        </div>
        <div className="flex gap-2 text-sm">
          <button type="button" aria-pressed={table} onClick={() => setTable((t) => !t)} className="rounded border border-line px-2 py-1 hover:bg-paper">
            {table ? "Chart" : "Table"}
          </button>
          <button
            type="button"
            onClick={() => downloadText(props.filename, tableCsv(props.columns, props.rows))}
            className="rounded border border-line px-2 py-1 hover:bg-paper"
          >
            CSV
          </button>
        </div>
      </div>
      {table ? (
        <div className="max-h-96 overflow-auto">
          <table className="w-full text-left text-sm">
            <thead className="sticky top-0 bg-card text-muted">
              <tr>{props.columns.map((c) => <th key={c.key} className="border-b border-line py-1 pr-3">{c.label}</th>)}</tr>
            </thead>
            <tbody>
              {props.rows.map((r, i) => (
                <tr key={i} className="border-b border-line/50">
                  {props.columns.map((c) => <td key={c.key} className="py-1 pr-3 tabular-nums">{cell(c, r[c.key])}</td>)}
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      ) : (
        <PlotFigure options={props.options} label={props.title} />
      )}
      {props.footer && <div className="mt-2 text-xs text-muted">{props.footer}</div>}
    </section>
  );
}
