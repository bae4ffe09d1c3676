import { useForm } from "react-hook-form";
import { zodResolver } from "@hookform/resolvers/zod";
import { z } from "zod";
import { useState } from "react";
import { ErrorNotice } from "@/components/ui/states";
import { useClaimActions } from "@/features/claims/api/claim-queries";
import type { ClaimDetail, ClaimStatus } from "@shared/schemas/claims";

const actionLabels: Record<ClaimStatus, string> = {
  draft: "Back to draft",
  submitted: "Mark submitted",
  accepted: "Record acceptance",
  rejected: "Record rejection",
  credited: "Record credit",
};

const formSchema = z.object({
  reason: z.string().trim().max(2000).optional(),
  amount: z.union([z.literal(""), z.coerce.number().positive("Enter the amount credited, greater than zero.")]).optional(),
});

/** The moves the claim may make next; a rejection asks for the maker's reason and a credit for the amount. */
export function StatusActions({ claim }: { claim: ClaimDetail }) {
  const { move } = useClaimActions(claim.id);
  const [target, setTarget] = useState<ClaimStatus | null>(null);
  const form = useForm<z.input<typeof formSchema>, unknown, z.output<typeof formSchema>>({ resolver: zodResolver(formSchema), defaultValues: { reason: "", amount: "" } });
  if (claim.allowedMoves.length === 0) return <p className="text-sm text-muted">This claim is closed: no further status moves.</p>;
  const submit = form.handleSubmit((v) => {
    if (!target) return;
    if (target === "rejected" && !v.reason) return form.setError("reason", { message: "Enter the maker's reason for the rejection." });
    if (target === "credited" && (v.amount === "" || v.amount === undefined)) return form.setError("amount", { message: "Enter the amount credited." });
    move.mutate(
      { to: target, reason: target === "rejected" ? v.reason : undefined, amount: target === "credited" && typeof v.amount === "number" ? v.amount : undefined },
      { onSuccess: () => { setTarget(null); form.reset(); } },
    );
  });
  const needsForm = target === "rejected" || target === "credited";
  return (
    <div className="space-y-2">
      <div className="flex flex-wrap gap-2">
        {claim.allowedMoves.map((to) => (
          <button
            key={to}
            type="button"
            disabled={move.isPending}
            onClick={() => {
              if (to === "rejected" || to === "credited") setTarget(to);
              else move.mutate({ to });
            }}
            className={`rounded px-3 py-1.5 text-sm font-semibold ${to === "rejected" ? "border border-alert text-alert" : "bg-slate text-paper"}`}
          >
            {actionLabels[to]}
          </button>
        ))}
      </div>
      {needsForm && (
        <form onSubmit={submit} className="space-y-2 rounded border border-line p-3" aria-label={actionLabels[target!]}>
          {target === "rejected" ? (
            <label className="block text-sm">
              Maker's reason
              <textarea {...form.register("reason")} rows={2} className="mt-1 block w-full rounded border border-line p-2" />
              {form.formState.errors.reason && <span role="alert" className="text-xs text-alert">{form.formState.errors.reason.message}</span>}
            </label>
          ) : (
            <label className="block text-sm">
              Amount credited
              <input {...form.register("amount")} inputMode="decimal" className="mt-1 block w-40 rounded border border-line p-2" />
              {form.formState.errors.amount && <span role="alert" className="text-xs text-alert">{form.formState.errors.amount.message}</span>}
            </label>
          )}
          <div className="flex gap-2">
            <button type="submit" className="rounded bg-accent px-3 py-1.5 text-sm font-semibold text-white">Save</button>
            <button type="button" onClick={() => setTarget(null)} className="rounded border border-line px-3 py-1.5 text-sm">Cancel</button>
          </div>
        </form>
      )}
      {move.isError && <ErrorNotice error={move.error} />}
    </div>
  );
}
