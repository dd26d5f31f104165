// The server side of the bench screen: lapping sessions, stroke saves and the verdict. The
// phone's own verdict is only a preview; the one that counts is recomputed here from the stored
// strokes with the same lib/audio functions.
import { and, asc, desc, eq, gt, isNull, ne, sql } from "drizzle-orm";
import type { Db } from "@/db/client";
import {
  heads,
  jobs,
  lappingSessions,
  seats,
  strokes,
  users,
  valves,
  type JobStatus,
  type LappingStage,
  type SeatState,
  reviews,
} from "@/db/schema";
import { judgeSeat, type SeatVerdict } from "@/lib/audio";
import type { Actor } from "@/lib/auth/guard";
import { assertCanWorkOn } from "@/lib/auth/job-access";
import { recordAudit } from "@/lib/audit";
import { ConflictError, ForbiddenError, NotFoundError } from "@/lib/errors";
import { seatCode, seatLabel } from "@/lib/heads/layout";
import { holdJob } from "@/lib/jobs/hold";
import { backToBenchForWork } from "@/lib/jobs/hand-in";
import { isClosed } from "@/lib/jobs/lifecycle";
import type { StartSessionInput } from "@/lib/validations/bench";
import {
  assertOpenForWork,
  assertOwnSession,
  judgeStage,
  SESSION_NOT_FOUND,
  SEAT_HOLD_SECONDS,
  SESSION_ORDER,
  seatStateFor,
  STROKE_ORDER,
} from "./rules";

export { seatStateFor } from "./rules";
export { saveStrokes, type StrokeSaveResult } from "@/lib/strokes/batch";

export { SEAT_HOLD_SECONDS } from "./rules";


interface SeatContext {
  seat: typeof seats.$inferSelect;
  head: typeof heads.$inferSelect;
  job: typeof jobs.$inferSelect;
}

type Reader = Pick<Db, "select">;

/**
 * The seat with its head and job. `lock` locks the seat and the job as a seat decision does
 * (lib/review/service.ts), for a write that changes both and must not cross a sign-off.
 */
async function loadSeat(db: Reader, shopId: string, seatId: string, lock = false): Promise<SeatContext> {
  const query = db
    .select({ seat: seats, head: heads, job: jobs })
    .from(seats)
    .innerJoin(heads, eq(heads.id, seats.headId))
    .innerJoin(jobs, eq(jobs.id, heads.jobId))
    .where(and(eq(seats.id, seatId), eq(jobs.shopId, shopId)))
    .limit(1);
  const [row] = lock ? await query.for("no key update", { of: [seats, jobs] }) : await query;
  if (!row) throw new NotFoundError("That seat does not exist in your shop.");
  return row;
}

export interface StageRecord {
  stage: LappingStage;
  sessions: Array<{ id: string; technicianName: string; startedAt: string; endedAt: string | null; hasRecording: boolean }>;
  strokes: Array<{
    n: number;
    sessionId: string;
    clientId: string;
    startS: number;
    endS: number;
    onsetDb: number;
    bodyDb: number;
    contrastDb: number;
    /** Band SNR, dB; null for strokes from phones that did not send it. */
    bandSnrDb: number | null;
    flags: string[];
  }>;
  verdict: SeatVerdict;
}

export interface SeatReport {
  seat: {
    id: string;
    code: string;
    label: string;
    cylinder: number;
    kind: "intake" | "exhaust";
    position: number;
    state: SeatState;
    valveTag: string | null;
  };
  head: { id: string; label: string };
  job: { id: string; number: string; status: JobStatus };
  stages: Record<LappingStage, StageRecord>;
  nextSeatId: string | null;
  canWork: boolean;
  /** Why a supervisor sent this seat back, while it stands sent back; null otherwise. */
  sentBack: { comment: string; by: string; at: string } | null;
}

/** The supervisor's reason for sending a seat back: its latest decision, when that is the one in force. */
export async function sentBackReason(db: Db, seatId: string): Promise<SeatReport["sentBack"]> {
  const [latest] = await db
    .select({ decision: reviews.decision, comment: reviews.comment, by: users.name, at: reviews.createdAt })
    .from(reviews)
    .innerJoin(users, eq(users.id, reviews.reviewerId))
    .where(eq(reviews.seatId, seatId))
    .orderBy(desc(reviews.createdAt))
    .limit(1);
  return latest?.decision === "sent_back" ? { comment: latest.comment ?? "", by: latest.by, at: latest.at.toISOString() } : null;
}

/** Both stages of a seat, with sessions, strokes and verdicts: two queries, whatever the count. */
async function stageRecords(db: Reader, seatId: string): Promise<Record<LappingStage, StageRecord>> {
  const sessionRows = await db
    .select({
      stage: lappingSessions.stage,
      id: lappingSessions.id,
      technicianName: users.name,
      startedAt: lappingSessions.startedAt,
      endedAt: lappingSessions.endedAt,
      recordingKey: lappingSessions.recordingKey,
    })
    .from(lappingSessions)
    .innerJoin(users, eq(users.id, lappingSessions.technicianId))
    .where(eq(lappingSessions.seatId, seatId))
    .orderBy(...SESSION_ORDER);
  const strokeRows = await db
    .select({
      stage: lappingSessions.stage,
      sessionId: strokes.sessionId,
      clientId: strokes.clientId,
      startS: strokes.startS,
      endS: strokes.endS,
      onsetDb: strokes.onsetDb,
      bodyDb: strokes.bodyDb,
      contrastDb: strokes.contrastDb,
      bandSnrDb: strokes.bandSnrDb,
      flags: strokes.flags,
    })
    .from(strokes)
    .innerJoin(lappingSessions, eq(lappingSessions.id, strokes.sessionId))
    .where(eq(lappingSessions.seatId, seatId))
    .orderBy(...STROKE_ORDER);
  const record = (stage: LappingStage): StageRecord => {
    const list = strokeRows
      .filter((s) => s.stage === stage)
      .map((s, i) => ({
        n: i + 1,
        sessionId: s.sessionId,
        clientId: s.clientId,
        startS: s.startS,
        endS: s.endS,
        onsetDb: s.onsetDb,
        bodyDb: s.bodyDb,
        contrastDb: s.contrastDb,
        bandSnrDb: s.bandSnrDb,
        flags: s.flags,
      }));
    return {
      stage,
      sessions: sessionRows
        .filter((s) => s.stage === stage)
        .map((s) => ({
          id: s.id,
          technicianName: s.technicianName,
          startedAt: s.startedAt.toISOString(),
          endedAt: s.endedAt ? s.endedAt.toISOString() : null,
          hasRecording: Boolean(s.recordingKey),
        })),
      strokes: list,
      verdict: judgeStage(list),
    };
  };
  return { coarse: record("coarse"), fine: record("fine") };
}

async function nextSeatInHead(db: Reader, ctx: SeatContext): Promise<string | null> {
  const all = await db
    .select({ id: seats.id, state: seats.state })
    .from(seats)
    .where(eq(seats.headId, ctx.head.id))
    .orderBy(asc(seats.cylinder), asc(seats.kind), asc(seats.position));
  const at = all.findIndex((s) => s.id === ctx.seat.id);
  const after = [...all.slice(at + 1), ...all.slice(0, at)];
  return after.find((s) => s.state !== "settled" && s.state !== "approved")?.id ?? null;
}

export async function getSeatReport(db: Db, actor: Actor, seatId: string): Promise<SeatReport> {
  const [row] = await db
    .select({ seat: seats, head: heads, job: jobs, valveTag: valves.tag })
    .from(seats)
    .innerJoin(heads, eq(heads.id, seats.headId))
    .innerJoin(jobs, eq(jobs.id, heads.jobId))
    .leftJoin(valves, eq(valves.seatId, seats.id))
    .where(and(eq(seats.id, seatId), eq(jobs.shopId, actor.shopId)))
    .limit(1);
  if (!row) throw new NotFoundError("That seat does not exist in your shop.");
  const ctx: SeatContext = { seat: row.seat, head: row.head, job: row.job };
  let canWork = true;
  try {
    assertCanWorkOn(actor, ctx.job);
    assertOpenForWork(ctx);
  } catch {
    canWork = false;
  }
  return {
    seat: {
      id: ctx.seat.id,
      code: seatCode(ctx.seat),
      label: seatLabel(ctx.seat),
      cylinder: ctx.seat.cylinder,
      kind: ctx.seat.kind,
      position: ctx.seat.position,
      state: ctx.seat.state,
      valveTag: row.valveTag ?? null,
    },
    head: { id: ctx.head.id, label: ctx.head.label },
    job: { id: ctx.job.id, number: ctx.job.number, status: ctx.job.status },
    stages: await stageRecords(db, seatId),
    nextSeatId: await nextSeatInHead(db, ctx),
    canWork,
    sentBack: ctx.seat.state === "sent_back" ? await sentBackReason(db, seatId) : null,
  };
}

export interface StartedSession {
  sessionId: string;
  resumed: boolean;
}

/**
 * Opens (or resumes) a lapping session. One phone listens to a seat at a time: while another
 * phone's session on the same seat has been heard from within SEAT_HOLD_SECONDS, a second one
 * is told the seat is busy.
 */
export async function startSession(db: Db, actor: Actor, seatId: string, input: StartSessionInput): Promise<StartedSession> {
  assertCanWorkOn(actor, (await loadSeat(db, actor.shopId, seatId)).job);
  return db.transaction(async (tx) => {
    // Checked again under the lock a sign-off takes: the seat and job as they are now.
    const ctx = await loadSeat(tx, actor.shopId, seatId, true);
    assertCanWorkOn(actor, ctx.job);
    assertOpenForWork(ctx);
    const [existing] = await tx.select().from(lappingSessions).where(eq(lappingSessions.id, input.sessionId)).limit(1);
    if (existing) {
      if (existing.seatId !== seatId || existing.stage !== input.stage) {
        throw new ConflictError("That session belongs to another seat or stage. Start a new session.");
      }
      if (actor.role === "technician" && existing.technicianId !== actor.id) {
        const [starter] = await tx.select({ name: users.name }).from(users).where(eq(users.id, existing.technicianId));
        assertOwnSession(actor, existing, starter?.name ?? "someone else");
      }
      await tx.update(lappingSessions).set({ lastSeenAt: new Date(), deviceId: input.deviceId }).where(eq(lappingSessions.id, existing.id));
      return { sessionId: existing.id, resumed: true };
    }
    const since = new Date(Date.now() - SEAT_HOLD_SECONDS * 1000);
    const [busy] = await tx
      .select({ id: lappingSessions.id, name: users.name })
      .from(lappingSessions)
      .innerJoin(users, eq(users.id, lappingSessions.technicianId))
      .where(
        and(
          eq(lappingSessions.seatId, seatId),
          isNull(lappingSessions.endedAt),
          gt(lappingSessions.lastSeenAt, since),
          ne(lappingSessions.deviceId, input.deviceId),
        ),
      )
      .limit(1);
    if (busy) {
      throw new ConflictError(
        `Seat ${seatCode(ctx.seat)} is busy: ${busy.name}'s phone is listening to it. Stop there first, or wait ${SEAT_HOLD_SECONDS} s after it goes quiet.`,
      );
    }
    await tx.insert(lappingSessions).values({
      id: input.sessionId,
      seatId,
      stage: input.stage,
      technicianId: actor.id,
      deviceId: input.deviceId,
      sampleRateHz: input.sampleRateHz ?? null,
      noiseFloorDb: input.noiseFloorDb ?? null,
    });
    if (ctx.seat.state === "waiting" || ctx.seat.state === "sent_back") {
      await tx.update(seats).set({ state: "lapping", updatedAt: new Date() }).where(eq(seats.id, seatId));
      await recordAudit(tx, {
        actorId: actor.id,
        action: "seat.state_changed",
        entityType: "seat",
        entityId: seatId,
        jobId: ctx.job.id,
        before: { state: ctx.seat.state },
        after: { state: "lapping" },
      });
    }
    await backToBenchForWork(tx, actor, ctx.job, `lapping ${seatCode(ctx.seat)} (${input.stage})`);
    if (ctx.job.status === "queued") {
      await tx.update(jobs).set({ status: "at_bench", updatedAt: new Date() }).where(eq(jobs.id, ctx.job.id));
      await recordAudit(tx, {
        actorId: actor.id,
        action: "job.status_changed",
        entityType: "job",
        entityId: ctx.job.id,
        jobId: ctx.job.id,
        before: { status: "queued" },
        after: { status: "at_bench" },
      });
    }
    await recordAudit(tx, {
      actorId: actor.id,
      action: "session.started",
      entityType: "lapping_session",
      entityId: input.sessionId,
      jobId: ctx.job.id,
      after: { seat: seatCode(ctx.seat), stage: input.stage },
    });
    return { sessionId: input.sessionId, resumed: false };
  });
}

/** The session with its seat and job; `lock` locks the session's row, for a write that replaces its recording. */
async function loadSession(db: Reader, shopId: string, sessionId: string, lock = false) {
  const query = db
    .select({ session: lappingSessions, seat: seats, head: heads, job: jobs, starterName: users.name })
    .from(lappingSessions)
    .innerJoin(users, eq(users.id, lappingSessions.technicianId))
    .innerJoin(seats, eq(seats.id, lappingSessions.seatId))
    .innerJoin(heads, eq(heads.id, seats.headId))
    .innerJoin(jobs, eq(jobs.id, heads.jobId))
    .where(and(eq(lappingSessions.id, sessionId), eq(jobs.shopId, shopId)))
    .limit(1);
  const [row] = lock ? await query.for("no key update", { of: [lappingSessions] }) : await query;
  if (!row) throw new NotFoundError(SESSION_NOT_FOUND);
  return row;
}


export async function endSession(db: Db, actor: Actor, sessionId: string): Promise<void> {
  const ctx = await loadSession(db, actor.shopId, sessionId);
  assertCanWorkOn(actor, ctx.job);
  assertOwnSession(actor, ctx.session, ctx.starterName);
  if (ctx.session.endedAt) return;
  await db.transaction(async (tx) => {
    await tx
      .update(lappingSessions)
      .set({ endedAt: sql`greatest(now(), ${lappingSessions.startedAt})` })
      .where(eq(lappingSessions.id, sessionId));
    await recordAudit(tx, {
      actorId: actor.id,
      action: "session.ended",
      entityType: "lapping_session",
      entityId: sessionId,
      jobId: ctx.job.id,
    });
  });
}

/**
 * A recording kept for a signed-off seat (or a seat of a signed-off job) is part of what the
 * supervisor signed: it is never replaced until the seat is reopened. A session that has no
 * recording yet may still receive its first one — a phone's queue can deliver it late — which adds
 * to the record without changing anything already reviewed.
 */
/**
 * A recording is part of the seat's record: once the seat or the job is signed off, none is added
 * or replaced (nothing on a signed-off head is newer than its sign-off). A first recording that
 * arrives late stays on the phone that made it, refused with this reason, until a supervisor
 * reopens the seat.
 */
function assertRecordingReplaceable(ctx: Awaited<ReturnType<typeof loadSession>>): void {
  if (ctx.seat.state === "approved" || isClosed(ctx.job.status)) {
    throw new ConflictError(
      ctx.session.recordingKey
        ? `Seat ${seatCode(ctx.seat)} is signed off and this session's recording is part of its record. A supervisor must reopen the seat before it is replaced.`
        : `Seat ${seatCode(ctx.seat)} was signed off before this recording arrived, so it is not added to the record. It stays on the phone that made it; a supervisor can reopen the seat to take it.`,
    );
  }
}

export async function attachRecording(
  db: Db,
  actor: Actor,
  sessionId: string,
  recording: { key: string; type: string; bytes: number },
): Promise<string | null> {
  const early = await loadSession(db, actor.shopId, sessionId);
  assertCanWorkOn(actor, early.job);
  return db.transaction(async (tx) => {
    // Checked again with the job held against sign-off (lib/jobs/hold.ts): the session, seat and
    // job as they are now.
    await holdJob(tx, early.job.id);
    const ctx = await loadSession(tx, actor.shopId, sessionId, true);
    assertCanWorkOn(actor, ctx.job);
    assertOwnSession(actor, ctx.session, ctx.starterName);
    assertRecordingReplaceable(ctx);
    await tx
      .update(lappingSessions)
      .set({ recordingKey: recording.key, recordingType: recording.type, recordingBytes: recording.bytes })
      .where(eq(lappingSessions.id, sessionId));
    return ctx.session.recordingKey;
  });
}

export async function getSessionForUpload(db: Db, actor: Actor, sessionId: string) {
  const ctx = await loadSession(db, actor.shopId, sessionId);
  assertCanWorkOn(actor, ctx.job);
  assertOwnSession(actor, ctx.session, ctx.starterName);
  assertRecordingReplaceable(ctx);
  return ctx;
}
