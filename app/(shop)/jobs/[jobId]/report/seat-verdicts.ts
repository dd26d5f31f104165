// Every seat's coarse and fine verdicts for the report, judged by the same lib/audio rule the
// bench and the server use, from one query per head rather than one report per seat.
import { asc, eq } from "drizzle-orm";
import type { Db } from "@/db/client";
import { lappingSessions, seats, strokes, type LappingStage } from "@/db/schema";
import { judgeSeat, type SeatVerdict } from "@/lib/audio";

export interface StageSummary {
  verdict: SeatVerdict;
  contrastsDb: number[];
  sessions: number;
}

export async function seatVerdicts(db: Db, headId: string): Promise<Map<string, Record<LappingStage, StageSummary>>> {
  const rows = await db
    .select({
      seatId: lappingSessions.seatId,
      sessionId: lappingSessions.id,
      stage: lappingSessions.stage,
      index: strokes.index,
      startS: strokes.startS,
      contrastDb: strokes.contrastDb,
      flags: strokes.flags,
    })
    .from(strokes)
    .innerJoin(lappingSessions, eq(lappingSessions.id, strokes.sessionId))
    .innerJoin(seats, eq(seats.id, lappingSessions.seatId))
    .where(eq(seats.headId, headId))
    // The order the bench service judges in: sessions as lapped, strokes as heard.
    .orderBy(asc(lappingSessions.startedAt), asc(lappingSessions.id), asc(strokes.startS), asc(strokes.index));
  const grouped = new Map<string, Record<LappingStage, { list: typeof rows; sessions: Set<string> }>>();
  for (const r of rows) {
    const entry = grouped.get(r.seatId) ?? { coarse: { list: [], sessions: new Set() }, fine: { list: [], sessions: new Set() } };
    entry[r.stage].list.push(r);
    entry[r.stage].sessions.add(r.sessionId);
    grouped.set(r.seatId, entry);
  }
  const out = new Map<string, Record<LappingStage, StageSummary>>();
  for (const [seatId, stages] of grouped) {
    const summary = (stage: LappingStage): StageSummary => {
      const { list, sessions } = stages[stage];
      return {
        verdict: judgeSeat(list.map((s, i) => ({ contrastDb: s.contrastDb, index: i + 1, startS: s.startS, flags: s.flags }))),
        contrastsDb: list.map((s) => s.contrastDb),
        sessions: sessions.size,
      };
    };
    out.set(seatId, { coarse: summary("coarse"), fine: summary("fine") });
  }
  return out;
}
