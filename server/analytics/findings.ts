import { ALL, containsCell, formatBuildWindow, type CellDimensions, type ClusterSignal, type DimensionLabels } from "./cluster-scan.js";

/**
 * Findings: the scan's kept signals grouped so that one underlying signal (a supplier lot of one part, a
 * shop, a build window) is one entry, with the narrower cells that sit inside it (a shop, a temperature band,
 * an hour band of the same lot) as its facets instead of rival entries. Ranking and the false-discovery
 * control are the scan's: a finding is led by a signal the scan kept, and ranks by its lead.
 *
 * Grouping, in the scan's rank order:
 * 1. a signal contained in another kept signal ({@link containsCell}) is a facet of the best-ranked kept
 *    signal that is not itself contained in another (containment is transitive, so there is one);
 * 2. a signal contained in none leads a finding of its own, unless most of its repair lines
 *    (at least {@link OVERLAP_SHARE}) are lines of a better-ranked lead: then it describes the same failures
 *    through other dimensions (a build window and shop that hold the lot's machines) and is a facet of that lead.
 */
export const OVERLAP_SHARE = 2 / 3;

export interface Finding<S extends ClusterSignal = ClusterSignal> {
  /** 1-based, by the lead's rank */
  rank: number;
  lead: S;
  /** the narrower or overlapping signals inside it, in the scan's rank order */
  facets: S[];
  /** how the facets relate to the lead */
  facetKinds: ("narrower" | "same-failures")[];
  /** cells of the scan that support it: the lead, its facets and every significant cell they absorbed */
  cells: number;
}

export function groupFindings<S extends ClusterSignal>(signals: readonly S[]): Finding<S>[] {
  const ranked = [...signals].sort((a, b) => a.rank - b.rank);
  const maximal = ranked.filter((s) => !ranked.some((o) => o !== s && containsCell(o.dimensions, s.dimensions)));
  const findings: Finding<S>[] = [];
  const leadLines = new Map<Finding<S>, Set<string>>();
  for (const s of maximal) {
    const lines = s.repairLineIds;
    const home = lines.length
      ? findings.find((f) => {
          const set = leadLines.get(f)!;
          let inside = 0;
          for (const id of lines) if (set.has(id)) inside++;
          return inside >= OVERLAP_SHARE * lines.length && sameComponent(f.lead.dimensions, s.dimensions);
        })
      : undefined;
    if (home) {
      home.facets.push(s);
      home.facetKinds.push("same-failures");
    } else {
      const f: Finding<S> = { rank: 0, lead: s, facets: [], facetKinds: [], cells: 0 };
      findings.push(f);
      leadLines.set(f, new Set(lines));
    }
  }
  for (const s of ranked) {
    if (maximal.includes(s)) continue;
    const home = findings.find((f) => containsCell(f.lead.dimensions, s.dimensions)) ?? findings.find((f) => f.facets.some((x) => containsCell(x.dimensions, s.dimensions)));
    if (!home) continue; // cannot happen (containment is transitive); kept out rather than shown twice
    home.facets.push(s);
    home.facetKinds.push("narrower");
  }
  for (const f of findings) {
    const order = f.facets.map((s, i) => ({ s, k: f.facetKinds[i] })).sort((a, b) => a.s.rank - b.s.rank);
    f.facets = order.map((x) => x.s);
    f.facetKinds = order.map((x) => x.k);
    f.cells = 1 + f.lead.absorbed.length + f.facets.reduce((n, x) => n + 1 + x.absorbed.length, 0);
  }
  findings.forEach((f, i) => (f.rank = i + 1));
  return findings;
}

const sameComponent = (a: CellDimensions, b: CellDimensions) => (a.component ?? ALL) === (b.component ?? ALL);

/** What a facet adds to its lead, in words: the dimensions it fixes that the lead leaves open, e.g. "at shop S2, daily minimum 0 to 20 °F". */
export function facetWords(lead: CellDimensions, facet: CellDimensions, labels: DimensionLabels = {}): string {
  const out: string[] = [];
  if (lead.engineFamily === ALL && facet.engineFamily !== ALL) out.push(`engine family ${facet.engineFamily}`);
  if (facet.build !== ALL && (lead.build === ALL || lead.build.from !== facet.build.from || lead.build.to !== facet.build.to)) out.push(`built ${formatBuildWindow(facet.build)}`);
  if (lead.supplierLot === ALL && facet.supplierLot !== ALL) out.push(`lot ${facet.supplierLot}`);
  if (lead.shop === ALL && facet.shop !== ALL) out.push(`at shop ${labels.shop?.(facet.shop) ?? facet.shop}`);
  if (lead.temperatureBand === ALL && facet.temperatureBand !== ALL) out.push(`daily minimum ${labels.temperatureBand?.(facet.temperatureBand) ?? facet.temperatureBand}`);
  if (lead.hourBand === ALL && facet.hourBand !== ALL) out.push(`at ${labels.hourBand?.(facet.hourBand) ?? facet.hourBand}`);
  return out.join(", ") || "the same cells";
}

const times = (r: number) => (r >= 10 ? r.toFixed(0) : r.toFixed(1));

/**
 * The sentence at the top of a finding, from the numbers the scan computed: what, where, how much worse than
 * expected with the interval, and what it is not. E.g. "Heater-plug set failures with lot BT-2109 (engine family
 * K26-4R, built Sep–Dec 2021) happen about 8.4 times as often as expected for the same engine hours and weather
 * (95 % CI 6.6–11): 75 failures where 9.0 were expected. Colder weather and higher engine hours do not explain
 * it: the expected count allows for both. Strongest: built Sep 2021, 14 times as often."
 */
export function findingSentence(
  f: Pick<Finding, "lead" | "facets">,
  o: { partName: (code: string) => string; subject: string; standardise: "hour" | "hour+temperature"; labels?: DimensionLabels },
): string {
  const d = f.lead.dimensions;
  const labels = o.labels ?? {};
  const part = d.component && d.component !== ALL ? `${o.partName(d.component)} failures` : `${o.subject} failures`;
  const machines: string[] = [];
  if (d.engineFamily !== ALL) machines.push(`engine family ${d.engineFamily}`);
  if (d.build !== ALL) machines.push(`built ${formatBuildWindow(d.build)}`);
  const parts: string[] = [part];
  if (d.supplierLot !== ALL) parts.push(`with lot ${d.supplierLot}${machines.length ? ` (${machines.join(", ")})` : ""}`);
  else if (machines.length) parts.push(d.engineFamily !== ALL ? `on ${machines.join(" machines ")}` : `on machines ${machines.join(", ")}`);
  if (d.shop !== ALL) parts.push(`at shop ${labels.shop?.(d.shop) ?? d.shop}`);
  if (d.temperatureBand !== ALL) parts.push(`on days with a daily minimum of ${labels.temperatureBand?.(d.temperatureBand) ?? d.temperatureBand}`);
  if (d.hourBand !== ALL) parts.push(`at ${labels.hourBand?.(d.hourBand) ?? d.hourBand}`);
  const r = f.lead.ratio;
  const level = `${Math.round(r.level * 100)} %`;
  const expected = f.lead.expected >= 10 ? f.lead.expected.toFixed(0) : f.lead.expected >= 1 ? f.lead.expected.toFixed(1) : f.lead.expected.toFixed(2);
  const basis = o.standardise === "hour+temperature" ? "for the same engine hours and weather" : "for the same engine hours";
  let text =
    `${parts.join(" ")} happen about ${times(r.ratio)} times as often as expected ${basis} ` +
    `(${level} CI ${times(r.lower)}–${times(r.upper)}): ${f.lead.observed} ${f.lead.observed === 1 ? "failure" : "failures"} where ${expected} ${f.lead.expected === 1 ? "was" : "were"} expected.`;
  text +=
    o.standardise === "hour+temperature"
      ? " Colder weather and higher engine hours do not explain it: the expected count allows for both."
      : " Higher engine hours do not explain it: the expected count allows for them (weather is not allowed for in this view).";
  const strongest = f.facets.filter((x) => x.ratio.lower > r.ratio).sort((a, b) => a.rank - b.rank)[0];
  if (strongest) text += ` Strongest: ${facetWords(d, strongest.dimensions, labels)}, ${times(strongest.ratio.ratio)} times as often.`;
  return text;
}
