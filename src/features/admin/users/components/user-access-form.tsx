import { useEffect, useRef } from "react";
import { Controller, useForm } from "react-hook-form";
import { zodResolver } from "@hookform/resolvers/zod";
import type { z } from "zod";
import { ErrorNotice } from "@/components/ui/states";
import { allRoles, roleLabels } from "@shared/roles";
import { userAccessSchema, type AdminUser, type UserAccess } from "@shared/schemas/admin";

type FormIn = z.input<typeof userAccessSchema>;

interface Props {
  user: AdminUser;
  shops: readonly { code: string; name: string }[];
  /** the signed-in administrator is editing themselves: their administrator role cannot be removed */
  self: boolean;
  pending: boolean;
  error: unknown;
  onSave: (a: UserAccess) => void;
  onCancel: () => void;
}

/**
 * A user's roles and shops, checked in the browser by the server's rules (shared/schemas/admin.ts); each
 * problem shows in words under its group. Saving stores them in Ironledger, replacing the provider's.
 */
export function UserAccessForm({ user, shops, self, pending, error, onSave, onCancel }: Props) {
  const form = useForm<FormIn, unknown, UserAccess>({
    resolver: zodResolver(userAccessSchema),
    defaultValues: { roles: [...user.roles], shops: [...user.shops] },
  });
  const { errors } = form.formState;
  const heading = useRef<HTMLHeadingElement>(null);
  useEffect(() => heading.current?.focus(), []);
  const prefix = `user-${user.sub.replace(/[^A-Za-z0-9_-]/g, "_")}`;
  // a stored shop no longer in the register stays shown, so the refusal can name it
  const choices = [...shops, ...user.shops.filter((c) => !shops.some((s) => s.code === c)).map((code) => ({ code, name: "not in the register" }))];

  const group = (name: "roles" | "shops", legend: string, hint: string, options: { value: string; label: string; locked?: boolean }[]) => (
    <fieldset aria-describedby={[`${prefix}-${name}-hint`, errors[name] ? `${prefix}-${name}-error` : ""].filter(Boolean).join(" ")} aria-invalid={!!errors[name]}>
      <legend className="text-sm font-semibold">{legend}</legend>
      <p id={`${prefix}-${name}-hint`} className="mt-1 text-xs text-muted">{hint}</p>
      <Controller
        control={form.control}
        name={name}
        render={({ field }) => {
          const picked = (field.value ?? []) as string[];
          return (
            <div className="mt-2 grid gap-1 sm:grid-cols-2">
              {options.map((o) => (
                <label key={o.value} className="flex items-center gap-2 text-sm">
                  <input
                    type="checkbox"
                    checked={picked.includes(o.value)}
                    disabled={o.locked}
                    onChange={(e) => field.onChange(e.target.checked ? [...picked, o.value] : picked.filter((v) => v !== o.value))}
                    onBlur={field.onBlur}
                  />
                  {o.label}
                </label>
              ))}
            </div>
          );
        }}
      />
      {errors[name] && (
        <p id={`${prefix}-${name}-error`} role="alert" className="mt-1 text-xs text-alert">
          {errors[name]?.message ?? errors[name]?.root?.message}
        </p>
      )}
    </fieldset>
  );

  return (
    <form onSubmit={form.handleSubmit(onSave)} noValidate aria-labelledby={`${prefix}-title`} className="space-y-4">
      <h2 id={`${prefix}-title`} ref={heading} tabIndex={-1} className="text-lg font-semibold outline-none">
        Access of {user.name}
      </h2>
      {group(
        "roles",
        "Roles",
        self ? "You cannot remove your own administrator role." : "At least one.",
        allRoles.map((r) => ({ value: r, label: roleLabels[r], locked: self && r === "admin" })),
      )}
      {group(
        "shops",
        "Shops",
        "A shop manager sees only these shops (at least one); the other roles see every shop.",
        choices.map((s) => ({ value: s.code, label: `${s.code} · ${s.name}` })),
      )}
      {error != null && <ErrorNotice error={error} />}
      <div className="flex flex-wrap gap-2">
        <button type="submit" disabled={pending} className="rounded bg-accent px-3 py-1.5 text-sm font-semibold text-white disabled:opacity-50">
          {pending ? "Saving…" : "Save access"}
        </button>
        <button type="button" onClick={onCancel} className="rounded border border-line px-3 py-1.5 text-sm">Cancel</button>
      </div>
    </form>
  );
}
