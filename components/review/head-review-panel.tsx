"use client";

import { useActionState } from "react";
import type { ReviewRow } from "@/db/queries/reviews";
import type { JobStatus } from "@/db/schema";
import { submitHeadReopen, submitHeadReview } from "@/lib/actions/review";
import { initialActionState } from "@/lib/actions/state";
import type { SignOffGap } from "@/lib/review/completeness";
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
  /** What the record lacks (lib/review/completeness.ts); anything but seats needs a reason to sign off. */
  gaps?: SignOffGap[];
  needsReason?: boolean;
  /** Who the report goes to: the customer's address, if any, and the supervisor's own. */
  customer?: { name: string; email: string | null };
  supervisorEmail?: string | null;
  /** The photo rule, in words, as the server checks it. */
  photoRule?: string;
}

/** Sign off or send back the head as a whole with a comment, or reopen a signed-off head with a reason. */
export function HeadReviewPanel({
  jobId,
  jobNumber,
  status,
  unapprovedSeatCodes,
  reviews,
  canReview,
  gaps = [],
  needsReason = false,
  customer,
  supervisorEmail,
  photoRule,
}: HeadReviewPanelProps) {
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
          <div className="flex flex-col gap-1 text-sm" data-testid="sign-off-record">
            <p className="font-semibold">Before signing off</p>
            {gaps.length === 0 ? (
              <p className="text-emerald-800">
                The record is complete: every seat approved, every journal clearance measured, the cap torque sheets finished, every seat&apos;s
                done-checks passed and photographed.
              </p>
            ) : (
              <ul className="flex list-disc flex-col gap-1 pl-5 text-amber-900" data-testid="sign-off-gaps">
                {gaps.map((g, i) => (
                  <li key={`${g.kind}-${i}`} data-gap={g.kind}>
                    {g.text}
                    {g.details.length ? (
                      <details className="text-stone-700">
                        <summary className="min-h-11 cursor-pointer py-2.5">Details</summary>
                        <ul className="pl-4">
                          {g.details.map((d) => (
                            <li key={d}>{d}</li>
                          ))}
                        </ul>
                      </details>
                    ) : null}
                  </li>
                ))}
              </ul>
            )}
            {photoRule ? <p className="text-stone-600">Photos: {photoRule}.</p> : null}
            {!ready ? <p className="text-amber-900">Approve every seat before signing off the head.</p> : null}
          </div>
          {customer ? (
            customer.email ? (
              <p className="text-sm text-stone-700" data-testid="sign-off-recipient">
                Signing off sends the report (PDF and a link that opens without an account) to {customer.name} at{" "}
                <span className="font-semibold">{customer.email}</span>
                {supervisorEmail ? <>, with a copy to you</> : null}.
              </p>
            ) : (
              <p className="rounded-lg border border-amber-400 bg-amber-50 p-2 text-sm text-amber-950" data-testid="sign-off-recipient" role="note">
                {customer.name} has no e-mail on file: the report will go to you only{supervisorEmail ? ` (${supervisorEmail})` : ""}. Add one under
                the customer to send it to them.
              </p>
            )
          ) : null}
          {ready && needsReason ? (
            <>
              <label className="flex flex-col gap-1 text-sm font-semibold">
                Reason for signing off with the record incomplete
                <textarea
                  name="incompleteReason"
                  minLength={3}
                  maxLength={2000}
                  rows={2}
                  aria-invalid={Boolean(reviewState.fieldErrors.incompleteReason)}
                  aria-describedby="incomplete-reason-help"
                  className="rounded-lg border border-stone-400 p-2 font-normal"
                />
              </label>
              <p id="incomplete-reason-help" className="text-xs text-stone-600">
                Required to sign off; the head report prints it under the sign-off. Sending back needs none.
              </p>
              {reviewState.fieldErrors.incompleteReason ? (
                <p className="text-sm text-rose-700">{reviewState.fieldErrors.incompleteReason[0]}</p>
              ) : null}
            </>
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
        </form>
      ) : null}

      <p aria-live="polite" data-testid="head-review-message" className={`text-sm ${reviewState.ok ? "text-emerald-800" : "text-rose-700"}`}>
        {reviewState.message}
      </p>

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
