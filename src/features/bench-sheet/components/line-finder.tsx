import { useState } from "react";
import { useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
import { useForm } from "react-hook-form";
import { zodResolver } from "@hookform/resolvers/zod";
import type { z } from "zod";
import { useFormat } from "@/lib/use-format";
import { ErrorNotice } from "@/components/ui/states";
import { benchCreateLineSchema, type BenchCreateLine, type BenchLine } from "@shared/schemas/bench-sheet";
import { benchSheetQueries, createBenchLine } from "../api/bench-sheet-queries";

const input = "min-h-11 w-full rounded-lg border-2 border-slate/60 bg-card px-3 text-lg";
const primary = "min-h-11 rounded-lg bg-accent px-4 text-base font-semibold text-white";

/** Finds an open repair-order line of the technician's shops by serial or RO number. */
export function LineFinder({ onPick }: { onPick: (line: BenchLine) => void }) {
  const fmt = useFormat();
  const [typed, setTyped] = useState("");
  const [q, setQ] = useState("");
  const found = useQuery(benchSheetQueries.search(q));
  return (
    <section aria-labelledby="bench-find" className="rounded-xl border border-line bg-card p-4">
      <h2 id="bench-find" className="mb-2 text-lg font-bold">Find the repair-order line</h2>
      <form
        role="search"
        onSubmit={(e) => {
          e.preventDefault();
          setQ(typed.trim());
        }}
        className="flex flex-wrap items-end gap-2"
      >
        <div className="min-w-0 flex-1">
          <label htmlFor="bench-q" className="mb-1 block text-sm font-semibold">Serial or RO number</label>
          <input id="bench-q" value={typed} onChange={(e) => setTyped(e.target.value)} autoCapitalize="characters" autoComplete="off" enterKeyHint="search" className={input} />
        </div>
        <button type="submit" className={primary}>Find</button>
      </form>
      {q.length > 0 && q.length < 2 && <p className="mt-2 text-sm text-alert">Search needs at least 2 characters (an RO number or a serial).</p>}
      {found.isError && <div className="mt-3"><ErrorNotice error={found.error} onRetry={() => void found.refetch()} /></div>}
      {found.data && (
        <div className="mt-3">
          <p className="text-sm text-muted" role="status">
            {found.data.lines.length === 0
              ? `No open line matches "${q}" (open: no close date, or closed in the last ${found.data.openDays} days).`
              : `${found.data.lines.length} open ${found.data.lines.length === 1 ? "line matches" : "lines match"} "${q}".`}
          </p>
          <ul className="mt-2 space-y-2">
            {found.data.lines.map((l) => (
              <li key={l.id}>
                <button type="button" onClick={() => onPick(l)} className="block min-h-11 w-full rounded-lg border-2 border-line bg-paper p-3 text-left hover:border-accent">
                  <span className="block font-bold">RO {l.roNumber}, line {l.lineNo} · {l.serial}</span>
                  <span className="block text-sm">{[l.shopCode, l.modelLine, l.engineFamily, `opened ${fmt.date(l.openedDate)}`].filter(Boolean).join(" · ")}</span>
                  {l.complaint && <span className="block text-sm text-muted">{l.complaint}</span>}
                  {l.sheetReadings > 0 && <span className="block text-sm font-semibold">{fmt.count(l.sheetReadings)} readings already on a sheet</span>}
                </button>
              </li>
            ))}
          </ul>
        </div>
      )}
    </section>
  );
}

type FormIn = z.input<typeof benchCreateLineSchema>;

/** A line the shop's system has not exported yet, written by the technician. */
export function NewLineForm({ shops, onCreated }: { shops: readonly string[]; onCreated: (line: BenchLine) => void }) {
  const qc = useQueryClient();
  const form = useForm<FormIn, unknown, BenchCreateLine>({
    resolver: zodResolver(benchCreateLineSchema),
    defaultValues: { shopCode: shops[0] ?? "", roNumber: "", lineNo: 1, serial: "", openedDate: new Date().toISOString().slice(0, 10), complaint: "" },
  });
  const create = useMutation({
    mutationFn: createBenchLine,
    onSuccess: (d) => {
      void qc.invalidateQueries({ queryKey: benchSheetQueries.all() });
      qc.setQueryData(benchSheetQueries.line(d.line.id).queryKey, d);
      onCreated(d.line);
    },
  });
  const { errors } = form.formState;
  const field = (name: keyof FormIn, label: string, el: React.ReactNode) => (
    <div>
      <label htmlFor={`bench-new-${name}`} className="mb-1 block text-sm font-semibold">{label}</label>
      {el}
      {errors[name] && <p id={`bench-new-${name}-error`} className="mt-1 text-sm font-semibold text-alert">{label} {errors[name]?.message}</p>}
    </div>
  );
  const aria = (name: keyof FormIn) => ({ id: `bench-new-${name}`, "aria-invalid": !!errors[name] || undefined, "aria-describedby": errors[name] ? `bench-new-${name}-error` : undefined });
  return (
    <form aria-label="New repair-order line" onSubmit={form.handleSubmit((v) => create.mutate(v))} className="space-y-3" noValidate>
      <div className="grid gap-3 sm:grid-cols-2">
        {field("shopCode", "Shop", (
          <select {...aria("shopCode")} {...form.register("shopCode")} className={input}>
            {shops.map((s) => <option key={s} value={s}>{s}</option>)}
          </select>
        ))}
        {field("serial", "Serial", <input {...aria("serial")} {...form.register("serial")} autoCapitalize="characters" className={input} />)}
        {field("roNumber", "RO number", <input {...aria("roNumber")} {...form.register("roNumber")} className={input} />)}
        {field("lineNo", "Line", <input {...aria("lineNo")} {...form.register("lineNo", { valueAsNumber: true })} inputMode="numeric" className={input} />)}
        {field("openedDate", "Opened", <input {...aria("openedDate")} type="date" {...form.register("openedDate")} className={input} />)}
      </div>
      {field("complaint", "Complaint", <textarea {...aria("complaint")} {...form.register("complaint")} rows={2} className={`${input} py-2`} />)}
      {create.isError && <ErrorNotice error={create.error} />}
      <button type="submit" disabled={create.isPending} className={primary}>{create.isPending ? "Adding…" : "Add the line"}</button>
    </form>
  );
}
