import { useFormat } from "@/lib/use-format";


/** Row counts as a row of figures: label above, number below; two columns on a phone. */
export function Counts({ items, label }: { items: readonly (readonly [string, number])[]; label: string }) {
  const fmt = useFormat();
  return (
    <dl aria-label={label} className="grid grid-cols-2 gap-2 sm:grid-cols-5">
      {items.map(([name, n]) => (
        <div key={name} className="rounded border border-line bg-paper px-3 py-2">
          <dt className="text-xs text-muted">{name}</dt>
          <dd className="text-lg font-semibold tabular-nums">{fmt.count(n)}</dd>
        </div>
      ))}
    </dl>
  );
}
