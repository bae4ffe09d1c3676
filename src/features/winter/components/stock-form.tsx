import { useForm } from "react-hook-form";
import { zodResolver } from "@hookform/resolvers/zod";
import { z } from "zod";
import { winterStockInputSchema } from "@shared/schemas/winter";
import { useSaveStock } from "../api/winter-queries";

// typed as text, read as a whole number by the rule the server applies (shared/schemas/winter.ts)
const stockFormSchema = z.object({
  quantity: z
    .string()
    .transform((s) => (/^\s*\d+\s*$/.test(s) ? Number(s) : Number.NaN))
    .pipe(winterStockInputSchema.shape.quantity),
});
type FormIn = z.input<typeof stockFormSchema>;
type FormOut = z.output<typeof stockFormSchema>;

/** Stock on hand of one part at one shop: saved to the shop's stock, after which the gap is worked out again. */
export function StockForm({ shopCode, partNumber, onHand }: { shopCode: string; partNumber: string; onHand: number | null }) {
  const save = useSaveStock();
  const form = useForm<FormIn, unknown, FormOut>({ resolver: zodResolver(stockFormSchema), values: { quantity: onHand === null ? "" : String(onHand) } });
  const id = `stock-${shopCode}-${partNumber}`.replace(/[^A-Za-z0-9_-]/g, "_");
  const error = form.formState.errors.quantity?.message ?? (save.error instanceof Error ? save.error.message : undefined);
  return (
    <form
      noValidate
      className="flex flex-wrap items-center gap-1"
      onSubmit={form.handleSubmit((v) => save.mutate({ shopCode, partNumber, quantity: v.quantity }))}
    >
      <label htmlFor={id} className="sr-only">Stock on hand of {partNumber} at {shopCode}</label>
      <input
        id={id}
        {...form.register("quantity")}
        inputMode="numeric"
        autoComplete="off"
        aria-invalid={!!error}
        aria-describedby={error ? `${id}-error` : undefined}
        className="w-20 rounded border border-line bg-white px-2 py-1 text-right text-sm tabular-nums aria-[invalid=true]:border-alert"
      />
      <button type="submit" disabled={save.isPending} className="rounded border border-line bg-white px-2 py-1 text-xs hover:border-accent disabled:opacity-60">
        {save.isPending ? "Saving…" : "Save"}
        <span className="sr-only"> stock of {partNumber} at {shopCode}</span>
      </button>
      {error && <p id={`${id}-error`} role="alert" className="w-full text-xs text-alert">{error}</p>}
    </form>
  );
}
