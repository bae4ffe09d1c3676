import { useEffect, useRef, useState } from "react";
import * as Plot from "@observablehq/plot";

/**
 * The only place Plot touches the DOM: renders a spec at the width of its container (unless the spec sets
 * one), replaces it when the spec or the width changes, and removes it on unmount.
 */
/**
 * The x-axis title centred below the tick labels, with room for it, rather than at the right end where it runs
 * into the last ticks; a spec that places its title itself (labelAnchor or labelOffset) is left as it is.
 */
function belowTicks(options: Plot.PlotOptions): Plot.PlotOptions {
  const x = options.x;
  if (!x || !x.label || x.labelAnchor !== undefined || x.labelOffset !== undefined) return options;
  return { ...options, marginBottom: Math.max(options.marginBottom ?? 0, 46), x: { ...x, labelAnchor: "center", labelOffset: 40 } };
}

export function PlotFigure({ options, label }: { options: Plot.PlotOptions; label: string }) {
  const ref = useRef<HTMLDivElement>(null);
  const [width, setWidth] = useState<number | null>(null);

  useEffect(() => {
    const node = ref.current;
    if (!node || typeof ResizeObserver === "undefined") return;
    const observer = new ResizeObserver(([entry]) => {
      const w = Math.floor(entry.contentRect.width);
      setWidth((prev) => (prev !== null && Math.abs(prev - w) < 8 ? prev : w));
    });
    observer.observe(node);
    return () => observer.disconnect();
  }, []);

  useEffect(() => {
    const node = ref.current;
    if (!node) return;
    const chart = Plot.plot({
      style: { fontFamily: "inherit", fontSize: "12px", background: "transparent" },
      ...(width && width > 200 ? { width } : {}),
      ...belowTicks(options),
    });
    // one text alternative for the whole chart: Plot labels its inner groups ("bar", "dot"), which ARIA does not
    // allow on an element without a role and which a screen reader cannot use anyway
    for (const el of chart.querySelectorAll("[aria-label], [aria-description]")) {
      el.removeAttribute("aria-label");
      el.removeAttribute("aria-description");
    }
    chart.setAttribute("role", "img");
    chart.setAttribute("aria-label", `${label}. The figures are in the chart's table view (the Table button beside its title).`);
    node.replaceChildren(chart);
    return () => chart.remove();
  }, [options, label, width]);

  return <div ref={ref} data-testid="chart" className="w-full overflow-x-auto" />;
}
