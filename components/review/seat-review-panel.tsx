"use client";

import { useActionState } from "react";
import type { ReviewRow } from "@/db/queries/reviews";
import type { SeatState } from "@/db/schema";
import { DoneChecksSummary } from "@/components/bench/done-checks-summary";
import { Sparkline } from "@/components/report/sparkline";
import type { SeatDoneChecks } from "@/lib/bench/done-checks";
import { submitSeatReopen, submitSeatReview } from "@/lib/actions/review";
import { initialActionState } from "@/lib/actions/state";
import { ReopenForm } from "./reopen-form";
import { ReviewHistory } from "./review-history";

export interface SeatReviewPanelProps {
  jobId: string;
  seat: { id: string; code: string; state: SeatState };
  /** This seat's reviews, newest first (getReviews filtered to the seat). */
  reviews: ReviewRow[];
  /** Whether the signed-in person is a supervisor; others see the history only. */
  canReview: boolean;
  /** True while the head is signed off: a seat is reopened only after its head is. */
  headClosed: boolean;
  /** The seat's done-checks (contact ring, marking compound, leak test). */
  doneChecks?: SeatDoneChecks;
  /** The seat's fade curve (the fine stage's contrasts, or the coarse stage's before any fine) and the settled band. */
  curve?: { contrastsDb: number[]; thresholdDb: number };
  /** The verdicts in words, e.g. "Coarse: settled at stroke 14 · Fine: settled at stroke 9". */
  verdict?: string;
  /** False where the page shows the done-checks already (listen-back); they still decide the reason field. */
  showDoneChecks?: boolean;
}

const STATE_LABELS: Record<SeatState, string> = {
  waiting: "Waiting",
  lapping: "Lapping",
  settled: "Settled",
  stalled: "Stalled",
  approved: "Approved",
  sent_back: "Sent back",
};

/**
 * Approve one seat (a comment is optional) or send it back (a comment says what to redo), or
 * reopen an approved one with a reason. The seat's state as shown goes with the decision, so a
 * seat that changed meanwhile answers a conflict instead of a decision on what was not seen.
 */
export function SeatReviewPanel({ jobId, seat, reviews, canReview, headClosed, doneChecks, curve, verdict, showDoneChecks = true }: SeatReviewPanelProps) {
  const [reviewState, reviewAction, reviewing] = useActionState(submitSeatReview, initialActionState);
  const canApprove = seat.state === "settled";
  const canSendBack = seat.state === "settled" || seat.state === "stalled" || seat.state === "lapping";
  const headingId = `seat-review-${seat.id}`;

  return (
    <section aria-labelledby={headingId} className="flex flex-col gap-3 rounded-xl border border-stone-300 bg-white p-4" data-testid="seat-review-panel">
      <h3 id={headingId} className="text-lg font-semibold">
        Seat {seat.code} · <span className="font-normal">{STATE_LABELS[seat.state]}</span>
      </h3>

      {curve || verdict ? (
        <div className="flex flex-wrap items-center gap-3" data-testid="seat-review-curve">
          {curve ? <Sparkline values={curve.contrastsDb} thresholdDb={curve.thresholdDb} width={160} height={40} /> : null}
          {verdict ? (
            <p className="text-sm" data-testid="seat-review-verdict">
              {verdict}
            </p>
          ) : null}
        </div>
      ) : null}

      {doneChecks && showDoneChecks ? (
        <div className="rounded-lg bg-stone-50 p-2" data-testid="seat-done-checks">
          <h4 className="text-sm font-semibold text-stone-600">Done-checks</h4>
          <DoneChecksSummary checks={doneChecks} />
        </div>
      ) : null}

      {canReview && !headClosed && seat.state !== "approved" && (canApprove || canSendBack) ? (
        <form action={reviewAction} className="flex flex-col gap-2">
          <input type="hidden" name="jobId" value={jobId} />
          <input type="hidden" name="seatId" value={seat.id} />
          <input type="hidden" name="expectedState" value={seat.state} />
          <label className="flex flex-col gap-1 text-sm font-semibold">
            Comment
            <span className="font-normal text-stone-600">Optional to approve; needed to send back.</span>
            <textarea
              name="comment"
              maxLength={2000}
              rows={3}
              aria-invalid={Boolean(reviewState.fieldErrors.comment)}
              aria-describedby={reviewState.fieldErrors.comment ? `${headingId}-comment-error` : undefined}
              className="rounded-lg border border-stone-400 p-2 font-normal"
              placeholder="What you checked (band width, evenness), or what to redo"
            />
          </label>
          {reviewState.fieldErrors.comment ? (
            <p id={`${headingId}-comment-error`} className="text-sm text-rose-700">
              {reviewState.fieldErrors.comment[0]}
            </p>
          ) : null}
          {canApprove && doneChecks && !doneChecks.complete ? (
            <>
              <label className="flex flex-col gap-1 text-sm font-semibold">
                Reason to approve without the done-checks
                <span className="font-normal text-stone-600">Needed only to approve: the done-checks are not all passed.</span>
                <textarea
                  name="checksReason"
                  maxLength={2000}
                  rows={2}
                  aria-invalid={Boolean(reviewState.fieldErrors.checksReason)}
                  aria-describedby={reviewState.fieldErrors.checksReason ? `${headingId}-checks-reason-error` : undefined}
                  className={`rounded-lg border p-2 font-normal ${reviewState.fieldErrors.checksReason ? "border-2 border-rose-600" : "border-stone-400"}`}
                  placeholder="e.g. leak test done on the whole head at assembly"
                />
              </label>
              {reviewState.fieldErrors.checksReason ? (
                <p id={`${headingId}-checks-reason-error`} className="text-sm text-rose-700">
                  {reviewState.fieldErrors.checksReason[0]}
                </p>
              ) : null}
            </>
          ) : null}
          <div className="flex flex-wrap gap-2">
            {canApprove ? (
              <button
                type="submit"
                name="decision"
                value="approved"
                disabled={reviewing}
                className="min-h-12 rounded-lg bg-emerald-700 px-4 font-semibold text-white disabled:opacity-60"
              >
                Approve seat
              </button>
            ) : null}
            {canSendBack ? (
              <button
                type="submit"
                name="decision"
                value="sent_back"
                disabled={reviewing}
                className="min-h-12 rounded-lg border-2 border-ink bg-white px-4 font-semibold disabled:opacity-60"
              >
                Send back to the bench
              </button>
            ) : null}
          </div>
          {!canApprove ? <p className="text-sm text-stone-600">Only a settled seat can be approved.</p> : null}
          <p aria-live="polite" className={`text-sm ${reviewState.ok ? "text-emerald-800" : "text-rose-700"}`}>
            {reviewState.message}
          </p>
        </form>
      ) : null}

      {canReview && seat.state === "approved" ? (
        headClosed ? (
          <p className="text-sm text-stone-600">The head is signed off. Reopen the head first to reopen this seat.</p>
        ) : (
          <ReopenForm action={submitSeatReopen} fields={{ jobId, seatId: seat.id }} label="Reopen seat" />
        )
      ) : null}

      <ReviewHistory reviews={reviews} emptyText="No review of this seat yet." />
    </section>
  );
}
