import { useCallback, useEffect, useRef, useState } from "react";
import { useQueryClient } from "@tanstack/react-query";
import type { ApiError } from "@/lib/api-error";
import type { BenchLine } from "@shared/schemas/bench-sheet";
import type { PressureUnit } from "@shared/format";
import { benchSheetQueries, saveBenchSheet } from "../api/bench-sheet-queries";
import { draftToSheet, emptyDraft, readDraft, writeDraft, type BenchDraft, type DraftProblem } from "../draft";

export interface FieldRefusal {
  /** the draft's field id */
  field: string;
  label: string;
  value: string;
  reason: string;
}

export type SyncState =
  | { kind: "idle" }
  | { kind: "sending" }
  | { kind: "sent"; at: string; stored: number }
  | { kind: "waiting"; message: string }
  | { kind: "invalid"; problems: DraftProblem[] }
  | { kind: "refused"; message: string; refused: FieldRefusal[] }
  | { kind: "failed"; error: ApiError };

const newKey = () => (typeof crypto !== "undefined" && "randomUUID" in crypto && window.isSecureContext ? crypto.randomUUID() : `${Date.now().toString(36)}-${Math.random().toString(36).slice(2)}`);

const WAITING = "No connection: the sheet is kept on this device and will be sent by itself when the connection returns.";

/**
 * The sheet being typed, kept on the device on every change (localStorage, one draft per user and line). Saving
 * marks the draft pending before the request goes out; a save that cannot reach the server stays pending and is
 * sent once, by itself, when the browser reports the connection back (its "online" event) or when the page opens
 * again online. One save is in flight at a time, so a burst of online events sends it once.
 */
export function useBenchDraft(userSub: string, line: BenchLine, units: { temperatureUnit: "C" | "F"; pressureUnit: PressureUnit }) {
  const qc = useQueryClient();
  const [draft, setDraft] = useState<BenchDraft>(() => readDraft(userSub, line.id) ?? emptyDraft(line, units));
  const [sync, setSync] = useState<SyncState>(() => (draft.pending ? { kind: "waiting", message: WAITING } : { kind: "idle" }));
  const [kept, setKept] = useState(true);
  const current = useRef(draft);
  const inFlight = useRef(false);

  const commit = useCallback(
    (next: BenchDraft) => {
      current.current = next;
      setDraft(next);
      setKept(writeDraft(userSub, next));
    },
    [userSub],
  );

  /** An edit by the technician; a pending save will carry the edited sheet, under a new key. */
  const edit = useCallback(
    (fn: (d: BenchDraft) => BenchDraft) => {
      const d = fn(current.current);
      commit(d.pending && !inFlight.current ? { ...d, pending: { key: newKey() } } : d);
      setSync((s) => (s.kind === "invalid" || s.kind === "sent" ? { kind: "idle" } : s));
    },
    [commit],
  );

  const send = useCallback(async () => {
    if (inFlight.current) return;
    const d = current.current;
    const { sheet, problems, fieldOf } = draftToSheet(d);
    if (problems.length) {
      setSync({ kind: "invalid", problems });
      return;
    }
    const key = d.pending?.key ?? newKey();
    commit({ ...d, pending: { key } });
    if (!navigator.onLine) {
      setSync({ kind: "waiting", message: WAITING });
      return;
    }
    inFlight.current = true;
    setSync({ kind: "sending" });
    try {
      const r = await saveBenchSheet(line.id, sheet, key);
      const now = current.current;
      const settled = { ...now, pending: now.pending?.key === key ? null : now.pending };
      if (r.kind === "saved") {
        commit({ ...settled, sentAt: new Date().toISOString() });
        qc.setQueryData(benchSheetQueries.line(line.id).queryKey, r.answer);
        void qc.invalidateQueries({ queryKey: [...benchSheetQueries.all(), "search"] });
        setSync({ kind: "sent", at: new Date().toISOString(), stored: r.answer.stored });
      } else if (r.kind === "refused") {
        commit(settled);
        setSync({ kind: "refused", message: r.message, refused: r.refused.map((x) => ({ ...x, field: fieldOf[x.field] ?? x.field })) });
      } else if (r.kind === "offline") {
        setSync({ kind: "waiting", message: navigator.onLine ? r.message : WAITING });
      } else {
        commit(settled);
        setSync({ kind: "failed", error: r.error });
      }
    } finally {
      inFlight.current = false;
    }
  }, [commit, line.id, qc]);

  // the pending save goes by itself when the connection returns, and when the page opens online with one waiting
  useEffect(() => {
    const resend = () => {
      if (current.current.pending) void send();
    };
    window.addEventListener("online", resend);
    if (navigator.onLine) resend();
    return () => window.removeEventListener("online", resend);
  }, [send]);

  return { draft, edit, send, sync, kept };
}
