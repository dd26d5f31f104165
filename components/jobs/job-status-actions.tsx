"use client";

import { useActionState } from "react";
import type { JobStatus } from "@/db/schema";
import { changeJobStatus } from "@/lib/actions/jobs";
import { initialActionState } from "@/lib/actions/state";

export function JobStatusActions({ jobId, moves }: { jobId: string; moves: Array<{ to: JobStatus; label: string }> }) {
  const [state, action, pending] = useActionState(changeJobStatus, initialActionState);
  if (moves.length === 0) return null;
  return (
    <form action={action} className="flex flex-wrap items-center gap-2">
      <input type="hidden" name="jobId" value={jobId} />
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
      <p aria-live="polite" className={`text-sm ${state.ok ? "text-emerald-800" : "text-rose-700"}`}>
        {state.message}
      </p>
    </form>
  );
}
