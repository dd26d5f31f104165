// The bench screen's copy of the seat, brought up to date from the answers to its own stroke
// saves instead of reading the whole seat again after every stroke. A stroke save answers with
// the stage's verdict, the seat's state and how many strokes the stage now holds, as of that save
// (lib/strokes/batch.ts); the strokes themselves are the ones this phone sent. When anything does
// not add up — an unknown session, an answer of another shape, a count that differs from the
// server's — the answer is null and the screen reads the seat as before.
import type { SeatVerdict } from "@/lib/audio/verdict";
import type { SavedStrokes } from "./outbox";
import type { SeatReport } from "./service";

interface SaveAnswer {
  seatState: SeatReport["seat"]["state"];
  verdict: SeatVerdict;
  strokeCount: number;
}

function asAnswer(body: unknown): SaveAnswer | null {
  if (!body || typeof body !== "object") return null;
  const b = body as Record<string, unknown>;
  if (typeof b.seatState !== "string" || typeof b.strokeCount !== "number" || !b.verdict || typeof b.verdict !== "object") return null;
  if (typeof (b.verdict as Record<string, unknown>).state !== "string") return null;
  return { seatState: b.seatState as SaveAnswer["seatState"], verdict: b.verdict as SeatVerdict, strokeCount: b.strokeCount };
}

/** The seat with the confirmed saves applied in order, or null when the seat must be read again. */
export function applySavedStrokes(report: SeatReport, saved: readonly SavedStrokes[]): SeatReport | null {
  const mine = saved.filter((s) => s.seatId === report.seat.id);
  if (mine.length === 0) return null;
  const next: SeatReport = {
    ...report,
    seat: { ...report.seat },
    stages: {
      coarse: { ...report.stages.coarse, strokes: [...report.stages.coarse.strokes] },
      fine: { ...report.stages.fine, strokes: [...report.stages.fine.strokes] },
    },
  };
  for (const save of mine) {
    const stage = (["coarse", "fine"] as const).find((s) => next.stages[s].sessions.some((x) => x.id === save.sessionId));
    const answer = asAnswer(save.answer);
    if (!stage || !answer) return null;
    const record = next.stages[stage];
    const known = new Set(record.strokes.map((s) => s.clientId));
    for (const s of save.strokes) {
      if (known.has(s.clientId)) continue;
      known.add(s.clientId);
      record.strokes.push({
        n: record.strokes.length + 1,
        sessionId: save.sessionId,
        clientId: s.clientId,
        startS: s.startS,
        endS: s.endS,
        onsetDb: s.onsetDb,
        bodyDb: s.bodyDb,
        contrastDb: s.contrastDb,
        bandSnrDb: s.bandSnrDb ?? null,
        flags: s.flags,
      });
    }
    if (record.strokes.length !== answer.strokeCount) return null;
    record.verdict = answer.verdict;
    next.seat.state = answer.seatState;
  }
  return next;
}
