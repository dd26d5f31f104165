// A job's review history: every approval, send-back and reopening, newest first, with who
// decided and on which seat (null for the head as a whole).
import { and, asc, desc, eq, ne } from "drizzle-orm";
import type { Db } from "@/db/client";
import { heads, jobs, reviews, seats, users } from "@/db/schema";
import { seatCode } from "@/lib/heads/layout";

export interface ReviewRow {
  id: string;
  jobId: string;
  seatId: string | null;
  seatCode: string | null;
  decision: "approved" | "sent_back" | "reopened";
  /** Null when a seat was approved without a comment. */
  comment: string | null;
  /** Why the seat was approved without all its done-checks passed; null otherwise. */
  checksReason: string | null;
  /** A head signed off with its record incomplete: what was incomplete and why it was signed off anyway. */
  incompleteItems: string[] | null;
  incompleteReason: string | null;
  reviewerId: string;
  reviewerName: string;
  createdAt: string;
}

export async function getReviews(db: Db, shopId: string, jobId: string): Promise<ReviewRow[]> {
  const rows = await db
    .select({ review: reviews, reviewerName: users.name, seat: seats })
    .from(reviews)
    .innerJoin(jobs, eq(jobs.id, reviews.jobId))
    .innerJoin(users, eq(users.id, reviews.reviewerId))
    .leftJoin(seats, eq(seats.id, reviews.seatId))
    .where(and(eq(reviews.jobId, jobId), eq(jobs.shopId, shopId)))
    .orderBy(desc(reviews.createdAt), desc(reviews.id));
  return rows.map(({ review, reviewerName, seat }) => ({
    id: review.id,
    jobId: review.jobId,
    seatId: review.seatId,
    seatCode: seat ? seatCode(seat) : null,
    decision: review.decision,
    comment: review.comment,
    checksReason: review.checksReason,
    incompleteItems: review.incompleteItems,
    incompleteReason: review.incompleteReason,
    reviewerId: review.reviewerId,
    reviewerName,
    createdAt: review.createdAt.toISOString(),
  }));
}

/** The codes of a job's seats not approved yet, in head order; empty when the head can be signed off. */
export async function getUnapprovedSeatCodes(db: Db, shopId: string, jobId: string): Promise<string[]> {
  const rows = await db
    .select({ seat: seats })
    .from(seats)
    .innerJoin(heads, eq(heads.id, seats.headId))
    .innerJoin(jobs, eq(jobs.id, heads.jobId))
    .where(and(eq(jobs.id, jobId), eq(jobs.shopId, shopId), ne(seats.state, "approved")))
    .orderBy(asc(seats.cylinder), asc(seats.kind), asc(seats.position));
  return rows.map((r) => seatCode(r.seat));
}
