import { useForm, type FieldPath } from "react-hook-form";
import { fieldWords } from "@/components/ui/field-words";
import { VersionSave } from "@/components/ui/version-save";
import { zodResolver } from "@hookform/resolvers/zod";
import { z } from "zod";
import { KPA_PER_PSI, kpaTo } from "@shared/format";
import { engineSpecInputSchema, engineSpecSaveSchema, engineSpecUnits, type EngineSpecDetail } from "@shared/schemas/engine-specs";
import { useSaveEngineSpec } from "../api/engine-spec-queries";

/** The figures and the reason for the change, checked in the browser by the rules the server uses. */
const formSchema = z.object({ spec: engineSpecInputSchema, note: engineSpecSaveSchema.shape.note });
type FormIn = z.input<typeof formSchema>;
type FormOut = z.output<typeof formSchema>;
type Field = FieldPath<FormIn>;

const input = "mt-1 block w-full rounded border border-line bg-white px-2 py-1.5 text-sm aria-[invalid=true]:border-alert";
const label = "text-sm font-semibold";

/** A stored psi figure back in the unit it was typed in (NIST SP 811 factors), to two decimals. */
const asTyped = (psi: number, unit: (typeof engineSpecUnits)[number]) => Math.round(kpaTo(psi * KPA_PER_PSI, unit) * 100) / 100;

/**
 * An engine family's own figures from the maker's service manual: the compression target range and allowable
 * minimum in the unit the manual gives (psi, kPa or bar), the heater plug's healthy maximum if the manual gives
 * one, and where in the manual they are. Saving makes the family's next version.
 */
export function EngineSpecForm({ detail, onSaved }: { detail: EngineSpecDetail; onSaved: (version: number) => void }) {
  const c = detail.current;
  const form = useForm<FormIn, unknown, FormOut>({
    resolver: zodResolver<FormIn, unknown, FormOut>(formSchema),
    defaultValues: c
      ? {
          spec: {
            unit: c.enteredUnit,
            targetMin: asTyped(c.targetMinPsi, c.enteredUnit),
            targetMax: asTyped(c.targetMaxPsi, c.enteredUnit),
            allowableMin: asTyped(c.allowableMinPsi, c.enteredUnit),
            plugHealthyMaxOhms: c.plugHealthyMaxOhms,
            source: c.source,
          },
          note: "",
        }
      : { spec: { unit: "psi", plugHealthyMaxOhms: null, source: "" }, note: "" },
    mode: "onTouched",
  });
  const { errors } = form.formState;
  const save = useSaveEngineSpec();
  const unit = form.watch("spec.unit");

  const words = fieldWords(errors, "spec");
  const { errorOf, fid, described, problem } = words;
  const numberField = (f: Field, text: string, hint?: string, empty: "nan" | "null" = "nan") => (
    <div>
      <label htmlFor={fid(f)} className={label}>{text}</label>
      <input
        id={fid(f)}
        type="number"
        inputMode="decimal"
        step="any"
        {...form.register(f, { setValueAs: (v: unknown) => (v === "" || v === null || v === undefined ? (empty === "null" ? null : Number.NaN) : Number(v)) })}
        aria-invalid={!!errorOf(f)}
        aria-describedby={described(f, !!hint)}
        className={`${input} tabular-nums`}
      />
      {hint && <p id={`${fid(f)}-hint`} className="mt-1 text-xs text-muted">{hint}</p>}
      {problem(f)}
    </div>
  );

  const submit = form.handleSubmit(({ note, spec }) => {
    save.mutate({ family: detail.engineFamily, spec, basedOn: c?.version ?? null, note }, { onSuccess: (d) => onSaved(d.current?.version ?? 0) });
  });

  return (
    <form onSubmit={submit} noValidate className="space-y-6" aria-label={`Figures for ${detail.engineFamily}`}>
      <fieldset className="space-y-3">
        <legend className="text-lg font-semibold">Compression</legend>
        <p className="text-sm text-muted">
          As the maker's service manual gives them for this engine family, in its unit. A cylinder at or above the target's low end reads good, between the allowable
          minimum and the target watch, and below the minimum a fault.
        </p>
        <div>
          <label htmlFor={fid("spec.unit")} className={label}>Unit</label>
          <select id={fid("spec.unit")} {...form.register("spec.unit")} className={input}>
            {engineSpecUnits.map((u) => <option key={u} value={u}>{u}</option>)}
          </select>
        </div>
        <div className="grid gap-3 sm:grid-cols-3">
          {numberField("spec.targetMin", `Target, low end (${unit})`)}
          {numberField("spec.targetMax", `Target, high end (${unit})`)}
          {numberField("spec.allowableMin", `Allowable minimum (${unit})`, "At or below the target's low end.")}
        </div>
      </fieldset>
      <fieldset className="space-y-3">
        <legend className="text-lg font-semibold">Heater plugs</legend>
        {numberField("spec.plugHealthyMaxOhms", "Healthy maximum resistance (Ω), cold and disconnected", "Leave empty when the manual gives none: the general 0.5–2 Ω band then applies.", "null")}
      </fieldset>
      <div>
        <label htmlFor={fid("spec.source")} className={label}>Where in the maker's service manual</label>
        <input id={fid("spec.source")} {...form.register("spec.source")} aria-invalid={!!errorOf("spec.source")} aria-describedby={described("spec.source", true)} className={input} />
        <p id={`${fid("spec.source")}-hint`} className="mt-1 text-xs text-muted">
          Section, table or page, as a reader of a claim packet would look it up. Verdicts name it with the family, the version and who entered it.
        </p>
        {problem("spec.source")}
      </div>
      <VersionSave words={words} note={form.register("note")} error={save.error} pending={save.isPending} action={c ? `Save as version ${c.version + 1}` : "Save as version 1"} />
    </form>
  );
}
