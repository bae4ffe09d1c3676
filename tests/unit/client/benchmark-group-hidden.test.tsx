// @vitest-environment happy-dom
import { afterEach, describe, expect, it } from "vitest";
import { cleanup, render, screen } from "@testing-library/react";
import { QueryClientProvider } from "@tanstack/react-query";
import { createQueryClient } from "@/app/query-client";
import { FunnelCard } from "@/features/benchmarks/components/funnel-card";
import { GROUP_HIDDEN } from "../../../server/analytics/peer-groups.js";

// The words are the rule's own (server/analytics/peer-groups.ts, the threshold rule of statistical disclosure
// control: Hundepool et al., Statistical Disclosure Control, Wiley 2012; k = 3 from memory).

afterEach(cleanup);

describe("<FunnelCard hidden>", () => {
  it("draws no funnel and says why in words when the group figure is hidden", () => {
    render(
      <QueryClientProvider client={createQueryClient()}>
        <FunnelCard
          chart={{ points: [], groupRate: null, limits: [], xLabel: "x", yLabel: "y" }}
          title="Funnel: first-time fix against complaints"
          subtitle="s"
          pointLabel="Shop"
          volumeLabel="Complaints"
          rateLabel="First-time fix"
          filename="f.csv"
          hidden={GROUP_HIDDEN}
        />
      </QueryClientProvider>,
    );
    const region = screen.getByRole("region", { name: "Funnel: first-time fix against complaints" });
    expect(region.textContent).toContain("The group figure is hidden: fewer than three other shops to compare with.");
    expect(region.querySelector("svg")).toBeNull();
    expect(screen.queryByRole("button", { name: "CSV" })).toBeNull();
  });
});
