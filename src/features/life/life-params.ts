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
  /** query string for the Weibull fit and the Kaplan–Meier curve */
  lifeSearch: string;
  /** query string for the mean cumulative function */
  mcfSearch: string;
}

/** `filterSearch` is the shared filters' query string (readFilters); the life API takes one component, not the filter's list. */
export function readLifeParams(params: URLSearchParams, filterSearch: string): LifeParams {
  const component = params.get("component") ?? "ENG-CSA-HPLUG";
  const compareBy = params.get("compareBy") ?? "";
  const compareValue = params.get("compareValue") ?? "";
  const compareOther = params.get("compareOther") ?? "";
  const mcfComponent = params.get("mcfComponent") ?? "HYD-LIN-HOSE";
  const life = new URLSearchParams(filterSearch);
  life.delete("components");
  life.set("component", component);
  if (compareBy && compareValue) {
    life.set("compareBy", compareBy);
    life.set("compareValue", compareValue);
    if (compareOther) life.set("compareOther", compareOther);
  }
  const mcf = new URLSearchParams(filterSearch);
  mcf.delete("components");
  mcf.set("component", mcfComponent);
  return { component, compareBy, compareValue, compareOther, mcfComponent, lifeSearch: life.toString(), mcfSearch: mcf.toString() };
}
