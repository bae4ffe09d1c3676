/**
 * The Life page's choices as its URL holds them (part, comparison, part for repeat repairs) and the two query
 * strings the life API reads: one for the Weibull fit and Kaplan–Meier curve, one for the mean cumulative function.
 */
export interface LifeParams {
  component: string;
  compareBy: string;
  compareValue: string;
  compareOther: string;
  mcfComponent: string;
  /** the B-life shown beside the fits, 1–50 (B10 unless the URL asks for another) */
  bLife: number;
  /** query string for the Weibull fit and the Kaplan–Meier curve */
  lifeSearch: string;
  /** query string for the mean cumulative function (count and cost) */
  mcfSearch: string;
  /** query string for the rate comparison of the chosen groups, or null when the comparison has no rate form (climate) */
  rateCompareSearch: string | null;
}

/** A B-life typed by the user: a whole number from 1 to 50, or the reason it is refused. */
export function parseBLife(text: string): { value: number } | { error: string } {
  const t = text.trim();
  if (!/^\d+$/.test(t)) return { error: "Type a whole number from 1 to 50." };
  const n = Number(t);
  if (n < 1 || n > 50) return { error: "B-life runs from B1 to B50." };
  return { value: n };
}

/** `filterSearch` is the shared filters' query string (readFilters); the life API takes one component, not the filter's list. */
export function readLifeParams(params: URLSearchParams, filterSearch: string): LifeParams {
  const component = params.get("component") ?? "ENG-CSA-HPLUG";
  const compareBy = params.get("compareBy") ?? "";
  const compareValue = params.get("compareValue") ?? "";
  const compareOther = params.get("compareOther") ?? "";
  const mcfComponent = params.get("mcfComponent") ?? "HYD-LIN-HOSE";
  const typed = parseBLife(params.get("bLife") ?? "10");
  const bLife = "value" in typed ? typed.value : 10;
  const life = new URLSearchParams(filterSearch);
  life.delete("components");
  life.set("component", component);
  if (bLife !== 10) life.set("bLife", String(bLife));
  if (compareBy && compareValue) {
    life.set("compareBy", compareBy);
    life.set("compareValue", compareValue);
    if (compareOther) life.set("compareOther", compareOther);
  }
  const mcf = new URLSearchParams(filterSearch);
  mcf.delete("components");
  mcf.set("component", mcfComponent);
  let rateCompareSearch: string | null = null;
  if ((compareBy === "lot" || compareBy === "engineFamily" || compareBy === "shop") && compareValue) {
    const r = new URLSearchParams(filterSearch);
    r.set("compareBy", compareBy);
    r.set("a", compareValue);
    if (compareOther) r.set("b", compareOther);
    r.set("component", component);
    rateCompareSearch = r.toString();
  }
  return { component, compareBy, compareValue, compareOther, mcfComponent, bLife, lifeSearch: life.toString(), mcfSearch: mcf.toString(), rateCompareSearch };
}
