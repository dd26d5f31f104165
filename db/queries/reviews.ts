// A job's review history: every approval, send-back and reopening, newest first, with who
// decided and on which seat (null for the head as a whole).
import { and, desc, eq } from "drizzle-orm";
import type { Db } from "@/db/client";
import { jobs, reviews, seats, users } from "@/db/schema";
import { seatCode } from "@/lib/heads/layout";

export interface ReviewRow {
  id: string;
  jobId: string;
  seatId: string | null;
  seatCode: string | null;
  decision: "approved" | "sent_back" | "reopened";
  comment: string;
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
    reviewerId: review.reviewerId,
    reviewerName,
    createdAt: review.createdAt.toISOString(),
  }));
}
