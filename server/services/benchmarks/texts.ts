/** The words the benchmarks answer with: the comeback rule, the formulas of every figure, and the methods. */
import { PEER_RULE } from "../../analytics/peer-groups.js";
import { MINIMUM_LINES, type BenchmarkQuery, type Formulas, type Period } from "../../../shared/schemas/benchmarks.js";

export const FUNNEL_METHOD =
  "Comeback rate against the number of qualifying lines, around the group rate p₀, with exact binomial limits (interpolated, Spiegelhalter 2005) at 95 % and 99.8 %. A shop above the 99.8 % line has more comebacks than chance explains at its volume; one inside the funnel does not differ from the group, however it ranks. Shops below 30 lines are not plotted.";

export const TREND_METHOD =
  "Each point is the comeback rate of the 12 months of closed lines ending with that month (a single month has too few lines per shop to tell a bad month from a trend), with its 95 % Wilson interval; the month's own rate is given where it has 30 lines or more.";

export function comebackRule(q: BenchmarkQuery, period: Period): string {
  return (
    `A comeback is a later failure line on the same machine and system that opens within ${q.days} days and ${q.hours} engine hours of the original line's close ` +
    `(hours at close interpolated between the two lines' meter readings). PM, return-for-parts visits, installs and customer damage are not counted. ` +
    `It counts against the original line's shop and technician, in the month the original closed, once its ${q.days}-day window has passed (lines closed after ${period.countedThrough} are still waiting).`
  );
}

export function formulas(q: BenchmarkQuery, period: Period, anonymised: boolean): Formulas {
  return {
    comebackRate: `Comeback rate = repair lines with at least one comeback ÷ qualifying repair lines; 95 % Wilson interval; not rated below ${MINIMUM_LINES} lines. ${comebackRule(q, period)}`,
    labourEfficiency: "Labour efficiency = Σ standard (flat-rate) hours ÷ Σ actual hours, on lines with a standard time; above 100 % beats the standard.",
    partsWait: "Parts wait = calendar days from part order to receipt on part lines: median and 90th percentile (linear interpolation between ordered values).",
    backOrderRate: "Back-order rate = back-ordered part lines ÷ lines with a part ordered; 95 % Wilson interval.",
    coldStartMeasured:
      "Cold-start jobs measured = failure lines on a cold-start aid (heater plugs, grid heater, preheat relay) with at least one reading recorded (resistance, compression or voltage) ÷ those lines; 95 % Wilson interval.",
    warrantyOnTime:
      "Claims on time = repair claims submitted on or before their deadline ÷ claims submitted or past their deadline, by month of the RO close; 95 % Wilson interval.",
    funnel: FUNNEL_METHOD,
    anonymity: anonymised ? PEER_RULE : null,
  };
}
