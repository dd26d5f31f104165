// The rules a stroke save and the bench share: who may add to a session, when a seat is closed
// to work, the order strokes are read in, and how the verdicts set a seat's state.
import { asc } from "drizzle-orm";
import { jobs, lappingSessions, seats, strokes, type LappingStage, type SeatState } from "@/db/schema";
import { judgeSeat, type SeatVerdict } from "@/lib/audio";
import type { Actor } from "@/lib/auth/authorize";
import { ConflictError, ForbiddenError } from "@/lib/errors";
import { seatCode } from "@/lib/heads/layout";
import { signedOffSeats } from "@/lib/jobs/hold";
import { isClosed } from "@/lib/jobs/lifecycle";

/** A phone that has sent nothing for this long no longer holds its seat. */
export const SEAT_HOLD_SECONDS = 45;
/**
 * A session's last sign of life is written again only when older than this: the hold is 45 s,
 * and a phone sends a stroke every couple of seconds, so writing it on every save is wasted work.
 */
export const SEAT_HOLD_REFRESH_SECONDS = 5;

export const SESSION_NOT_FOUND = "That lapping session does not exist in your shop.";

/** What the work checks read of a seat and its job. */
export interface WorkTarget {
  seat: Pick<typeof seats.$inferSelect, "state" | "cylinder" | "kind" | "position">;
  job: Pick<typeof jobs.$inferSelect, "status" | "number">;
}

export function assertOpenForWork(ctx: WorkTarget): void {
  if (ctx.seat.state === "approved") {
    throw new ConflictError(
      `Seat ${seatCode(ctx.seat)} is signed off. A supervisor must reopen it before more strokes are recorded.`,
    );
  }
  if (isClosed(ctx.job.status)) {
    throw new ConflictError(signedOffSeats(ctx.job));
  }
}

/**
 * A lapping session is one person's phone listening to a seat, so that the record says who
 * lapped: another technician (on a job open to both) starts a session of their own rather than
 * adding to it. Supervisors, who may work on any job of the shop, may also act on any session.
 */
export function assertOwnSession(actor: Actor, session: { technicianId: string }, starterName: string): void {
  if (actor.role === "technician" && session.technicianId !== actor.id) {
    throw new ForbiddenError(`This session was started by ${starterName}; only their phone adds to it. Start your own session on this seat.`);
  }
}

// Sessions in the order they were lapped, strokes in the order they were heard; the stroke id
// only breaks exact ties, so every reader sees one order.
export const SESSION_ORDER = [asc(lappingSessions.startedAt), asc(lappingSessions.id)];
/** The columns of that order, all ascending (for an aggregate's own ORDER BY). */
export const STROKE_ORDER_COLUMNS = [lappingSessions.startedAt, lappingSessions.id, strokes.startS, strokes.index, strokes.id] as const;
export const STROKE_ORDER = STROKE_ORDER_COLUMNS.map((c) => asc(c));

/** The server's verdict on one stage's strokes in order, numbered from 1 across its sessions. */
export function judgeStage(list: ReadonlyArray<{ contrastDb: number; startS: number; flags: string[] }>): SeatVerdict {
  return judgeSeat(list.map((s, i) => ({ contrastDb: s.contrastDb, index: i + 1, startS: s.startS, flags: s.flags })));
}

/** The seat's state after its strokes: our own names, decided by the server's verdicts. */
export function seatStateFor(current: SeatState, stage: LappingStage, verdict: SeatVerdict, fineVerdict: SeatVerdict): SeatState {
  if (current === "approved") return current;
  if (fineVerdict.state === "settled") return "settled";
  if (verdict.state === "not-settling") return "stalled";
  if (verdict.state === "no-strokes" && stage === "coarse" && current === "waiting") return "waiting";
  return "lapping";
}

