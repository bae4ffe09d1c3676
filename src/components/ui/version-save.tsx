import type { UseFormRegisterReturn } from "react-hook-form";
import { ErrorNotice } from "@/components/ui/states";
import type { fieldWords } from "@/components/ui/field-words";

interface Props {
  /** the form's field words (fieldWords), for the note's id, problem and description */
  words: ReturnType<typeof fieldWords>;
  /** form.register("note") */
  note: UseFormRegisterReturn;
  error: unknown;
  pending: boolean;
  /** the button's words, e.g. "Save as version 3" */
  action: string;
}

/** The foot of a versioned admin form: why it changes (kept with the version), the save's error and the button. */
export function VersionSave({ words, note, error, pending, action }: Props) {
  const { fid, errorOf, described, problem } = words;
  return (
    <div className="space-y-3">
      <div>
        <label htmlFor={fid("note")} className="text-sm font-semibold">Why it changes</label>
        <input
          id={fid("note")}
          {...note}
          aria-invalid={!!errorOf("note")}
          aria-describedby={described("note", true)}
          className="mt-1 block w-full rounded border border-line bg-white px-2 py-1.5 text-sm aria-[invalid=true]:border-alert"
        />
        <p id={`${fid("note")}-hint`} className="mt-1 text-xs text-muted">Kept with the version, for whoever reads the history.</p>
        {problem("note")}
      </div>
      {error != null && <ErrorNotice error={error} />}
      <button type="submit" disabled={pending} className="rounded bg-accent px-4 py-2 text-sm font-semibold text-white disabled:opacity-50">
        {pending ? "Saving…" : action}
      </button>
    </div>
  );
}
