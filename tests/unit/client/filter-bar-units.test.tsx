// @vitest-environment happy-dom
import { afterEach, describe, expect, it, vi } from "vitest";
import { cleanup, fireEvent, render, screen } from "@testing-library/react";
import { QueryClientProvider } from "@tanstack/react-query";
import { MemoryRouter, useLocation } from "react-router-dom";
import { createQueryClient } from "@/app/query-client";
import { FilterBar } from "@/features/filters/components/filter-bar";

afterEach(() => {
  cleanup();
  vi.unstubAllGlobals();
  localStorage.clear();
});

function Search() {
  return <output data-testid="search">{decodeURIComponent(useLocation().search)}</output>;
}

function renderAt(url: string) {
  vi.stubGlobal("fetch", async () => new Response(JSON.stringify({ shops: [] }), { status: 200, headers: { "content-type": "application/json" } }));
  render(
    <QueryClientProvider client={createQueryClient()}>
      <MemoryRouter initialEntries={[url]}>
        <FilterBar />
        <Search />
      </MemoryRouter>
    </QueryClientProvider>,
  );
  fireEvent.click(screen.getByRole("button", { name: "More filters" }));
}

const pressed = () => screen.getAllByRole("button", { pressed: true }).map((b) => b.textContent);

describe("<FilterBar> temperature bands", () => {
  it("offers the unit's bands and carries the chosen ones over to the bands of the unit switched to", () => {
    localStorage.setItem("ironledger.temperatureUnit", "F");
    renderAt("/rates?tempBands=0-20F");
    expect(pressed()).toEqual(["°F", "0 to 20 °F"]);
    fireEvent.click(screen.getByRole("button", { name: "°C" }));
    // 0–20 °F is −17.8 to −6.7 °C: the °C bands that overlap it
    expect(screen.getByTestId("search").textContent).toBe("?tempBands=minus20-minus10C,minus10-0C");
    expect(pressed()).toEqual(["°C", "−20 to −10 °C", "−10 to 0 °C"]);
    expect(screen.getAllByRole("button", { name: /°C/ }).map((b) => b.textContent)).toContain("0 to 5 °C");
  });

  it("shows a chosen band of the other unit (from a link) so it can be cleared", () => {
    renderAt("/rates?tempBands=45F-up");
    expect(pressed()).toEqual(["°C", "7.2 °C and above"]);
    fireEvent.click(screen.getByRole("button", { name: "7.2 °C and above" }));
    expect(screen.getByTestId("search").textContent).toBe("");
  });
});
