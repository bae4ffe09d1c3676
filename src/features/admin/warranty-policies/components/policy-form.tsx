import { useForm, type FieldPath } from "react-hook-form";
import { fieldWords } from "@/components/ui/field-words";
import { VersionSave } from "@/components/ui/version-save";
import { zodResolver } from "@hookform/resolvers/zod";
import { z } from "zod";
import { coverageClasses, coverageClassWords, policySaveSchema, policyTermsSchema, type PolicyDetail } from "@shared/schemas/warranty-policies";
import { useSavePolicy } from "../api/policy-queries";

/** The policy's terms and the reason for the change, checked in the browser by the rules the server uses. */
const formSchema = policyTermsSchema.extend({ note: policySaveSchema.shape.note });
type FormIn = z.input<typeof formSchema>;
type FormOut = z.output<typeof formSchema>;
type Field = FieldPath<FormIn>;

const input = "mt-1 block w-full rounded border border-line bg-white px-2 py-1.5 text-sm aria-[invalid=true]:border-alert disabled:bg-paper";
const label = "text-sm font-semibold";

interface Props {
  detail: PolicyDetail;
  /** an older version is shown, not edited */
  readOnly: boolean;
  onSaved: (version: number) => void;
}

/**
 * One version of a warranty policy in a form: the coverage per class (months and hours, whichever comes first),
 * the filing window, how long failed parts are kept and where packets go. Saving makes the next version; the
 * claims already made keep the version they were judged under.
 */
export function PolicyForm({ detail, readOnly, onSaved }: Props) {
  const form = useForm<FormIn, unknown, FormOut>({
    resolver: zodResolver<FormIn, unknown, FormOut>(formSchema),
    defaultValues: { ...detail.policy, note: "" },
    mode: "onTouched",
  });
  const { errors } = form.formState;
  const save = useSavePolicy();

  const words = fieldWords(errors, "policy");
  const { errorOf, fid, described, problem } = words;
  const numberField = (f: Field, text: string, hint?: string) => (
    <div>
      <label htmlFor={fid(f)} className={label}>{text}</label>
      <input
        id={fid(f)}
        type="number"
        inputMode="numeric"
        step={1}
        {...form.register(f, { valueAsNumber: true })}
        aria-invalid={!!errorOf(f)}
        aria-describedby={described(f, !!hint)}
        className={`${input} tabular-nums`}
      />
      {hint && <p id={`${fid(f)}-hint`} className="mt-1 text-xs text-muted">{hint}</p>}
      {problem(f)}
    </div>
  );

  const submit = form.handleSubmit(({ note, ...policy }) => {
    save.mutate({ family: detail.engineFamily, policy, basedOn: detail.latestVersion, note }, { onSuccess: (d) => onSaved(d.version) });
  });

  return (
    <form onSubmit={submit} noValidate className="space-y-6" aria-label={`Warranty policy for ${detail.familyWords}`}>
      <fieldset className="space-y-3" disabled={readOnly}>
        <legend className="text-lg font-semibold">Coverage</legend>
        <p className="text-sm text-muted">
          A failure is covered when it happens within the months after delivery and below the hours on the meter, whichever comes first. Terms in the machine
          registry take precedence over these.
        </p>
        <div className="grid gap-3 sm:grid-cols-2">
          {coverageClasses.map((cls) => (
            <div key={cls} className="grid grid-cols-2 gap-3 rounded border border-line p-3">
              <p className="col-span-2 font-semibold">{coverageClassWords[cls]}</p>
              {numberField(`coverage.${cls}.months`, "Months")}
              {numberField(`coverage.${cls}.hours`, "Hours")}
            </div>
          ))}
        </div>
      </fieldset>
      <fieldset className="space-y-3" disabled={readOnly}>
        <legend className="text-lg font-semibold">Filing</legend>
        <div className="grid gap-3 sm:grid-cols-3">
          {numberField("claimDays", "Filing window (days)", "Days after the repair order closed in which the claim must reach the maker.")}
          {numberField("partRetentionDays", "Part retention (days)", "How long the failed part is kept for the maker.")}
          <div>
            <label htmlFor={fid("warrantyEmail")} className={label}>Packets go to</label>
            <input
              id={fid("warrantyEmail")}
              type="email"
              autoComplete="off"
              {...form.register("warrantyEmail")}
              aria-invalid={!!errorOf("warrantyEmail")}
              aria-describedby={described("warrantyEmail", true)}
              className={input}
            />
            <p id={`${fid("warrantyEmail")}-hint`} className="mt-1 text-xs text-muted">The maker's claim desk for this engine family.</p>
            {problem("warrantyEmail")}
          </div>
        </div>
      </fieldset>
      {!readOnly && (
        <VersionSave words={words} note={form.register("note")} error={save.error} pending={save.isPending} action={`Save as version ${detail.latestVersion + 1}`} />
      )}
    </form>
  );
}
