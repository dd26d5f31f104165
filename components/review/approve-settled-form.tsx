"use client";

import { useActionState } from "react";
import { submitApproveSettled, type ApproveSettledSaved } from "@/lib/actions/review";
import { initialActionState, type ActionState } from "@/lib/actions/state";

export interface ApproveSettledFormProps {
  jobId: string;
  headLabel: string;
  /** The head's settled seats, in head order, with what their done-checks lack (null when all passed). */
  seats: Array<{ id: string; code: string; shortfall: string | null }>;
}

/**
 * "Approve every settled seat" of one head with one optional comment. Seats whose done-checks are
 * not all passed are approved only with a reason for that (recorded on each of them); left empty,
 * they are skipped and listed. Each seat still gets its own review and audit entry.
 */
export function ApproveSettledForm({ jobId, headLabel, seats }: ApproveSettledFormProps) {
  const [state, action, pending] = useActionState<ActionState<ApproveSettledSaved>, FormData>(submitApproveSettled, initialActionState);
  const short = seats.filter((s) => s.shortfall);
  const formId = `approve-settled-${jobId}`;
  if (seats.length === 0) {
    return (
      <div className="rounded-lg border border-dashed border-stone-400 p-3 text-sm text-stone-600" data-testid="approve-settled">
        {state.message ? <p className="mb-1 text-emerald-800">{state.message}</p> : null}
        <SkippedList saved={state.saved} />
        No settled seat of the {headLabel.toLowerCase()} awaits approval.
      </div>
    );
  }
  return (
    <form action={action} className="flex flex-col gap-2 rounded-lg border border-emerald-700 bg-emerald-50/40 p-3" data-testid="approve-settled" aria-labelledby={`${formId}-title`}>
      <h3 id={`${formId}-title`} className="font-semibold">
        Approve every settled seat
      </h3>
      <p className="text-sm">
        {seats.length === 1 ? "One seat is" : `${seats.length} seats are`} settled and not approved yet:{" "}
        <span className="figure font-semibold">{seats.map((s) => s.code).join(", ")}</span>. Each is approved on its own record, with the
        comment below.
      </p>
      <input type="hidden" name="jobId" value={jobId} />
      {seats.map((s) => (
        <input key={s.id} type="hidden" name="seatIds" value={s.id} />
      ))}
      <label className="flex flex-col gap-1 text-sm font-semibold">
        Comment for every seat
        <span className="font-normal text-stone-600">Optional.</span>
        <textarea
          name="comment"
          maxLength={2000}
          rows={2}
          aria-invalid={Boolean(state.fieldErrors.comment)}
          className="rounded-lg border border-stone-400 p-2 font-normal"
          placeholder="e.g. walked the head: even grey rings, curves flat"
        />
      </label>
      {state.fieldErrors.comment ? <p className="text-sm text-rose-700">{state.fieldErrors.comment[0]}</p> : null}
      {short.length > 0 ? (
        <>
          <div className="text-sm text-amber-950" data-testid="approve-settled-short">
            <p className="font-semibold">Done-checks not all passed on:</p>
            <ul className="ml-4 list-disc">
              {short.map((s) => (
                <li key={s.id}>
                  <span className="figure font-semibold">{s.code}</span>: {s.shortfall}
                </li>
              ))}
            </ul>
          </div>
          <label className="flex flex-col gap-1 text-sm font-semibold">
            Reason to approve these without their done-checks
            <span className="font-normal text-stone-600">Leave it empty to approve only the others; these are then left as they are.</span>
            <textarea
              name="checksReason"
              maxLength={2000}
              rows={2}
              aria-invalid={Boolean(state.fieldErrors.checksReason)}
              className="rounded-lg border border-stone-400 p-2 font-normal"
              placeholder="e.g. leak test done on the whole head at assembly"
            />
          </label>
          {state.fieldErrors.checksReason ? <p className="text-sm text-rose-700">{state.fieldErrors.checksReason[0]}</p> : null}
        </>
      ) : null}
      <button type="submit" disabled={pending} className="min-h-12 self-start rounded-lg bg-emerald-700 px-4 font-semibold text-white disabled:opacity-60">
        {pending ? "Approving…" : `Approve every settled seat (${seats.length})`}
      </button>
      <p aria-live="polite" className={`text-sm ${state.ok ? "text-emerald-800" : "text-rose-700"}`} data-testid="approve-settled-message">
        {state.message}
      </p>
      <SkippedList saved={state.saved} />
    </form>
  );
}

function SkippedList({ saved }: { saved: ApproveSettledSaved | undefined }) {
  if (!saved || saved.skipped.length === 0) return null;
  return (
    <div className="text-sm" data-testid="approve-settled-skipped">
      <p className="font-semibold">Left as they were:</p>
      <ul className="ml-4 list-disc">
        {saved.skipped.map((s) => (
          <li key={s.code}>
            <span className="figure font-semibold">{s.code}</span>: {s.why}
          </li>
        ))}
      </ul>
    </div>
  );
}
