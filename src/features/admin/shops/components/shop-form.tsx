import { useEffect, useMemo, useRef } from "react";
import { useForm, type FieldPath } from "react-hook-form";
import { zodResolver } from "@hookform/resolvers/zod";
import { z } from "zod";
import { ErrorNotice } from "@/components/ui/states";
import { shopEditSchema, shopEntrySchema, type AdminShop, type ExportProfileOption, type ShopEntrySchema } from "@shared/schemas/shops-admin";
import type { ShopSave } from "../api/shop-admin-queries";

type FormIn = z.input<ShopEntrySchema>;
type FormOut = z.output<ShopEntrySchema>;
type Field = FieldPath<FormIn>;

/** Every time zone the browser knows, for the time zone field's suggestions. */
const timeZones: readonly string[] = typeof Intl.supportedValuesOf === "function" ? Intl.supportedValuesOf("timeZone") : [];

// the background apart: two background utilities on one element are settled by the stylesheet's order, not the class list's
const fieldClass = "mt-1 block w-full rounded border border-line px-2 py-1.5 text-sm aria-[invalid=true]:border-alert";
const inputClass = `${fieldClass} bg-white`;

const text = (v: string | number | null) => (v === null ? "" : String(v));

function startValues(shop: AdminShop | null): FormIn {
  return {
    code: shop?.code ?? "",
    name: shop?.name ?? "",
    region: text(shop?.region ?? null),
    town: text(shop?.town ?? null),
    lat: text(shop?.lat ?? null),
    lon: text(shop?.lon ?? null),
    climateZone: text(shop?.climateZone ?? null),
    timeZone: text(shop?.timeZone ?? null),
    weatherStation: text(shop?.weatherStation ?? null),
    exportProfile: text(shop?.exportProfile ?? null),
  };
}

interface Props {
  /** null: a new shop */
  shop: AdminShop | null;
  profiles: readonly ExportProfileOption[];
  pending: boolean;
  /** the server's refusal of the last save, shown in its words */
  error: unknown;
  onSave: (s: ShopSave) => void;
  onCancel: () => void;
}

/**
 * A shop of the register, checked in the browser by the rules the server and the register file use
 * (shared/schemas/shops-admin.ts); each problem shows in words under its field. An edit never changes the code.
 */
export function ShopForm({ shop, profiles, pending, error, onSave, onCancel }: Props) {
  const known = useMemo(() => profiles.map((p) => p.id), [profiles]);
  const resolver = useMemo(
    () =>
      shop
        ? // the code is shown, not checked or sent: it names the shop and cannot change
          zodResolver<FormIn, unknown, FormOut>(shopEditSchema(() => known).extend({ code: z.unknown().transform(() => shop.code) }))
        : zodResolver<FormIn, unknown, FormOut>(shopEntrySchema(() => known)),
    [shop, known],
  );
  const form = useForm<FormIn, unknown, FormOut>({ resolver, defaultValues: startValues(shop) });
  const { errors } = form.formState;
  const heading = useRef<HTMLHeadingElement>(null);
  useEffect(() => heading.current?.focus(), []);

  const prefix = shop ? `shop-${shop.code.replace(/[^A-Za-z0-9_-]/g, "_")}` : "shop-new";
  const id = (f: Field) => `${prefix}-${f}`;
  const described = (f: Field, hint?: boolean) => [hint ? `${id(f)}-hint` : "", errors[f] ? `${id(f)}-error` : ""].filter(Boolean).join(" ") || undefined;
  const problem = (f: Field) =>
    errors[f] ? (
      <p id={`${id(f)}-error`} role="alert" className="mt-1 text-xs text-alert">
        {errors[f]?.message}
      </p>
    ) : null;
  const textField = (f: Field, label: string, o: { hint?: string; mono?: boolean; decimal?: boolean; list?: string; required?: boolean } = {}) => (
    <div>
      <label htmlFor={id(f)} className="text-sm font-semibold">
        {label}
        {o.required && <span className="font-normal text-muted"> (required)</span>}
      </label>
      <input
        id={id(f)}
        {...form.register(f)}
        autoComplete="off"
        inputMode={o.decimal ? "decimal" : undefined}
        list={o.list}
        aria-invalid={!!errors[f]}
        aria-describedby={described(f, !!o.hint)}
        className={`${inputClass} ${o.mono ? "font-mono" : ""}`}
      />
      {o.hint && <p id={`${id(f)}-hint`} className="mt-1 text-xs text-muted">{o.hint}</p>}
      {problem(f)}
    </div>
  );

  // a stored profile the ETL no longer has stays choosable, so the form says why it is refused instead of dropping it
  const storedProfile = shop?.exportProfile && !known.includes(shop.exportProfile) ? shop.exportProfile : null;
  const submit = form.handleSubmit((v) => {
    if (shop) {
      const { code: _code, ...fields } = v;
      onSave({ kind: "edit", code: shop.code, shop: fields });
    } else {
      onSave({ kind: "add", shop: v });
    }
  });

  return (
    <form onSubmit={submit} noValidate aria-labelledby={`${prefix}-title`} className="space-y-4">
      <h2 id={`${prefix}-title`} ref={heading} tabIndex={-1} className="text-lg font-semibold outline-none">
        {shop ? `Edit shop ${shop.code}` : "Add a shop"}
      </h2>
      <div className="grid gap-3 sm:grid-cols-2">
        {shop ? (
          <div>
            <label htmlFor={id("code")} className="text-sm font-semibold">Code</label>
            <input id={id("code")} value={shop.code} readOnly aria-describedby={`${id("code")}-hint`} className={`${fieldClass} bg-paper font-mono`} />
            <p id={`${id("code")}-hint`} className="mt-1 text-xs text-muted">Every export names the shop by its code, so it cannot change.</p>
          </div>
        ) : (
          textField("code", "Code", { required: true, mono: true, hint: "1–16 letters, digits, spaces, - or _, as the exports write it; stored in capitals." })
        )}
        {textField("name", "Name", { required: true, hint: "The shop's name as people say it." })}
        {textField("region", "Region")}
        {textField("town", "Town")}
        {textField("lat", "Latitude", { decimal: true, hint: "Decimal degrees, −90 to 90." })}
        {textField("lon", "Longitude", { decimal: true, hint: "Decimal degrees, −180 to 180." })}
        {textField("climateZone", "Climate zone", { hint: "A description such as “cool continental”." })}
        {textField("timeZone", "Time zone", { list: `${prefix}-time-zones`, hint: "An IANA name such as Europe/Oslo." })}
        {textField("weatherStation", "Weather station", { hint: "The station its weather export comes from." })}
        <div>
          <label htmlFor={id("exportProfile")} className="text-sm font-semibold">Export profile</label>
          <select
            id={id("exportProfile")}
            {...form.register("exportProfile")}
            // React selects the stored option itself (some DOMs drop a value set on a select before its options exist)
            defaultValue={text(shop?.exportProfile ?? null)}
            aria-invalid={!!errors.exportProfile}
            aria-describedby={described("exportProfile", true)}
            className={inputClass}
          >
            <option value="">None</option>
            {storedProfile && <option value={storedProfile}>{storedProfile} (no longer known)</option>}
            {profiles.map((p) => (
              <option key={p.id} value={p.id}>
                {p.id} ({p.kind})
              </option>
            ))}
          </select>
          <p id={`${id("exportProfile")}-hint`} className="mt-1 text-xs text-muted">The profile its exports use.</p>
          {problem("exportProfile")}
        </div>
      </div>
      <datalist id={`${prefix}-time-zones`}>
        {timeZones.map((tz) => <option key={tz} value={tz} />)}
      </datalist>
      {error != null && <ErrorNotice error={error} />}
      <div className="flex flex-wrap gap-2">
        <button type="submit" disabled={pending} className="rounded bg-accent px-3 py-1.5 text-sm font-semibold text-white disabled:opacity-50">
          {pending ? "Saving…" : shop ? "Save changes" : "Add shop"}
        </button>
        <button type="button" onClick={onCancel} className="rounded border border-line px-3 py-1.5 text-sm">Cancel</button>
      </div>
    </form>
  );
}
