"use client";

import { useActionState } from "react";
import type { ReviewRow } from "@/db/queries/reviews";
import type { JobStatus } from "@/db/schema";
import { submitHeadReopen, submitHeadReview } from "@/lib/actions/review";
import { initialActionState } from "@/lib/actions/state";
import { ReopenForm } from "./reopen-form";
import { ReviewHistory } from "./review-history";

export interface HeadReviewPanelProps {
  jobId: string;
  jobNumber: string;
  status: JobStatus;
  /** Codes of the seats not approved yet ("2I1"); the head is signed off only when this is empty. */
  unapprovedSeatCodes: string[];
  /** Reviews of the head as a whole (seatId null), newest first. */
  reviews: ReviewRow[];
  /** Whether the signed-in person is a supervisor; others see the history only. */
  canReview: boolean;
}

/** Sign off or send back the head as a whole with a comment, or reopen a signed-off head with a reason. */
export function HeadReviewPanel({ jobId, jobNumber, status, unapprovedSeatCodes, reviews, canReview }: HeadReviewPanelProps) {
  const [reviewState, reviewAction, reviewing] = useActionState(submitHeadReview, initialActionState);
  const ready = unapprovedSeatCodes.length === 0;

  return (
    <section aria-labelledby="head-review" className="flex flex-col gap-3 rounded-xl border border-stone-300 bg-white p-4" data-testid="head-review-panel">
      <h2 id="head-review" className="text-lg font-semibold">
        Sign-off for {jobNumber}
      </h2>

      {canReview && status === "awaiting_audit" ? (
        <form action={reviewAction} className="flex flex-col gap-2">
          <input type="hidden" name="jobId" value={jobId} />
          {!ready ? (
            <p className="text-sm text-amber-900">
              Not approved yet: {unapprovedSeatCodes.join(", ")}. Approve every seat before signing off the head.
            </p>
          ) : null}
          <label className="flex flex-col gap-1 text-sm font-semibold">
            Comment
            <textarea
              name="comment"
              required
              minLength={3}
              maxLength={2000}
              rows={3}
              aria-invalid={Boolean(reviewState.fieldErrors.comment)}
              className="rounded-lg border border-stone-400 p-2 font-normal"
            />
          </label>
          {reviewState.fieldErrors.comment ? <p className="text-sm text-rose-700">{reviewState.fieldErrors.comment[0]}</p> : null}
          <div className="flex flex-wrap gap-2">
            <button
              type="submit"
              name="decision"
              value="approved"
              disabled={reviewing || !ready}
              className="min-h-12 rounded-lg bg-emerald-700 px-4 font-semibold text-white disabled:opacity-60"
            >
              Sign off the head
            </button>
            <button
              type="submit"
              name="decision"
              value="sent_back"
              disabled={reviewing}
              className="min-h-12 rounded-lg border-2 border-ink bg-white px-4 font-semibold disabled:opacity-60"
            >
              Send back to the bench
            </button>
          </div>
          <p aria-live="polite" className={`text-sm ${reviewState.ok ? "text-emerald-800" : "text-rose-700"}`}>
            {reviewState.message}
          </p>
        </form>
      ) : null}

      {canReview && status === "signed_off" ? (
        <ReopenForm action={submitHeadReopen} fields={{ jobId }} label="Reopen the head" />
      ) : null}

      {canReview && status !== "awaiting_audit" && status !== "signed_off" ? (
        <p className="text-sm text-stone-600">The head can be signed off once it is handed in for audit.</p>
      ) : null}

      <ReviewHistory reviews={reviews} emptyText="No decision on the head yet." />
    </section>
  );
}
