// Handing a head in for audit, and taking it back. A hand-in names what is unfinished (seats not
// settled in fine compound, sheets not complete) and goes through only when the technician
// confirms it; the technician may take the head back until the supervisor starts the audit; new
// work on a head awaiting audit puts it back at the bench. Each move lands with its audit entry.
import { and, asc, desc, eq, gte, inArray, sql } from "drizzle-orm";
import type { Db } from "@/db/client";
import { auditEntries, camshafts, heads, jobs, journals, measurements, reviews, seats, torqueSheets, torqueTicks, type Job } from "@/db/schema";
import type { Actor } from "@/lib/auth/guard";
import { assertCanWorkOn } from "@/lib/auth/job-access";
import { recordAudit } from "@/lib/audit";
import { BadRequestError, ConflictError, NotFoundError } from "@/lib/errors";
import { seatCode } from "@/lib/heads/layout";
import { canMove } from "@/lib/jobs/lifecycle";
import { stagesFor } from "@/lib/measure/torque";

type Reader = Pick<Db, "select">;
type Writer = Pick<Db, "select" | "insert" | "update">;

export interface Unfinished {
  /** Seat codes not yet settled (or approved) in fine compound, in seat order. */
  seats: string[];
  /** One line per sheet not complete: "Intake camshaft torque: 12 of 30 ticks". */
  sheets: string[];
}

export const isFinished = (u: Unfinished): boolean => u.seats.length === 0 && u.sheets.length === 0;

/** What is left to do on a job's head before an audit would find it complete. */
export async function unfinishedWork(db: Reader, jobId: string): Promise<Unfinished> {
  const [head] = await db.select().from(heads).where(eq(heads.jobId, jobId)).limit(1);
  if (!head) return { seats: [], sheets: [] };
  const ss = await db.select().from(seats).where(eq(seats.headId, head.id)).orderBy(asc(seats.cylinder), asc(seats.kind), asc(seats.position));
  const open = ss.filter((s) => s.state !== "settled" && s.state !== "approved").map((s) => seatCode(s));
  const cams = await db.select().from(camshafts).where(eq(camshafts.headId, head.id)).orderBy(asc(camshafts.position));
  const sheets: string[] = [];
  if (cams.length) {
    const js = await db.select({ id: journals.id, camshaftId: journals.camshaftId }).from(journals).where(inArray(journals.camshaftId, cams.map((c) => c.id)));
    const read = new Set(
      (
        await db
          .select({ journalId: measurements.journalId })
          .from(measurements)
          // A strip read off its scale is no clearance: that journal is still to be measured.
          .where(and(eq(measurements.headId, head.id), eq(measurements.kind, "journal_clearance"), eq(measurements.offScale, false)))
      ).map((m) => m.journalId),
    );
    const torque = await db.select().from(torqueSheets).where(eq(torqueSheets.headId, head.id));
    const ticks = torque.length
      ? await db
          .select({ sheetId: torqueTicks.sheetId, n: sql<number>`count(*)::int` })
          .from(torqueTicks)
          .where(inArray(torqueTicks.sheetId, torque.map((t) => t.id)))
          .groupBy(torqueTicks.sheetId)
      : [];
    for (const c of cams) {
      const mine = js.filter((j) => j.camshaftId === c.id);
      const missing = mine.filter((j) => !read.has(j.id)).length;
      if (missing) sheets.push(`${c.label} clearance: ${mine.length - missing} of ${mine.length} journals measured`);
      const sheet = torque.find((t) => t.camshaftId === c.id);
      if (!sheet) {
        sheets.push(`${c.label} cap torque: not set up`);
        continue;
      }
      const total = sheet.boltOrder.length * stagesFor(sheet.finalNm, sheet.stageFractions).length;
      const done = ticks.find((t) => t.sheetId === sheet.id)?.n ?? 0;
      if (done < total) sheets.push(`${c.label} cap torque: ${done} of ${total} ticks`);
    }
  }
  return { seats: open, sheets };
}

/** The sentence a hand-in with unfinished work answers with, naming every part of it. */
export function unfinishedMessage(u: Unfinished): string {
  const parts: string[] = [];
  if (u.seats.length) parts.push(`${u.seats.length === 1 ? "seat" : "seats"} not settled in fine: ${u.seats.join(", ")}`);
  if (u.sheets.length) parts.push(`sheets not complete: ${u.sheets.join("; ")}`);
  return `Unfinished — ${parts.join("; ")}. Confirm to hand it in as it is, or finish first.`;
}

async function lockJob(tx: Writer, actor: Actor, jobId: string): Promise<Job> {
  const [job] = await tx.select().from(jobs).where(and(eq(jobs.id, jobId), eq(jobs.shopId, actor.shopId))).for("update");
  if (!job) throw new NotFoundError("That job does not exist in your shop.");
  if (actor.role === "technician") assertCanWorkOn(actor, job);
  return job;
}

/**
 * Hands a head in for audit. With unfinished work it goes through only when `confirmUnfinished`
 * is set; the audit entry keeps what was unfinished when it was handed in.
 */
export async function handIn(db: Db, actor: Actor, input: { jobId: string; confirmUnfinished: boolean }): Promise<Unfinished> {
  return db.transaction(async (tx) => {
    const job = await lockJob(tx, actor, input.jobId);
    if (!canMove(job.status, "awaiting_audit", actor.role)) {
      throw new ConflictError(`A ${actor.role} cannot hand in job ${job.number} while it is ${job.status.replace("_", " ")}.`);
    }
    const unfinished = await unfinishedWork(tx, job.id);
    if (!isFinished(unfinished) && !input.confirmUnfinished) {
      const message = unfinishedMessage(unfinished);
      throw new BadRequestError(message, { confirmUnfinished: [message] });
    }
    await tx.update(jobs).set({ status: "awaiting_audit", updatedAt: new Date() }).where(eq(jobs.id, job.id));
    await recordAudit(tx, {
      actorId: actor.id,
      action: "job.status_changed",
      entityType: "job",
      entityId: job.id,
      jobId: job.id,
      before: { status: job.status },
      after: { status: "awaiting_audit", unfinished: isFinished(unfinished) ? null : unfinished },
    });
    return unfinished;
  });
}

/**
 * When the supervisor started the audit of a head handed in: the first seat decision after the
 * latest hand-in, or null while nobody has judged anything since.
 */
export async function auditStartedAt(db: Reader, jobId: string): Promise<Date | null> {
  const [handedIn] = await db
    .select({ at: auditEntries.at })
    .from(auditEntries)
    .where(and(eq(auditEntries.jobId, jobId), eq(auditEntries.entityType, "job"), sql`${auditEntries.after}->>'status' = 'awaiting_audit'`))
    .orderBy(desc(auditEntries.at))
    .limit(1);
  if (!handedIn) return null;
  const [first] = await db
    .select({ at: reviews.createdAt })
    .from(reviews)
    .where(and(eq(reviews.jobId, jobId), gte(reviews.createdAt, handedIn.at)))
    .orderBy(asc(reviews.createdAt))
    .limit(1);
  return first?.at ?? null;
}

/** Takes a head back to the bench before the supervisor has started its audit. */
export async function takeBack(db: Db, actor: Actor, input: { jobId: string }): Promise<void> {
  await db.transaction(async (tx) => {
    const job = await lockJob(tx, actor, input.jobId);
    if (job.status !== "awaiting_audit") {
      throw new ConflictError(`Job ${job.number} is not awaiting audit; there is nothing to take back.`);
    }
    if (await auditStartedAt(tx, job.id)) {
      throw new ConflictError(`The supervisor has started the audit of ${job.number}: ask them to send it back instead.`);
    }
    await toBench(tx, actor, job.id, "job.taken_back", {});
  });
}

/** Puts a head awaiting audit back at the bench with its audit entry; false when it was no longer awaiting audit. */
async function toBench(tx: Writer, actor: Actor, jobId: string, action: string, after: Record<string, string>): Promise<boolean> {
  const moved = await tx
    .update(jobs)
    .set({ status: "at_bench", updatedAt: new Date() })
    .where(and(eq(jobs.id, jobId), eq(jobs.status, "awaiting_audit")))
    .returning({ id: jobs.id });
  if (!moved.length) return false;
  await recordAudit(tx, {
    actorId: actor.id,
    action,
    entityType: "job",
    entityId: jobId,
    jobId,
    before: { status: "awaiting_audit" },
    after: { status: "at_bench", ...after },
  });
  return true;
}

/**
 * New work (a lapping session, a measurement, a torque set-up or tick) on a head awaiting audit
 * puts it back at the bench: the supervisor would otherwise audit a head that is still changing.
 * Called inside the transaction of that work, so the move and the work land together.
 */
export async function backToBenchForWork(tx: Writer, actor: Actor, job: Pick<Job, "id" | "status">, work: string): Promise<void> {
  // A supervisor checking a figure during the audit is auditing, not taking the head back.
  if (job.status !== "awaiting_audit" || actor.role !== "technician") return;
  await toBench(tx, actor, job.id, "job.back_to_bench", { work });
}
