import { useFormat } from "@/lib/use-format";

/** Observed ÷ expected with its interval on a log scale from 0.5 to 20; the line at 1 is "as expected". */
export function RatioStrip({ ratio, lower, upper }: { ratio: number; lower: number; upper: number }) {
  const fmt = useFormat();
  const min = Math.log(0.5);
  const max = Math.log(20);
  const x = (v: number) => `${(100 * (Math.log(Math.min(Math.max(v, 0.5), 20)) - min)) / (max - min)}%`;
  return (
    <div className="relative h-5 w-full min-w-32 rounded bg-paper" role="img" aria-label={`ratio ${fmt.quantity("ratio", ratio)}, 95 % interval ${fmt.quantity("ratio", lower)} to ${fmt.quantity("ratio", upper)}`}>
      <div className="absolute inset-y-0 w-px bg-muted" style={{ left: x(1) }} />
      <div className="absolute top-1/2 h-1.5 -translate-y-1/2 rounded bg-accent/40" style={{ left: x(lower), width: `calc(${x(upper)} - ${x(lower)})` }} />
      <div className="absolute top-1/2 h-3 w-3 -translate-x-1/2 -translate-y-1/2 rounded-full border-2 border-card bg-accent" style={{ left: x(ratio) }} />
    </div>
  );
}
