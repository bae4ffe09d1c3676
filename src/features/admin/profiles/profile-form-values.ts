import type { FieldError, FieldErrors } from "react-hook-form";
import { profileSchema, type Profile, type ProfileDetail } from "@shared/schemas/profiles";

/**
 * The profile as the form edits it: the column map and the code tables as rows (a form edits lists, not
 * objects keyed by what the user types), every value a string. `toProfile` turns it back, and the form is
 * checked by the very schema the ETL reads with (shared/schemas/profiles.ts), its problems put under the
 * fields they concern.
 */
export type CodeTable = keyof Profile["codes"];
export const codeTables: readonly CodeTable[] = ["component", "model", "payType", "measurementKind"];

export interface ProfileFormValues {
  id: string;
  description: string;
  defaultShop: string;
  delimiter: Profile["delimiter"];
  encoding: Profile["encoding"];
  dateFormat: Profile["dateFormat"];
  decimalComma: boolean;
  hoursFormat: Profile["hoursFormat"];
  compression: Profile["units"]["compression"];
  temperature: Profile["units"]["temperature"];
  resistance: Profile["units"]["resistance"];
  columns: { column: string; required: boolean; header: string }[];
  codes: Record<CodeTable, { from: string; to: string }[]>;
  note: string;
}

export function toFormValues(d: Pick<ProfileDetail, "profile" | "layout">, asNewId?: string): ProfileFormValues {
  const p = d.profile;
  const inLayout = new Set(d.layout.map((c) => c.column));
  return {
    id: asNewId ?? p.id,
    description: p.description,
    defaultShop: p.defaultShop ?? "",
    delimiter: p.delimiter,
    encoding: p.encoding,
    dateFormat: p.dateFormat,
    decimalComma: p.decimalComma,
    hoursFormat: p.hoursFormat,
    compression: p.units.compression,
    temperature: p.units.temperature,
    resistance: p.units.resistance,
    columns: [
      ...d.layout.map((c) => ({ column: c.column, required: c.required, header: p.columns[c.column] ?? "" })),
      // a column the profile maps that the layout no longer lists stays visible, so saving does not drop it unseen
      ...Object.entries(p.columns).filter(([c]) => !inLayout.has(c)).map(([column, header]) => ({ column, required: false, header })),
    ],
    codes: Object.fromEntries(codeTables.map((t) => [t, Object.entries(p.codes[t]).map(([from, to]) => ({ from, to }))])) as ProfileFormValues["codes"],
    note: "",
  };
}

/** The form's values as a profile (kind from the stored one; blank headers and blank code rows left out). */
export function toProfile(v: ProfileFormValues, kind: Profile["kind"]): Record<string, unknown> {
  return {
    id: v.id.trim(),
    kind,
    description: v.description,
    ...(v.defaultShop.trim() ? { defaultShop: v.defaultShop.trim().toUpperCase() } : {}),
    delimiter: v.delimiter,
    encoding: v.encoding,
    dateFormat: v.dateFormat,
    decimalComma: v.decimalComma,
    hoursFormat: v.hoursFormat,
    columns: Object.fromEntries(v.columns.filter((c) => c.header !== "").map((c) => [c.column, c.header])),
    units: { compression: v.compression, temperature: v.temperature, resistance: v.resistance, voltage: "V" },
    codes: Object.fromEntries(
      codeTables.map((t) => [t, Object.fromEntries(v.codes[t].filter((r) => r.from.trim() !== "" || r.to.trim() !== "").map((r) => [r.from.trim(), r.to.trim()]))]),
    ),
  };
}

/** Problems the schema finds, keyed by the form's field names; a code row typed twice is named too. */
export function profileProblems(v: ProfileFormValues, kind: Profile["kind"]): { profile: Profile | null; errors: Record<string, string> } {
  const errors: Record<string, string> = {};
  const columnIndex = new Map(v.columns.map((c, i) => [c.column, i]));
  for (const t of codeTables) {
    const seen = new Set<string>();
    v.codes[t].forEach((r, i) => {
      const from = r.from.trim();
      if (from === "" && r.to.trim() === "") return;
      if (from === "") errors[`codes.${t}.${i}.from`] = "the shop's code cannot be blank";
      else if (seen.has(from)) errors[`codes.${t}.${i}.from`] = `${from} is in this table twice`;
      if (r.to.trim() === "") errors[`codes.${t}.${i}.to`] = "say which Ironledger code it means";
      seen.add(from);
    });
  }
  for (const c of v.columns) if (c.required && c.header.trim() === "" && !(c.column === "shop_code" && v.defaultShop.trim())) {
    errors[`columns.${columnIndex.get(c.column)}.header`] = c.column === "shop_code" ? "a file must name its shop: give the header, or a default shop below" : "a file must have this column";
  }
  const parsed = profileSchema.safeParse(toProfile(v, kind));
  if (!parsed.success) {
    for (const issue of parsed.error.issues) {
      const [head, second, third] = issue.path.map(String);
      let field: string = head ?? "id";
      if (head === "columns" && second !== undefined) field = `columns.${columnIndex.get(second) ?? 0}.header`;
      else if (head === "codes" && second !== undefined) {
        const row = v.codes[second as CodeTable]?.findIndex((r) => r.from.trim() === third) ?? -1;
        field = row >= 0 ? `codes.${second}.${row}.to` : `codes.${second}`;
      } else if (head === "units" && second) field = second;
      errors[field] ??= issue.message;
    }
  }
  return { profile: parsed.success && Object.keys(errors).length === 0 ? parsed.data : null, errors };
}

/** The problems as react-hook-form's nested errors (a resolver's answer). */
export function asFieldErrors(errors: Record<string, string>): FieldErrors<ProfileFormValues> {
  const out: Record<string, unknown> = {};
  for (const [path, message] of Object.entries(errors)) {
    const parts = path.split(".");
    let at = out;
    parts.slice(0, -1).forEach((p, i) => {
      const nextIsIndex = /^\d+$/.test(parts[i + 1]);
      at[p] ??= nextIsIndex ? [] : {};
      at = at[p] as Record<string, unknown>;
    });
    at[parts.at(-1)!] = { type: "validate", message } satisfies FieldError;
  }
  return out as FieldErrors<ProfileFormValues>;
}
