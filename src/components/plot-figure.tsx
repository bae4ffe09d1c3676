import { useEffect, useRef } from "react";
import * as Plot from "@observablehq/plot";

/** The only place Plot touches the DOM: renders a spec, replaces it when the spec changes, removes it on unmount. */
export function PlotFigure({ options, label }: { options: Plot.PlotOptions; label: string }) {
  const ref = useRef<HTMLDivElement>(null);
  useEffect(() => {
    const node = ref.current;
    if (!node) return;
    const chart = Plot.plot({ style: { fontFamily: "inherit", fontSize: "12px", background: "transparent" }, ...options });
    chart.setAttribute("role", "img");
    chart.setAttribute("aria-label", label);
    node.replaceChildren(chart);
    return () => chart.remove();
  }, [options, label]);
  return <div ref={ref} data-testid="chart" className="w-full overflow-x-auto" />;
}
