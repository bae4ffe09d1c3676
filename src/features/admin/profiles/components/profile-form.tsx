import { useMemo, useState } from "react";
import { fieldWords } from "@/components/ui/field-words";
import { useFieldArray, useForm, type FieldPath, type Resolver } from "react-hook-form";
import { ErrorNotice } from "@/components/ui/states";
import { ImportPreview } from "@/features/imports/components/import-preview";
import {
  codeTableLabels, dateFormatLabels, delimiterLabels, encodingLabels, type Profile, type ProfileDetail,
} from "@shared/schemas/profiles";
import { useSaveProfile, useTryProfile } from "../api/profile-queries";
import { asFieldErrors, codeTables, profileProblems, toFormValues, type CodeTable, type ProfileFormValues } from "../profile-form-values";

const input = "mt-1 block w-full rounded border border-line bg-white px-2 py-1.5 text-sm aria-[invalid=true]:border-alert disabled:bg-paper";
const label = "text-sm font-semibold";

type Field = FieldPath<ProfileFormValues>;

interface Props {
  detail: ProfileDetail;
  /** an older version is shown, not edited */
  readOnly: boolean;
  onSaved: (id: string, version: number, isNew: boolean) => void;
}

/**
 * A mapping profile in a form: how the shop system writes its file (delimiter, encoding, dates, decimals,
 * hours), the units of its readings, the header of each column Ironledger reads, and the tables that turn the
 * shop's codes into Ironledger's. Checked as typed by the schema the ETL reads with; tried against a sample
 * file as a dry run (nothing stored) before it is saved as the next version.
 */
export function ProfileForm({ detail, readOnly, onSaved }: Props) {
  const kind = detail.profile.kind;
  const resolver: Resolver<ProfileFormValues> = useMemo(
    () => async (values) => {
      const { errors } = profileProblems(values, kind);
      return Object.keys(errors).length ? { values: {}, errors: asFieldErrors(errors) } : { values, errors: {} };
    },
    [kind],
  );
  const form = useForm<ProfileFormValues>({ resolver, defaultValues: toFormValues(detail), mode: "onTouched" });
  const { errors } = form.formState;
  const columns = useFieldArray({ control: form.control, name: "columns" });
  const save = useSaveProfile();
  const trial = useTryProfile(detail.profile.id);
  const [sample, setSample] = useState<File | null>(null);
  const [sampleShop, setSampleShop] = useState("");
  const [newId, setNewId] = useState("");
  const [tried, setTried] = useState<string | null>(null);

  const { errorOf, fid, problem } = fieldWords(errors, "profile");
  const select = (f: Field, text: string, options: Record<string, string>, hint?: string) => (
    <div>
      <label htmlFor={fid(f)} className={label}>{text}</label>
      <select id={fid(f)} {...form.register(f)} disabled={readOnly} aria-invalid={!!errorOf(f)} aria-describedby={hint ? `${fid(f)}-hint` : undefined} className={input}>
        {Object.entries(options).map(([v, l]) => (
          <option key={v} value={v}>{l}</option>
        ))}
      </select>
      {hint && <p id={`${fid(f)}-hint`} className="mt-1 text-xs text-muted">{hint}</p>}
      {problem(f)}
    </div>
  );

  /** The draft as a profile, or null with its problems shown under their fields. */
  const draft = (): Profile | null => {
    form.clearErrors();
    const { profile, errors: found } = profileProblems(form.getValues(), kind);
    for (const [f, message] of Object.entries(found)) form.setError(f as Field, { type: "validate", message }, { shouldFocus: false });
    return profile;
  };

  const tryIt = () => {
    const p = draft();
    if (!p || !sample) return;
    setTried(null);
    trial.mutate({ profile: p, sample, shop: sampleShop }, { onSuccess: () => setTried(sample.name) });
  };

  const submit = form.handleSubmit(() => {
    const p = draft();
    if (!p) return;
    const isNew = newId.trim() !== "";
    const profile = isNew ? { ...p, id: newId.trim() } : p;
    save.mutate(
      { profile, basedOn: isNew ? null : detail.latestVersion, note: form.getValues("note"), isNew },
      { onSuccess: (d) => onSaved(d.profile.id, d.version, isNew) },
    );
  });

  return (
    <form onSubmit={submit} noValidate className="space-y-6" aria-label={`Profile ${detail.profile.id}`}>
      <fieldset className="space-y-3" disabled={readOnly}>
        <legend className="text-lg font-semibold">How the file is written</legend>
        <div>
          <label htmlFor={fid("description")} className={label}>Description</label>
          <input id={fid("description")} {...form.register("description")} className={input} aria-invalid={!!errorOf("description")} />
          {problem("description")}
        </div>
        <div className="grid gap-3 sm:grid-cols-3">
          {select("delimiter", "Delimiter", delimiterLabels)}
          {select("encoding", "Encoding", encodingLabels)}
          {select("dateFormat", "Date format", dateFormatLabels, "How the dates of every date column are written.")}
          {select("hoursFormat", "Hours", { decimal: "decimal (1234.5)", "h:mm": "hours and minutes (1234:30)" }, "The hour meter and labour times.")}
          <div className="flex items-center gap-2 pt-6">
            <input id={fid("decimalComma")} type="checkbox" {...form.register("decimalComma")} className="h-5 w-5" />
            <label htmlFor={fid("decimalComma")} className="text-sm">Decimal comma (12,5 means 12.5)</label>
          </div>
          <div>
            <label htmlFor={fid("defaultShop")} className={label}>Default shop</label>
            <select id={fid("defaultShop")} {...form.register("defaultShop")} className={input} aria-describedby={`${fid("defaultShop")}-hint`}>
              <option value="">None: the file names its shop</option>
              {detail.profile.defaultShop && !detail.shops.includes(detail.profile.defaultShop) && (
                <option value={detail.profile.defaultShop}>{detail.profile.defaultShop} (not registered)</option>
              )}
              {detail.shops.map((s) => (
                <option key={s} value={s}>{s}</option>
              ))}
            </select>
            <p id={`${fid("defaultShop")}-hint`} className="mt-1 text-xs text-muted">For a shop system that exports one shop without a shop column.</p>
          </div>
        </div>
        <div className="grid gap-3 sm:grid-cols-3">
          {select("compression", "Compression unit", { psi: "psi", kPa: "kPa", bar: "bar", sniff: "from the value (psi, kPa or bar)" })}
          {select("temperature", "Temperature unit", { C: "°C", F: "°F" })}
          {select("resistance", "Resistance unit", { ohm: "Ω", kohm: "kΩ", suffixed: "written with the value (e.g. 1.2k)" })}
        </div>
      </fieldset>

      <fieldset className="space-y-2" disabled={readOnly}>
        <legend className="text-lg font-semibold">Columns</legend>
        <p className="text-sm text-muted">
          The header the shop system writes for each column Ironledger reads (matched ignoring case and spaces at the ends). Leave a header blank when the
          system does not export that column.
        </p>
        <div className="grid gap-x-4 gap-y-2 sm:grid-cols-2">
          {columns.fields.map((c, i) => (
            <div key={c.id}>
              <label htmlFor={fid(`columns.${i}.header`)} className="font-mono text-xs font-semibold">
                {c.column}
                {c.required && <span className="font-sans font-normal text-muted"> (required)</span>}
              </label>
              <input
                id={fid(`columns.${i}.header`)}
                {...form.register(`columns.${i}.header` as const)}
                autoComplete="off"
                aria-invalid={!!errorOf(`columns.${i}.header`)}
                className={`${input} mt-0.5`}
              />
              {problem(`columns.${i}.header`)}
            </div>
          ))}
        </div>
      </fieldset>

      <fieldset className="space-y-3" disabled={readOnly}>
        <legend className="text-lg font-semibold">Code tables</legend>
        <p className="text-sm text-muted">The shop's own codes and the Ironledger code each means. A code not in a table is read as it is written.</p>
        <div className="grid grid-cols-[minmax(0,1fr)] gap-4 lg:grid-cols-2">
          {codeTables.map((t) => (
            <CodeTableEditor key={t} table={t} form={form} errorOf={errorOf} fid={fid} readOnly={readOnly} />
          ))}
        </div>
      </fieldset>

      {!readOnly && (
        <section className="space-y-3 rounded border border-line bg-paper/60 p-3" aria-labelledby="profile-trial-title">
          <h3 id="profile-trial-title" className="text-lg font-semibold">Try the edit on a sample</h3>
          <p className="text-sm text-muted">
            The sample is read with the form as it stands, saved or not, exactly as a load would read it, and then everything is rolled back: nothing is loaded
            and no batch is recorded. Up to 10 MB.
          </p>
          <div className="flex flex-wrap items-end gap-3">
            <div>
              <label htmlFor="profile-sample" className={label}>Sample export</label>
              <input id="profile-sample" type="file" accept=".csv,.txt,text/csv,text/plain" onChange={(e) => setSample(e.target.files?.[0] ?? null)} className="mt-1 block text-sm" />
            </div>
            <div>
              <label htmlFor="profile-sample-shop" className={label}>Shop of the sample</label>
              <select id="profile-sample-shop" value={sampleShop} onChange={(e) => setSampleShop(e.target.value)} className={input}>
                <option value="">From the file</option>
                {detail.shops.map((s) => (
                  <option key={s} value={s}>{s}</option>
                ))}
              </select>
            </div>
            <button type="button" onClick={tryIt} disabled={!sample || trial.isPending} className="rounded border border-slate bg-white px-3 py-1.5 text-sm font-semibold disabled:opacity-50">
              {trial.isPending ? "Reading the sample…" : "Try on the sample"}
            </button>
          </div>
          {trial.error != null && <ErrorNotice error={trial.error} />}
          {trial.data && tried && (
            <div className="space-y-2" aria-live="polite">
              <p role="status" className="text-sm">
                Read with the form as it stands (not saved). Nothing was loaded.
              </p>
              <ImportPreview preview={trial.data.preview} fileLabel={tried} />
            </div>
          )}
        </section>
      )}

      {!readOnly && (
        <section className="space-y-3" aria-labelledby="profile-save-title">
          <h3 id="profile-save-title" className="text-lg font-semibold">Save</h3>
          <p className="text-sm text-muted">
            Saving makes version {detail.latestVersion + 1}. Files loaded from then on are read with it; loads already made keep the version they were read with,
            and their data does not change. Load a file again to read it with the new version.
          </p>
          <div className="grid gap-3 sm:grid-cols-2">
            <div>
              <label htmlFor={fid("note")} className={label}>Why (kept with the version)</label>
              <input id={fid("note")} {...form.register("note")} autoComplete="off" className={input} placeholder="e.g. the shop system now writes dates day first" />
            </div>
            <div>
              <label htmlFor="profile-new-id" className={label}>Save as a new profile instead (optional)</label>
              <input
                id="profile-new-id"
                value={newId}
                onChange={(e) => setNewId(e.target.value)}
                autoComplete="off"
                className={`${input} font-mono`}
                placeholder="new-profile-name"
                aria-describedby="profile-new-id-hint"
              />
              <p id="profile-new-id-hint" className="mt-1 text-xs text-muted">Lower-case letters, digits and hyphens. Leave blank to save this profile's next version.</p>
            </div>
          </div>
          {save.error != null && <ErrorNotice error={save.error} />}
          <button type="submit" disabled={save.isPending} className="rounded bg-accent px-3 py-1.5 text-sm font-semibold text-white disabled:opacity-50">
            {save.isPending ? "Saving…" : newId.trim() ? `Save as ${newId.trim()}` : `Save as version ${detail.latestVersion + 1}`}
          </button>
        </section>
      )}
    </form>
  );
}

function CodeTableEditor({
  table, form, errorOf, fid, readOnly,
}: {
  table: CodeTable;
  form: ReturnType<typeof useForm<ProfileFormValues>>;
  errorOf: (f: string) => string | undefined;
  fid: (f: string) => string;
  readOnly: boolean;
}) {
  const rows = useFieldArray({ control: form.control, name: `codes.${table}` as const });
  return (
    <div className="rounded border border-line p-2">
      <h4 className="text-sm font-semibold">{codeTableLabels[table]}</h4>
      {rows.fields.length === 0 ? (
        <p className="text-xs text-muted">No codes: read as written.</p>
      ) : (
        <table className="mt-1 w-full text-sm">
          <thead className="text-left text-xs text-muted">
            <tr>
              <th scope="col" className="font-normal">Shop's code</th>
              <th scope="col" className="font-normal">Ironledger code</th>
              <th scope="col"><span className="sr-only">Remove</span></th>
            </tr>
          </thead>
          <tbody>
            {rows.fields.map((r, i) => (
              <tr key={r.id} className="align-top">
                <td className="pr-2">
                  <input aria-label={`${codeTableLabels[table]}: shop's code ${i + 1}`} id={fid(`codes.${table}.${i}.from`)} {...form.register(`codes.${table}.${i}.from` as const)} className={`${input} mt-0.5 font-mono`} aria-invalid={!!errorOf(`codes.${table}.${i}.from`)} />
                  {errorOf(`codes.${table}.${i}.from`) && <p role="alert" className="mt-1 text-xs text-alert">{errorOf(`codes.${table}.${i}.from`)}</p>}
                </td>
                <td className="pr-2">
                  <input aria-label={`${codeTableLabels[table]}: Ironledger code ${i + 1}`} id={fid(`codes.${table}.${i}.to`)} {...form.register(`codes.${table}.${i}.to` as const)} className={`${input} mt-0.5 font-mono`} aria-invalid={!!errorOf(`codes.${table}.${i}.to`)} />
                  {errorOf(`codes.${table}.${i}.to`) && <p role="alert" className="mt-1 text-xs text-alert">{errorOf(`codes.${table}.${i}.to`)}</p>}
                </td>
                <td>
                  {!readOnly && (
                    <button type="button" onClick={() => rows.remove(i)} className="mt-1 rounded border border-line px-2 py-1 text-xs">
                      Remove<span className="sr-only"> row {i + 1}</span>
                    </button>
                  )}
                </td>
              </tr>
            ))}
          </tbody>
        </table>
      )}
      {!readOnly && (
        <button type="button" onClick={() => rows.append({ from: "", to: "" })} className="mt-2 rounded border border-line px-2 py-1 text-xs font-semibold">
          Add a code
        </button>
      )}
    </div>
  );
}
