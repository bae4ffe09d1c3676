/** What is wrong with a typed whole number of `unit` between the limits, in words; null when it is fine. */
export function windowProblem(text: string, limits: { min: number; max: number }, unit: string): string | null {
  const t = text.trim();
  if (t === "") return `Enter a number of ${unit} from ${limits.min} to ${limits.max}.`;
  if (!/^\d+$/.test(t)) return `Enter whole ${unit} as digits, from ${limits.min} to ${limits.max}.`;
  const v = Number(t);
  if (v < limits.min) return `${v} is below the shortest window, ${limits.min} ${unit}.`;
  if (v > limits.max) return `${v} is above the longest window, ${limits.max} ${unit}.`;
  return null;
}
