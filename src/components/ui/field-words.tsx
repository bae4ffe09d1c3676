import type { FieldErrors, FieldValues } from "react-hook-form";

/**
 * A form's ids and problem words per field (react-hook-form errors, paths like "spec.targetMin"): the input's
 * id, its aria-describedby (hint and problem), and the problem said beside it in words.
 */
export function fieldWords<T extends FieldValues>(errors: FieldErrors<T>, prefix: string) {
  const errorOf = (f: string): string | undefined => {
    const at = f.split(".").reduce<unknown>((o, k) => (o as Record<string, unknown> | undefined)?.[k], errors);
    return (at as { message?: string } | undefined)?.message;
  };
  const fid = (f: string) => `${prefix}-${f.replace(/\./g, "-")}`;
  const described = (f: string, hint?: boolean) => [hint ? `${fid(f)}-hint` : "", errorOf(f) ? `${fid(f)}-error` : ""].filter(Boolean).join(" ") || undefined;
  const problem = (f: string) =>
    errorOf(f) ? (
      <p id={`${fid(f)}-error`} role="alert" className="mt-1 text-xs text-alert">
        {errorOf(f)}
      </p>
    ) : null;
  return { errorOf, fid, described, problem };
}
