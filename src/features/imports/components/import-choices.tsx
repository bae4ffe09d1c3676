import { useForm, useWatch } from "react-hook-form";
import { useQuery } from "@tanstack/react-query";
import { zodResolver } from "@hookform/resolvers/zod";
import { z } from "zod";
import { exportKinds, exportKindSchema, type Import, type ImportChoices } from "@shared/schemas/imports";
import { kindLabels } from "../import-words";
import { importQueries } from "../api/import-queries";

const formSchema = z.object({
  kind: z.union([z.literal(""), exportKindSchema]),
  profile: z.string().trim().max(100, "A profile name has at most 100 characters."),
  shop: z.string().trim().max(16, "A shop code has at most 16 characters."),
});

const input = "mt-1 block w-full rounded border border-line bg-white px-2 py-1 text-sm";

/**
 * Kind, profile and shop for the next check, prefilled with what the last check used (detected or chosen);
 * a blank choice lets the server detect it from the header. The parent keys this form by those values, so
 * it starts again from them after each check.
 */
export function ImportChoicesForm({ imp, pending, onCheck }: { imp: Import; pending: boolean; onCheck: (c: ImportChoices) => void }) {
  const form = useForm<z.input<typeof formSchema>, unknown, z.output<typeof formSchema>>({
    resolver: zodResolver(formSchema),
    defaultValues: { kind: imp.kind ?? "", profile: imp.profile ?? "", shop: imp.shop ?? "" },
  });
  const { errors } = form.formState;
  const id = (field: string) => `import-${imp.id}-${field}`;
  const profiles = useQuery(importQueries.profiles());
  const kind = useWatch({ control: form.control, name: "kind" });
  // the profiles of the chosen kind; the one the last check used stays choosable whatever it is
  const choosable = (profiles.data?.profiles ?? []).filter((p) => !kind || p.kind === kind || p.id === imp.profile);
  return (
    <form
      aria-label={`Choices for ${imp.fileName}`}
      onSubmit={form.handleSubmit((v) => onCheck({ kind: v.kind || null, profile: v.profile || null, shop: v.shop || null }))}
      className="grid gap-3 rounded border border-line p-3 sm:grid-cols-[1fr_1fr_11rem_auto] sm:items-end"
    >
      <div>
        <label htmlFor={id("kind")} className="text-sm font-semibold">Kind of export</label>
        <select id={id("kind")} {...form.register("kind")} className={input}>
          <option value="">Detect from the header</option>
          {exportKinds.map((k) => <option key={k} value={k}>{kindLabels[k]}</option>)}
        </select>
      </div>
      <div>
        <label htmlFor={id("profile")} className="text-sm font-semibold">Profile</label>
        <select id={id("profile")} {...form.register("profile")} defaultValue={imp.profile ?? ""} aria-invalid={!!errors.profile} className={`${input} font-mono`}>
          <option value="">Detect from the header</option>
          {imp.profile && !choosable.some((p) => p.id === imp.profile) && <option value={imp.profile}>{imp.profile}</option>}
          {choosable.map((p) => (
            <option key={p.id} value={p.id}>
              {p.id} (v{p.version})
            </option>
          ))}
        </select>
        {errors.profile && <span role="alert" className="text-xs text-alert">{errors.profile.message}</span>}
      </div>
      <div>
        <label htmlFor={id("shop")} className="text-sm font-semibold">Shop code</label>
        <input id={id("shop")} {...form.register("shop")} placeholder="blank: from rows" autoComplete="off" aria-invalid={!!errors.shop} className={`${input} font-mono`} />
        {errors.shop && <span role="alert" className="text-xs text-alert">{errors.shop.message}</span>}
      </div>
      <button type="submit" disabled={pending} className="rounded border border-slate bg-white px-3 py-1.5 text-sm font-semibold disabled:opacity-50">
        {pending ? "Checking…" : "Check again"}
        <span className="sr-only"> {imp.fileName}</span>
      </button>
    </form>
  );
}
