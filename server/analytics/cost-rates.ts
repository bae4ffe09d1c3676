/**
 * Repair cost per 1,000 engine hours: 1000 × Σ (parts + labour cost) ÷ Σ engine hours of the fleet that
 * produced it. Costs of a shop are set against that shop's engine hours; a component's cost over all shops
 * against the whole fleet's hours. Units: the exports' currency per 1,000 engine hours. A point estimate:
 * costs are not Poisson counts, so no exact interval is offered.
 */
export function costPerThousandHours(cost: number, engineHours: number): number | null {
  if (!(engineHours > 0)) return null;
  return (1000 * cost) / engineHours;
}

export interface CostInputRow {
  shop: string;
  component: string;
  lines: number;
  partsCost: number;
  labourCost: number;
}

export interface CostTable {
  rows: (CostInputRow & { cost: number; engineHours: number; perThousandHours: number | null })[];
  shops: { shop: string; engineHours: number; cost: number; lines: number; perThousandHours: number | null }[];
  components: { component: string; cost: number; lines: number; perThousandHours: number | null }[];
  engineHours: number;
  cost: number;
  perThousandHours: number | null;
}

/**
 * Costs by shop × component with each shop's engine hours, summarised per shop (its cost over its hours,
 * shops with hours but no cost included at 0) and per component (cost over the fleet's hours), highest first.
 */
export function costTable(rows: readonly CostInputRow[], hoursByShop: ReadonlyMap<string, number>): CostTable {
  const fleetHours = [...hoursByShop.values()].reduce((s, h) => s + h, 0);
  const withCost = rows.map((r) => {
    const cost = r.partsCost + r.labourCost;
    const engineHours = hoursByShop.get(r.shop) ?? 0;
    return { ...r, cost, engineHours, perThousandHours: costPerThousandHours(cost, engineHours) };
  });
  const shopCodes = [...new Set([...hoursByShop.keys(), ...rows.map((r) => r.shop)])].sort();
  const shops = shopCodes.map((shop) => {
    const mine = withCost.filter((r) => r.shop === shop);
    const cost = mine.reduce((s, r) => s + r.cost, 0);
    const engineHours = hoursByShop.get(shop) ?? 0;
    return { shop, engineHours, cost, lines: mine.reduce((s, r) => s + r.lines, 0), perThousandHours: costPerThousandHours(cost, engineHours) };
  });
  const byComponent = new Map<string, { cost: number; lines: number }>();
  for (const r of withCost) {
    const c = byComponent.get(r.component) ?? { cost: 0, lines: 0 };
    byComponent.set(r.component, { cost: c.cost + r.cost, lines: c.lines + r.lines });
  }
  const components = [...byComponent]
    .map(([component, c]) => ({ component, ...c, perThousandHours: costPerThousandHours(c.cost, fleetHours) }))
    .sort((x, y) => y.cost - x.cost || x.component.localeCompare(y.component));
  const cost = withCost.reduce((s, r) => s + r.cost, 0);
  return { rows: withCost, shops, components, engineHours: fleetHours, cost, perThousandHours: costPerThousandHours(cost, fleetHours) };
}
