"use client";

import { useActionState } from "react";
import type { JobStatus } from "@/db/schema";
import { changeJobStatus, takeHeadBack } from "@/lib/actions/jobs";
import { initialActionState } from "@/lib/actions/state";
import type { Unfinished } from "@/lib/jobs/hand-in";

function UnfinishedList({ unfinished }: { unfinished: Unfinished }) {
  return (
    <div className="w-full rounded-lg border-2 border-amber-500 bg-amber-50 p-2 text-sm" data-testid="hand-in-unfinished">
      <p className="font-semibold">Not finished yet:</p>
      <ul className="list-disc pl-5">
        {unfinished.seats.length ? (
          <li>
            Seats not settled in fine: <span className="font-mono">{unfinished.seats.join(", ")}</span>
          </li>
        ) : null}
        {unfinished.sheets.map((line) => (
          <li key={line}>{line}</li>
        ))}
      </ul>
      <label className="mt-2 flex min-h-11 items-center gap-2 font-semibold">
        <input type="checkbox" name="confirmUnfinished" value="yes" className="size-6" data-testid="confirm-unfinished" />
        Hand it in as it is, unfinished
      </label>
    </div>
  );
}

export function JobStatusActions({
  jobId,
  moves,
  unfinished,
  canTakeBack,
}: {
  jobId: string;
  moves: Array<{ to: JobStatus; label: string }>;
  /** What is unfinished, shown beside "Hand in for audit" when that move is offered. */
  unfinished: Unfinished | null;
  /** The head is awaiting audit, the audit has not started, and the caller may work on it. */
  canTakeBack: boolean;
}) {
  const [state, action, pending] = useActionState(changeJobStatus, initialActionState);
  const [backState, backAction, backPending] = useActionState(takeHeadBack, initialActionState);
  const handIn = moves.some((m) => m.to === "awaiting_audit");
  const messageClass = (ok: boolean) => `text-sm ${ok ? "text-emerald-800" : "text-rose-700"}`;
  return (
    <>
      {moves.length ? (
        <form action={action} className="flex flex-wrap items-center gap-2">
          <input type="hidden" name="jobId" value={jobId} />
          {handIn && unfinished && (unfinished.seats.length || unfinished.sheets.length) ? <UnfinishedList unfinished={unfinished} /> : null}
          {moves.map((m) => (
            <button
              key={m.to}
              type="submit"
              name="to"
              value={m.to}
              disabled={pending}
              className="min-h-12 rounded-lg border-2 border-ink bg-white px-4 font-semibold disabled:opacity-60"
            >
              {m.label}
            </button>
          ))}
          <p aria-live="polite" className={messageClass(state.ok)}>
            {state.message}
          </p>
        </form>
      ) : null}
      {canTakeBack ? (
        <form action={backAction} className="flex flex-wrap items-center gap-2">
          <input type="hidden" name="jobId" value={jobId} />
          <button type="submit" disabled={backPending} className="min-h-12 rounded-lg border-2 border-ink bg-white px-4 font-semibold disabled:opacity-60">
            Take it back to the bench
          </button>
          <span className="text-sm text-stone-600">until the supervisor starts the audit</span>
          <p aria-live="polite" className={messageClass(backState.ok)}>
            {backState.message}
          </p>
        </form>
      ) : null}
    </>
  );
}
