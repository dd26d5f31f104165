// Sign-off on the server: a supervisor approves or sends back each seat and then the head as a
// whole, and reopens either with a reason. Every decision writes a reviews row and its audit
// entry in the same transaction as the state change, so none of the three lands alone.
import { and, asc, eq } from "drizzle-orm";
import type { Db } from "@/db/client";
import { heads, jobs, reviews, seats, type JobStatus, type SeatState } from "@/db/schema";
import type { Actor } from "@/lib/auth/guard";
import { recordAudit } from "@/lib/audit";
import { BadRequestError, ConflictError, ForbiddenError, NotFoundError } from "@/lib/errors";
import { queueHeadReportMail, type HeadReportMail } from "@/lib/mail/head-report-mail";
import { revokeLiveLinks } from "@/lib/report/customer-links";
import { headCompleteness } from "./completeness";
import { seatCode } from "@/lib/heads/layout";
import { isClosed } from "@/lib/jobs/lifecycle";
import { doneChecksOf, shortfallText } from "@/lib/bench/done-checks";

export type ReviewVerdict = "approved" | "sent_back";

/** Seats a supervisor may send back: work that is finished, flattened, or still under way. */
const SEND_BACK_FROM: readonly SeatState[] = ["settled", "stalled", "lapping"];

const STATE_WORDS: Record<SeatState, string> = {
  waiting: "waiting",
  lapping: "still lapping",
  settled: "settled",
  stalled: "stalled",
  approved: "approved",
  sent_back: "sent back",
};

const STATUS_WORDS: Record<JobStatus, string> = {
  queued: "queued",
  at_bench: "at the bench",
  awaiting_audit: "awaiting audit",
  signed_off: "signed off",
  collected: "collected",
};

/**
 * Sign-off belongs to supervisors alone. The role table also gives admins "jobs:audit" so they
 * can read the trail, but admins manage people; they do not judge lapping work.
 */
export function assertSupervisor(actor: Actor): void {
  if (actor.role !== "supervisor") {
    throw new ForbiddenError(
      actor.role === "admin"
        ? "Only a supervisor can sign off, send back or reopen work; admins manage people and can read the audit trail."
        : "Only a supervisor can sign off, send back or reopen work. Ask a supervisor to audit this seat.",
    );
  }
}

/** The text a decision is recorded with; the database also refuses empty or over-long text. */
function requiredText(value: string, field: "comment" | "reason" | "checksReason" | "incompleteReason", min: number): string {
  const text = value.trim();
  if (text.length < min || text.length > 2000) {
    throw new BadRequestError(
      field === "comment" ? `Write a comment of ${min} to 2000 characters.` : `Give a reason of ${min} to 2000 characters.`,
      { [field]: [`Between ${min} and 2000 characters.`] },
    );
  }
  return text;
}

type Tx = Parameters<Parameters<Db["transaction"]>[0]>[0];

/**
 * Locks the seat with its job, so a seat decision and a head decision on the same job run one
 * after the other: the head is never signed off while a seat is changing under it. Every write on
 * the head holds the job's row for share while it checks and writes (lib/jobs/hold.ts), so a
 * decision waits for the writes under way and the writes after it see it. "No key update" rather
 * than "update": a write's foreign keys (an audit entry's job, a photo's seat) take key-share
 * locks, which must not wait for a decision holding the row, or the two would wait for each other.
 */
async function lockSeat(tx: Tx, shopId: string, seatId: string) {
  const [row] = await tx
    .select({ seat: seats, job: jobs })
    .from(seats)
    .innerJoin(heads, eq(heads.id, seats.headId))
    .innerJoin(jobs, eq(jobs.id, heads.jobId))
    .where(and(eq(seats.id, seatId), eq(jobs.shopId, shopId)))
    .limit(1)
    .for("no key update", { of: [seats, jobs] });
  if (!row) throw new NotFoundError("That seat does not exist in your shop.");
  return row;
}

async function lockJob(tx: Tx, shopId: string, jobId: string) {
  const [job] = await tx
    .select()
    .from(jobs)
    .where(and(eq(jobs.id, jobId), eq(jobs.shopId, shopId)))
    .limit(1)
    .for("no key update");
  if (!job) throw new NotFoundError("That job does not exist in your shop.");
  return job;
}

export interface SeatReviewResult {
  seatId: string;
  code: string;
  state: SeatState;
}

/**
 * A comment is needed to send a seat back (the technician must know what to redo); approving may
 * go without one, and is then stored as null rather than a made-up text.
 */
function seatComment(value: string | null | undefined, decision: ReviewVerdict): string | null {
  if (decision === "approved" && !value?.trim()) return null;
  if (!value?.trim()) {
    const message = "Write what to redo: a seat is sent back with a comment.";
    throw new BadRequestError(message, { comment: [message] });
  }
  return requiredText(value, "comment", 3);
}

export async function reviewSeat(
  db: Db,
  actor: Actor,
  input: {
    seatId: string;
    decision: ReviewVerdict;
    comment?: string | null;
    checksReason?: string | null;
    /** The seat's state as the supervisor saw it; a different state now answers a conflict. */
    expectedState?: SeatState | null;
  },
): Promise<SeatReviewResult> {
  assertSupervisor(actor);
  const comment = seatComment(input.comment, input.decision);
  const givenReason = input.checksReason?.trim() ? requiredText(input.checksReason, "checksReason", 3) : null;
  return db.transaction(async (tx) => {
    const { seat, job } = await lockSeat(tx, actor.shopId, input.seatId);
    const code = seatCode(seat);
    if (isClosed(job.status)) {
      throw new ConflictError(`Job ${job.number} is ${STATUS_WORDS[job.status]}; reopen the head before changing a seat's review.`);
    }
    if (input.expectedState && input.expectedState !== seat.state) {
      throw new ConflictError(
        `Seat ${code} changed while you were looking at it: it was ${STATE_WORDS[input.expectedState]} and is ${STATE_WORDS[seat.state]} now. Look at it again before deciding.`,
      );
    }
    if (input.decision === "approved" && seat.state !== "settled") {
      // Only the server's settled verdict is approved: a stalled seat needs more lapping or a send-back.
      throw new ConflictError(`Seat ${code} is ${STATE_WORDS[seat.state]}; only a settled seat can be approved.`);
    }
    if (input.decision === "sent_back" && !SEND_BACK_FROM.includes(seat.state)) {
      throw new ConflictError(
        seat.state === "approved"
          ? `Seat ${code} is approved; reopen it with a reason instead.`
          : `Seat ${code} is ${STATE_WORDS[seat.state]}; there is no lapping to send back yet.`,
      );
    }
    // An approval without every done-check passed (contact ring, marking compound, leak test)
    // is the supervisor's call, and the reason for it goes on record.
    let checksReason: string | null = null;
    let shortfall: string | null = null;
    if (input.decision === "approved") {
      const checks = (await doneChecksOf(tx, job.id, [seat])).get(seat.id)!;
      if (!checks.complete) {
        shortfall = shortfallText(checks);
        if (!givenReason) {
          const message = `Seat ${code}'s done-checks are not all passed (${shortfall}). Give a reason for approving it without them, or send it back.`;
          throw new BadRequestError(message, { checksReason: [message] });
        }
        checksReason = givenReason;
      }
    }
    const next: SeatState = input.decision;
    await tx.update(seats).set({ state: next, updatedAt: new Date() }).where(eq(seats.id, seat.id));
    await tx.insert(reviews).values({ jobId: job.id, seatId: seat.id, decision: input.decision, comment, checksReason, reviewerId: actor.id });
    await recordAudit(tx, {
      actorId: actor.id,
      action: input.decision === "approved" ? "seat.approved" : "seat.sent_back",
      entityType: "seat",
      entityId: seat.id,
      jobId: job.id,
      before: { seat: code, state: seat.state },
      after: { seat: code, state: next, comment, ...(checksReason ? { checksReason, checksShortfall: shortfall } : {}) },
    });
    return { seatId: seat.id, code, state: next };
  });
}

export interface ApproveSettledResult {
  jobId: string;
  number: string;
  /** Codes of the seats approved, in head order. */
  approved: string[];
  /** Seats left as they were, with why in words. */
  skipped: Array<{ seatId: string; code: string; why: string }>;
}

/**
 * "Approve every settled seat": approves, in one transaction, the settled seats the supervisor
 * was shown (seatIds), each with its own reviews row and audit entry, all with the one optional
 * comment. A seat whose done-checks are not all passed is approved only when a checks reason is
 * given (it goes on each such seat's record); without one it is skipped and listed. A shown seat
 * that is no longer settled (approved, sent back or reopened meanwhile) refuses the whole batch,
 * so nothing is approved on a picture of the head that is out of date.
 */
export async function approveSettledSeats(
  db: Db,
  actor: Actor,
  input: { jobId: string; seatIds: readonly string[]; comment?: string | null; checksReason?: string | null },
): Promise<ApproveSettledResult> {
  assertSupervisor(actor);
  const comment = seatComment(input.comment, "approved");
  const givenReason = input.checksReason?.trim() ? requiredText(input.checksReason, "checksReason", 3) : null;
  const wanted = [...new Set(input.seatIds)];
  if (wanted.length === 0) throw new BadRequestError("There is no settled seat to approve on this head.", { seatIds: ["No seat chosen."] });
  return db.transaction(async (tx) => {
    // The job and all its seats locked together, as a single seat's decision locks them.
    const rows = await tx
      .select({ seat: seats, job: jobs })
      .from(seats)
      .innerJoin(heads, eq(heads.id, seats.headId))
      .innerJoin(jobs, eq(jobs.id, heads.jobId))
      .where(and(eq(jobs.id, input.jobId), eq(jobs.shopId, actor.shopId)))
      .orderBy(asc(heads.id), asc(seats.cylinder), asc(seats.kind), asc(seats.position))
      .for("no key update", { of: [seats, jobs] });
    const job = rows[0]?.job ?? (await lockJob(tx, actor.shopId, input.jobId));
    if (isClosed(job.status)) {
      throw new ConflictError(`Job ${job.number} is ${STATUS_WORDS[job.status]}; reopen the head before approving seats.`);
    }
    const shown = rows.map((r) => r.seat).filter((s) => wanted.includes(s.id));
    if (shown.length !== wanted.length) throw new NotFoundError(`Some of those seats are not on job ${job.number}.`);
    const changed = shown.filter((s) => s.state !== "settled");
    if (changed.length > 0) {
      const list = changed.map((s) => `${seatCode(s)} (now ${STATE_WORDS[s.state]})`).join(", ");
      throw new ConflictError(
        `${changed.length === 1 ? "Seat" : "Seats"} ${list} changed since the page was loaded; nothing was approved. Look at the head again.`,
      );
    }
    const checks = await doneChecksOf(tx, job.id, shown);
    const approved: string[] = [];
    const skipped: ApproveSettledResult["skipped"] = [];
    for (const seat of shown) {
      const code = seatCode(seat);
      const c = checks.get(seat.id)!;
      const shortfall = c.complete ? null : shortfallText(c);
      if (shortfall && !givenReason) {
        skipped.push({ seatId: seat.id, code, why: `done-checks not all passed (${shortfall}); approving it needs a reason` });
        continue;
      }
      const checksReason = shortfall ? givenReason : null;
      await tx.update(seats).set({ state: "approved", updatedAt: new Date() }).where(eq(seats.id, seat.id));
      await tx.insert(reviews).values({ jobId: job.id, seatId: seat.id, decision: "approved", comment, checksReason, reviewerId: actor.id });
      await recordAudit(tx, {
        actorId: actor.id,
        action: "seat.approved",
        entityType: "seat",
        entityId: seat.id,
        jobId: job.id,
        before: { seat: code, state: seat.state },
        after: { seat: code, state: "approved", comment, ...(checksReason ? { checksReason, checksShortfall: shortfall } : {}) },
      });
      approved.push(code);
    }
    return { jobId: job.id, number: job.number, approved, skipped };
  });
}

/**
 * The seat to look at after this one: the next seat of the same head, in head order (cylinder,
 * intake before exhaust, position), that still awaits a decision (settled or stalled), wrapping
 * round to the first; null when no other seat of the head awaits one.
 */
export async function nextSeatToReview(
  db: Db,
  shopId: string,
  seatId: string,
): Promise<{ seatId: string; code: string; state: SeatState } | null> {
  const [current] = await db
    .select({ headId: seats.headId })
    .from(seats)
    .innerJoin(heads, eq(heads.id, seats.headId))
    .innerJoin(jobs, eq(jobs.id, heads.jobId))
    .where(and(eq(seats.id, seatId), eq(jobs.shopId, shopId)))
    .limit(1);
  if (!current) return null;
  const all = await db
    .select()
    .from(seats)
    .where(eq(seats.headId, current.headId))
    .orderBy(asc(seats.cylinder), asc(seats.kind), asc(seats.position));
  const at = all.findIndex((s) => s.id === seatId);
  const after = [...all.slice(at + 1), ...all.slice(0, at)];
  const next = after.find((s) => s.state === "settled" || s.state === "stalled");
  return next ? { seatId: next.id, code: seatCode(next), state: next.state } : null;
}

export async function reopenSeat(db: Db, actor: Actor, input: { seatId: string; reason: string }): Promise<SeatReviewResult> {
  assertSupervisor(actor);
  const reason = requiredText(input.reason, "reason", 3);
  return db.transaction(async (tx) => {
    const { seat, job } = await lockSeat(tx, actor.shopId, input.seatId);
    const code = seatCode(seat);
    if (seat.state !== "approved") {
      throw new ConflictError(`Seat ${code} is ${STATE_WORDS[seat.state]}, not approved; there is nothing to reopen.`);
    }
    if (isClosed(job.status)) {
      throw new ConflictError(`Job ${job.number} is ${STATUS_WORDS[job.status]}; reopen the head first, then the seat.`);
    }
    // Back to settled: the strokes that earned the verdict stand until new ones are lapped.
    const next: SeatState = "settled";
    await tx.update(seats).set({ state: next, updatedAt: new Date() }).where(eq(seats.id, seat.id));
    await tx.insert(reviews).values({ jobId: job.id, seatId: seat.id, decision: "reopened", comment: reason, reviewerId: actor.id });
    await recordAudit(tx, {
      actorId: actor.id,
      action: "seat.reopened",
      entityType: "seat",
      entityId: seat.id,
      jobId: job.id,
      before: { seat: code, state: seat.state },
      after: { seat: code, state: next, reason },
    });
    return { seatId: seat.id, code, state: next };
  });
}

export interface HeadReviewResult {
  jobId: string;
  number: string;
  status: JobStatus;
  /** After a sign-off: the customer's link and where the report went. */
  report?: HeadReportMail;
}

export async function reviewHead(
  db: Db,
  actor: Actor,
  input: { jobId: string; decision: ReviewVerdict; comment: string; incompleteReason?: string | null },
): Promise<HeadReviewResult> {
  assertSupervisor(actor);
  const comment = requiredText(input.comment, "comment", 3);
  const givenReason = input.incompleteReason?.trim() ? requiredText(input.incompleteReason, "incompleteReason", 3) : null;
  return db.transaction(async (tx) => {
    const job = await lockJob(tx, actor.shopId, input.jobId);
    if (job.status !== "awaiting_audit") {
      throw new ConflictError(
        `Job ${job.number} is ${STATUS_WORDS[job.status]}; a head is ${input.decision === "approved" ? "signed off" : "sent back"} only while it is awaiting audit.`,
      );
    }
    // What the record lacks, read under the job's lock: the panel showed the same list.
    let incompleteItems: string[] | null = null;
    let incompleteReason: string | null = null;
    if (input.decision === "approved") {
      const all = await tx
        .select({ id: seats.id })
        .from(seats)
        .innerJoin(heads, eq(heads.id, seats.headId))
        .where(eq(heads.jobId, job.id))
        .limit(1);
      if (all.length === 0) throw new ConflictError(`Job ${job.number} has no seats to sign off.`);
      const record = await headCompleteness(tx as unknown as Db, actor.shopId, job.id);
      const codes = record.unapprovedSeatCodes;
      if (codes.length > 0) {
        throw new ConflictError(
          `Job ${job.number} cannot be signed off: ${codes.length === 1 ? "seat" : "seats"} ${codes.join(", ")} ${codes.length === 1 ? "is" : "are"} not approved yet.`,
        );
      }
      if (record.needsReason) {
        if (!givenReason) {
          const message = `Job ${job.number}'s record is incomplete (${record.gaps.map((g) => g.text).join(" ")}) Give a reason for signing it off anyway, or send it back.`;
          throw new BadRequestError(message, { incompleteReason: [message] });
        }
        incompleteItems = record.gaps.map((g) => g.text);
        incompleteReason = givenReason;
      }
    }
    const next: JobStatus = input.decision === "approved" ? "signed_off" : "at_bench";
    await tx.update(jobs).set({ status: next, updatedAt: new Date() }).where(eq(jobs.id, job.id));
    await tx.insert(reviews).values({ jobId: job.id, seatId: null, decision: input.decision, comment, incompleteItems, incompleteReason, reviewerId: actor.id });
    await recordAudit(tx, {
      actorId: actor.id,
      action: input.decision === "approved" ? "job.signed_off" : "job.sent_back",
      entityType: "job",
      entityId: job.id,
      jobId: job.id,
      before: { status: job.status },
      after: { status: next, comment, ...(incompleteReason ? { incompleteItems, incompleteReason } : {}) },
    });
    // The customer's link and record go out with the sign-off, or not at all.
    const report = input.decision === "approved" ? await queueHeadReportMail(tx, job.id, actor.id, comment) : undefined;
    return { jobId: job.id, number: job.number, status: next, report };
  });
}

export async function reopenHead(db: Db, actor: Actor, input: { jobId: string; reason: string }): Promise<HeadReviewResult> {
  assertSupervisor(actor);
  const reason = requiredText(input.reason, "reason", 3);
  return db.transaction(async (tx) => {
    const job = await lockJob(tx, actor.shopId, input.jobId);
    if (job.status !== "signed_off") {
      throw new ConflictError(`Job ${job.number} is ${STATUS_WORDS[job.status]}; only a signed-off head can be reopened.`);
    }
    // The seats stay approved: the supervisor reopens the ones that need more work, one by one.
    const next: JobStatus = "at_bench";
    await tx.update(jobs).set({ status: next, updatedAt: new Date() }).where(eq(jobs.id, job.id));
    await tx.insert(reviews).values({ jobId: job.id, seatId: null, decision: "reopened", comment: reason, reviewerId: actor.id });
    // The report the customer was sent no longer stands: its links stop opening.
    await revokeLiveLinks(tx, job.id, actor.id, "head reopened");
    await recordAudit(tx, {
      actorId: actor.id,
      action: "job.reopened",
      entityType: "job",
      entityId: job.id,
      jobId: job.id,
      before: { status: job.status },
      after: { status: next, reason },
    });
    return { jobId: job.id, number: job.number, status: next };
  });
}
