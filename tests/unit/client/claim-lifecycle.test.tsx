// @vitest-environment happy-dom
import { afterEach, beforeEach, describe, expect, it, vi } from "vitest";
import { cleanup, fireEvent, render, screen, waitFor } from "@testing-library/react";
import { QueryClientProvider } from "@tanstack/react-query";
import { MemoryRouter } from "react-router-dom";
import { createQueryClient } from "@/app/query-client";
import { StatusActions } from "@/features/claims/components/status-actions";
import { ClaimLineSplit } from "@/features/claims/components/claim-line-split";
import type { ClaimDetail } from "@shared/schemas/claims";

// The claim page's money and lifecycle controls, rendered with only the fields they read and the API answered
// here: a late filing shows the days overdue and asks for a confirmation; a line is included only with a reason.

const daysAgo = (n: number) => new Date(Date.now() - n * 86_400_000).toISOString().slice(0, 10);

const claim = {
  id: "7",
  status: "draft",
  revision: 1,
  amountClaimed: 25470.56,
  amountPaid: null,
  writtenOffReason: null,
  supersededBy: null,
  canResubmit: false,
  allowedMoves: ["submitted"],
  filing: null,
  deadline: { deadline: daysAgo(12), daysLeft: -12, state: "overdue", text: "" },
  submitCheck: { daysOverdue: 12, sentOn: null, text: "The claim has not gone to the maker." },
  lines: [
    { id: "11", roNumber: "R-100", lineNo: 1, hourMeter: 1200, machine: { serial: "SN-A" } },
    { id: "12", roNumber: "R-101", lineNo: 2, hourMeter: 3412, machine: { serial: "SN-B" } },
  ],
  split: {
    included: [{ lineId: "11", basis: "covered", why: null, reason: null, includedBy: null, includedAt: null, amount: 25470.56 }],
    apart: [{ lineId: "12", why: "Not covered: the hours limit was passed (engine cover, 36 months / 3,000 h, whichever comes first).", amount: 3929.47 }],
    amountClaimed: 25470.56,
    amountApart: 3929.47,
  },
} as unknown as ClaimDetail;

let sent: { path: string; body: unknown }[];
beforeEach(() => {
  sent = [];
  vi.stubGlobal("fetch", async (input: RequestInfo | URL, init?: RequestInit) => {
    sent.push({ path: String(input), body: init?.body ? JSON.parse(String(init.body)) : null });
    return new Response(JSON.stringify({ error: { code: "late_unconfirmed", message: "refused here", requestId: "r" } }), { status: 409, headers: { "content-type": "application/json" } });
  });
});
afterEach(() => {
  cleanup();
  vi.unstubAllGlobals();
});

const show = (ui: React.ReactNode) => render(<QueryClientProvider client={createQueryClient()}><MemoryRouter>{ui}</MemoryRouter></QueryClientProvider>);

describe("StatusActions({ claim }) on an overdue draft", () => {
  it("shows the days overdue and sends the late filing only once it is confirmed", async () => {
    show(<StatusActions claim={claim} />);
    expect(screen.getByText(/The deadline passed 12 days ago/)).toBeTruthy();
    fireEvent.click(screen.getByRole("button", { name: "Mark submitted" }));
    fireEvent.change(screen.getByLabelText("Reference"), { target: { value: "PORTAL-1" } });
    expect(screen.getByRole("alert").textContent).toMatch(/12 days after the deadline/);
    fireEvent.click(screen.getAllByRole("button", { name: "Mark submitted" }).at(-1)!);
    expect(screen.getByText("Tick the box to confirm filing 12 days late.")).toBeTruthy();
    expect(sent).toEqual([]);
    fireEvent.click(screen.getByLabelText("I confirm filing this claim 12 days late"));
    fireEvent.click(screen.getAllByRole("button", { name: "Mark submitted" }).at(-1)!);
    await waitFor(() => expect(sent).toHaveLength(1));
    expect(sent[0].path).toBe("/api/claims/7/status");
    expect(sent[0].body).toMatchObject({ to: "submitted", confirmLate: true, filing: { reference: "PORTAL-1" } });
  });
});

describe("ClaimLineSplit({ claim })", () => {
  it("lists the line apart with why, with thousands separators, and includes it only with a reason", async () => {
    show(<ClaimLineSplit claim={claim} />);
    expect(screen.getByText(/Listed apart, not claimed:/).textContent).toContain("3,929.47");
    expect(screen.getByText(/the hours limit was passed/)).toBeTruthy();
    fireEvent.click(screen.getByRole("button", { name: "Include with reason…" }));
    fireEvent.click(screen.getByRole("button", { name: "Include in the amount claimed" }));
    expect(screen.getByRole("alert").textContent).toMatch(/Give your reason/);
    expect(sent).toEqual([]);
    fireEvent.change(screen.getByPlaceholderText("Why the maker should pay for it anyway"), { target: { value: "Same failed lot as the covered lines" } });
    fireEvent.click(screen.getByRole("button", { name: "Include in the amount claimed" }));
    await waitFor(() => expect(sent).toHaveLength(1));
    expect(sent[0]).toEqual({ path: "/api/claims/7/lines/12/inclusion", body: { include: true, reason: "Same failed lot as the covered lines" } });
  });
});
