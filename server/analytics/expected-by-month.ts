/**
 * Indirect standardisation by month: each month's expected failures are its engine hours in each
 * hour band × temperature band cell times that cell's failure rate over a reference period
 * (E_m = Σ_c hours_{m,c} · failures_{ref,c} ÷ hours_{ref,c}). Over the reference months Σ O = Σ E, so a
 * month at the reference's rates for its own fleet mix reads O ÷ E = 1: an older fleet (more hours in the
 * high bands) or a colder month raises E, not O ÷ E. A cell the reference never saw (no hours there) is
 * given the reference's overall rate, so no hours go unexpected. Failures the cells cannot place (a repair
 * line without an hour meter falls in no hour band, and no hours do) would leave Σ E short of Σ O over the
 * reference, so every E is finally scaled by Σ_ref O ÷ Σ_ref E: the reference months together read exactly 1.
 * Method: indirect standardisation as in the cluster scan (standardised failure ratio), here with
 * months as the groups.
 */
export interface MonthCell {
  month: string;
  hourBand: string;
  tempBand: string;
  failures: number;
  engineHours: number;
}
export interface MonthExpectation {
  month: string;
  failures: number;
  engineHours: number;
  expected: number;
}

export function expectedByMonth(cells: readonly MonthCell[], isReference: (month: string) => boolean): MonthExpectation[] {
  const key = (c: MonthCell) => `${c.hourBand}\u0000${c.tempBand}`;
  const ref = new Map<string, { failures: number; hours: number }>();
  let refFailures = 0;
  let refHours = 0;
  for (const c of cells) {
    if (!isReference(c.month)) continue;
    const r = ref.get(key(c)) ?? { failures: 0, hours: 0 };
    r.failures += c.failures;
    r.hours += c.engineHours;
    ref.set(key(c), r);
    refFailures += c.failures;
    refHours += c.engineHours;
  }
  const overall = refHours > 0 ? refFailures / refHours : 0;
  const byMonth = new Map<string, MonthExpectation>();
  for (const c of cells) {
    const m = byMonth.get(c.month) ?? { month: c.month, failures: 0, engineHours: 0, expected: 0 };
    m.failures += c.failures;
    m.engineHours += c.engineHours;
    const r = ref.get(key(c));
    const rate = r && r.hours > 0 ? r.failures / r.hours : overall;
    m.expected += c.engineHours * rate;
    byMonth.set(c.month, m);
  }
  const months = [...byMonth.values()].sort((a, b) => a.month.localeCompare(b.month));
  const refExpected = months.filter((m) => isReference(m.month)).reduce((t, m) => t + m.expected, 0);
  const scale = refExpected > 0 ? refFailures / refExpected : 1;
  return months.map((m) => ({ ...m, expected: m.expected * scale }));
}
