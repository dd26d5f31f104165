"use client";

// One stage's fade curve as the screen shows it: the server's strokes, then this phone's strokes
// not yet in the server's copy, and the verdict — the server's, or this phone's preview while
// strokes wait to be saved.
import { useEffect, useMemo } from "react";
import { judgeSeat, type SeatVerdict } from "@/lib/audio/verdict";
import type { PendingStroke } from "@/lib/bench/outbox";
import type { SeatReport } from "@/lib/bench/service";
import type { ChartStroke } from "./fade-chart";

export type Stage = "coarse" | "fine";
export type CurveStroke = ChartStroke & { flags: string[]; startS: number };

export interface StageCurve {
  all: CurveStroke[];
  /** How many of `all` are still only on this phone. */
  pending: number;
  verdict: SeatVerdict;
}

export function useStageCurve(report: SeatReport, stage: Stage, local: PendingStroke[], listeningIn: string | null): StageCurve {
  const serverStage = report.stages[stage];
  const combined = useMemo(() => {
    const known = new Set(serverStage.strokes.map((s) => s.clientId));
    const sessionsOfStage = new Set(serverStage.sessions.map((s) => s.id));
    const mine = local.filter(
      (l) => !known.has(l.stroke.clientId) && (sessionsOfStage.has(l.sessionId) || l.sessionId === listeningIn || l.stage === stage),
    );
    const all: CurveStroke[] = [
      ...serverStage.strokes.map((s) => ({ n: s.n, contrastDb: s.contrastDb, flags: s.flags, startS: s.startS })),
      ...mine.map((m, i) => ({
        n: serverStage.strokes.length + i + 1,
        contrastDb: m.stroke.contrastDb,
        flags: m.stroke.flags,
        startS: m.stroke.startS,
        pending: true,
      })),
    ];
    return { all, pending: mine.length };
  }, [serverStage, local, stage, listeningIn]);

  const preview = useMemo(
    () => judgeSeat(combined.all.map((s) => ({ contrastDb: s.contrastDb, index: s.n, flags: s.flags, startS: s.startS }))),
    [combined.all],
  );

  // Runs after the curve has been committed with the new point: User Timing read by the bench
  // benchmark (stroke closed → point on the curve).
  const drawn = combined.all.length;
  useEffect(() => {
    const received = performance.getEntriesByName("grindfade:stroke-received", "mark").at(-1) as PerformanceMark | undefined;
    if (!received || drawn === 0) return;
    const detectionMs = (received.detail as { detectionMs?: number } | null)?.detectionMs ?? 0;
    requestAnimationFrame(() =>
      performance.measure("grindfade:stroke-to-curve", { start: received.startTime, end: performance.now(), detail: { detectionMs, strokes: drawn } }),
    );
    performance.clearMarks("grindfade:stroke-received");
  }, [drawn]);

  return { all: combined.all, pending: combined.pending, verdict: combined.pending > 0 ? preview : serverStage.verdict };
}
