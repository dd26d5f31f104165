// The lock every write on a head takes before it checks that the head is still open. Sign-off and
// reopening lock the job row for update (lib/review/service.ts: a seat decision locks its seat and
// the job, a head decision the job); a write holds the same row for share inside its own
// transaction, so the two run one after the other and a write never lands after a sign-off it did
// not see. Writes hold it for share, not for update, so that they do not wait for one another.
import { eq } from "drizzle-orm";
import type { Db } from "@/db/client";
import { jobs, seats, type Job, type Seat } from "@/db/schema";
import { ConflictError, NotFoundError } from "@/lib/errors";
import { seatCode } from "@/lib/heads/layout";
import { isClosed } from "./lifecycle";

/** A transaction (or anything else that can select). */
type Reader = Pick<Db, "select">;

/** Holds the job against sign-off and reopening until the transaction ends; its row as it is now. */
export async function holdJob(tx: Reader, jobId: string): Promise<Job> {
  const [job] = await tx.select().from(jobs).where(eq(jobs.id, jobId)).limit(1).for("share");
  if (!job) throw new NotFoundError("That job does not exist in your shop.");
  return job;
}

/** holdJob, refusing a signed-off or collected job with `closedMessage`. */
export async function holdOpenJob(tx: Reader, jobId: string, closedMessage: (job: Job) => string): Promise<Job> {
  const job = await holdJob(tx, jobId);
  if (isClosed(job.status)) throw new ConflictError(closedMessage(job));
  return job;
}

/** The words a write on a signed-off head is refused with, unless it has its own. */
export const signedOffSheets = (job: Pick<Job, "number">) =>
  `Job ${job.number} is signed off: its sheets are read-only until a supervisor reopens it.`;

export const signedOffSeats = (job: Pick<Job, "number">) => `Job ${job.number} is signed off; its seats are read-only.`;

/** An approved seat is read-only, like a signed-off head, until a supervisor reopens it. */
export function assertSeatOpen(seat: Pick<Seat, "state" | "cylinder" | "kind" | "position">, message?: string): void {
  if (seat.state === "approved") {
    throw new ConflictError(message ?? `Seat ${seatCode(seat)} is approved: it is read-only until a supervisor reopens it.`);
  }
}

/**
 * The seats as they are now, read after holdOpenJob: a seat decision needs the job's row for
 * update, so none can change while the hold lasts. Each one is refused when approved.
 */
export async function openSeatsNow(tx: Reader, seatIds: readonly string[], message?: string): Promise<Map<string, Seat>> {
  const out = new Map<string, Seat>();
  for (const id of new Set(seatIds)) {
    const [seat] = await tx.select().from(seats).where(eq(seats.id, id)).limit(1);
    if (!seat) throw new NotFoundError("That seat does not exist in your shop.");
    assertSeatOpen(seat, message);
    out.set(id, seat);
  }
  return out;
}
