"use server";

// Server actions for sign-off. Each checks the session first, validates the form with zod,
// and leaves everything as it was when it refuses. The supervisor-only rule lives in the
// service, so the actions and any other caller share it.
import { revalidatePath } from "next/cache";
import { getDb } from "@/db/client";
import { requireActor } from "@/lib/auth/guard";
import { approveSettledSeats, reopenHead, reopenSeat, reviewHead, reviewSeat, type HeadReviewResult } from "@/lib/review/service";
import { revokeCustomerLink } from "@/lib/report/customer-links";
import { approveSettledSchema, customerLinkRevokeSchema, headReopenSchema, headReviewSchema, seatReopenSchema, seatReviewSchema } from "@/lib/review/validation";
import { actionFailure, type ActionState } from "./state";

const text = (f: FormData, k: string) => {
  const v = f.get(k);
  return typeof v === "string" ? v : undefined;
};

function done(jobId: string, message: string): ActionState {
  revalidatePath(`/jobs/${jobId}`);
  revalidatePath("/jobs");
  revalidatePath("/audit");
  return { ok: true, message, fieldErrors: {} };
}

/** What the supervisor is told after a sign-off: where the report went. */
function signedOffMessage(r: HeadReviewResult): string {
  const report = r.report;
  if (!report) return `Job ${r.number} signed off.`;
  if (report.customerEmail) return `Job ${r.number} signed off. Report sent to ${report.customerEmail}.`;
  const you = report.recipients[0];
  return you
    ? `Job ${r.number} signed off. ${report.customerName} has no e-mail on file: the report went to you only (${you}).`
    : `Job ${r.number} signed off. Nobody has an e-mail address on file: no report was sent.`;
}

export async function submitSeatReview(_prev: ActionState, f: FormData): Promise<ActionState> {
  try {
    const actor = await requireActor("jobs:audit");
    const v = seatReviewSchema.parse({
      seatId: text(f, "seatId"),
      jobId: text(f, "jobId"),
      decision: text(f, "decision"),
      comment: text(f, "comment"),
      checksReason: text(f, "checksReason"),
      expectedState: text(f, "expectedState"),
    });
    const r = await reviewSeat(await getDb(), actor, v);
    // The listen-back page shows the decision too.
    revalidatePath(`/review/${r.seatId}`);
    return done(v.jobId, r.state === "approved" ? `Seat ${r.code} approved; it is read-only now.` : `Seat ${r.code} sent back to the bench.`);
  } catch (err) {
    return actionFailure(err);
  }
}

/** What "Approve every settled seat" saved: the seats approved and the ones skipped, with why. */
export interface ApproveSettledSaved {
  approved: string[];
  skipped: Array<{ code: string; why: string }>;
}

export async function submitApproveSettled(_prev: ActionState<ApproveSettledSaved>, f: FormData): Promise<ActionState<ApproveSettledSaved>> {
  try {
    const actor = await requireActor("jobs:audit");
    const v = approveSettledSchema.parse({
      jobId: text(f, "jobId"),
      seatIds: f.getAll("seatIds").filter((x) => typeof x === "string"),
      comment: text(f, "comment"),
      checksReason: text(f, "checksReason"),
    });
    const r = await approveSettledSeats(await getDb(), actor, v);
    const words =
      r.approved.length === 0
        ? "No seat approved."
        : `${r.approved.length === 1 ? "Seat" : `${r.approved.length} seats`} approved: ${r.approved.join(", ")}.`;
    const skippedWords = r.skipped.length ? ` ${r.skipped.length === 1 ? "One seat" : `${r.skipped.length} seats`} left as they were (listed below).` : "";
    return { ...done(v.jobId, words + skippedWords), saved: { approved: r.approved, skipped: r.skipped.map(({ code, why }) => ({ code, why })) } };
  } catch (err) {
    return actionFailure(err);
  }
}

export async function submitSeatReopen(_prev: ActionState, f: FormData): Promise<ActionState> {
  try {
    const actor = await requireActor("jobs:audit");
    const v = seatReopenSchema.parse({ seatId: text(f, "seatId"), jobId: text(f, "jobId"), reason: text(f, "reason") });
    const r = await reopenSeat(await getDb(), actor, v);
    return done(v.jobId, `Seat ${r.code} reopened; it can be lapped again.`);
  } catch (err) {
    return actionFailure(err);
  }
}

export async function submitHeadReview(_prev: ActionState, f: FormData): Promise<ActionState> {
  try {
    const actor = await requireActor("jobs:audit");
    const v = headReviewSchema.parse({
      jobId: text(f, "jobId"),
      decision: text(f, "decision"),
      comment: text(f, "comment"),
      incompleteReason: text(f, "incompleteReason"),
    });
    const r = await reviewHead(await getDb(), actor, v);
    return done(v.jobId, r.status === "signed_off" ? signedOffMessage(r) : `Job ${r.number} sent back to the bench.`);
  } catch (err) {
    return actionFailure(err);
  }
}

export async function submitHeadReopen(_prev: ActionState, f: FormData): Promise<ActionState> {
  try {
    const actor = await requireActor("jobs:audit");
    const v = headReopenSchema.parse({ jobId: text(f, "jobId"), reason: text(f, "reason") });
    const r = await reopenHead(await getDb(), actor, v);
    return done(v.jobId, `Job ${r.number} reopened and back at the bench.`);
  } catch (err) {
    return actionFailure(err);
  }
}

export async function submitCustomerLinkRevoke(_prev: ActionState, f: FormData): Promise<ActionState> {
  try {
    const actor = await requireActor("jobs:audit");
    const v = customerLinkRevokeSchema.parse({ linkId: text(f, "linkId"), jobId: text(f, "jobId") });
    const r = await revokeCustomerLink(await getDb(), actor, { linkId: v.linkId });
    revalidatePath(`/jobs/${r.jobId}`);
    return { ok: true, message: `The customer's link to ${r.jobNumber}'s report is revoked; it no longer opens.`, fieldErrors: {} };
  } catch (err) {
    return actionFailure(err);
  }
}
