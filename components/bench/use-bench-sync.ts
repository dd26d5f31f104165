"use client";

// The bench screen's link to the server: the server's copy of the seat, the phone's outbox of
// strokes, sessions and recordings, and what the last send said. The screen shows strokes from
// two places — the server's copy and the ones still on the phone — and this hook keeps both.
import { useCallback, useEffect, useRef, useState } from "react";
import { Outbox, type FlushReport, type PendingStroke } from "@/lib/bench/outbox";
import { recoverTakes, Takes } from "@/lib/bench/takes";
import { applySavedStrokes } from "@/lib/bench/saved-strokes";
import type { SeatReport } from "@/lib/bench/service";
import { keepSeatCopy } from "./offline-copy";

async function fetchSeat(seatId: string): Promise<SeatReport> {
  const res = await fetch(`/api/seats/${seatId}`, { headers: { accept: "application/json" } });
  const body = (await res.json().catch(() => null)) as (SeatReport & { message?: string }) | null;
  if (!res.ok || !body) throw new Error(body?.message ?? `The seat could not be loaded (HTTP ${res.status}).`);
  return body;
}

export interface SetAsideNotice {
  strokes: number;
  others: number;
  message: string;
}

export type SyncNote = FlushReport["stoppedBy"] | undefined;

export interface BenchSync {
  /** The server's copy of the seat; refreshed after every save it confirms. */
  report: SeatReport;
  /** Strokes heard on this phone and not yet in the server's copy. */
  local: PendingStroke[];
  addLocal(stroke: PendingStroke): void;
  pendingCount: number;
  syncNote: string | null;
  refusals: string[];
  clearRefusals(): void;
  setAside: SetAsideNotice | null;
  outbox(): Outbox;
  takes(): Takes;
  /** Sends what the outbox holds; answers why it stopped. */
  sync(): Promise<SyncNote>;
}

/**
 * `onSessionRefused` is called when the server refuses the session this phone is listening in
 * (seat busy, signed off, not yours): the screen stops listening rather than gather strokes that
 * will never count. `currentSession` names that session.
 */
export function useBenchSync(
  initial: SeatReport,
  currentSession: () => string | null,
  onSessionRefused: () => void,
): BenchSync {
  const seatId = initial.seat.id;
  // Plain fetch keeps the bench screen's first load small.
  const [report, setReportState] = useState<SeatReport>(initial);
  const reportRef = useRef(initial);
  const setReport = useCallback((r: SeatReport) => {
    reportRef.current = r;
    setReportState(r);
  }, []);
  const [local, setLocal] = useState<PendingStroke[]>([]);
  const [pendingCount, setPendingCount] = useState(0);
  const [syncNote, setSyncNote] = useState<string | null>(null);
  const [refusals, setRefusals] = useState<string[]>([]);
  // Strokes the server failed on too often: kept on this phone, shown until sent again.
  const [setAside, setSetAside] = useState<SetAsideNotice | null>(null);
  const unread = useRef(false);
  const outboxRef = useRef<Outbox | null>(null);
  const takesRef = useRef<Takes | null>(null);
  const outbox = useCallback(() => (outboxRef.current ??= new Outbox()), []);
  const takes = useCallback(() => (takesRef.current ??= new Takes()), []);
  const refusedRef = useRef({ currentSession, onSessionRefused });
  useEffect(() => {
    refusedRef.current = { currentSession, onSessionRefused };
  });

  const refresh = useCallback(async () => {
    try {
      setReport(await fetchSeat(seatId));
      return true;
    } catch {
      return false; // keep showing the last copy; the sync note says what is pending
    }
  }, [seatId, setReport]);

  const sync = useCallback(async (): Promise<SyncNote> => {
    let flushed: FlushReport;
    try {
      flushed = await outbox().flush();
    } catch {
      setSyncNote("This phone's storage is not available; strokes cannot be kept offline.");
      return;
    }
    setPendingCount(flushed.pending);
    const aside = await outbox().setAsideOps(seatId);
    setSetAside(
      aside.length
        ? { strokes: aside.filter((op) => op.kind === "stroke").length, others: aside.filter((op) => op.kind !== "stroke").length, message: aside[aside.length - 1]!.setAside! }
        : null,
    );
    if (flushed.refused.length) setRefusals((r) => [...r, ...flushed.refused.map((x) => x.message)]);
    const listeningIn = refusedRef.current.currentSession();
    if (flushed.refused.some((x) => x.op.kind === "session" && x.op.body.sessionId === listeningIn)) refusedRef.current.onSessionRefused();
    setSyncNote(
      flushed.stoppedBy === "offline"
        ? "No network: strokes are kept on this phone and sent when it returns."
        : flushed.stoppedBy === "signed-out"
          ? "You were signed out. Sign in again in another tab; strokes are kept on this phone."
          : flushed.stoppedBy === "server"
            ? "The server is busy; strokes are kept and will be resent."
            : null,
    );
    // Sent strokes leave the local list only once the screen's copy of the seat has them. Stroke
    // saves alone bring it up to date from their answers; anything else sent, or answers that do
    // not add up, read the seat again. A read that failed (the network dropped right after the
    // send) is tried again at the next sync.
    if (flushed.sent > 0 || (unread.current && flushed.stoppedBy === "done")) {
      const pending = await outbox().pendingStrokes(seatId);
      const applied = !unread.current && flushed.otherSent === 0 ? applySavedStrokes(reportRef.current, flushed.saved) : null;
      if (applied) {
        setReport(applied);
        keepSeatCopy(applied);
      }
      else if (flushed.saved.some((s) => s.seatId === seatId) || flushed.otherSent > 0 || unread.current) unread.current = !(await refresh());
      if (!unread.current) setLocal((l) => l.filter((x) => pending.some((p) => p.stroke.clientId === x.stroke.clientId)));
    }
    return flushed.stoppedBy;
  }, [outbox, refresh, seatId, setReport]);

  // Strokes still in the outbox from before a reload belong on the curve too.
  useEffect(() => {
    let cancelled = false;
    void (async () => {
      try {
        // A recording a reload or crash interrupted goes up with its session.
        await recoverTakes(takes(), outbox()).catch(() => []);
        const pending = await outbox().pendingStrokes(seatId);
        if (!cancelled && pending.length) setLocal(pending);
        // Reloaded offline (from the offline worker's copy): the seat as this phone last read it,
        // which may be newer than the copy of the page.
        if ((await sync()) === "offline") await refresh();
      } catch {
        /* storage unavailable: handled in sync */
      }
    })();
    const online = () => void sync();
    window.addEventListener("online", online);
    const timer = setInterval(() => {
      if (navigator.onLine) void sync();
    }, 5000);
    return () => {
      cancelled = true;
      window.removeEventListener("online", online);
      clearInterval(timer);
    };
  }, [outbox, takes, refresh, seatId, sync]);

  const addLocal = useCallback((stroke: PendingStroke) => setLocal((l) => [...l, stroke]), []);
  const clearRefusals = useCallback(() => setRefusals([]), []);
  return { report, local, addLocal, pendingCount, syncNote, refusals, clearRefusals, setAside, outbox, takes, sync };
}
