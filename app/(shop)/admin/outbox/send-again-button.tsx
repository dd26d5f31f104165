"use client";

import { useActionState } from "react";
import { initialActionState } from "@/lib/actions/state";
import { retryMailAction } from "@/lib/actions/mail";

export function SendAgainButton({ id }: { id: string }) {
  const [state, action, pending] = useActionState(retryMailAction, initialActionState);
  return (
    <form action={action} className="flex flex-col items-start gap-1">
      <input type="hidden" name="id" value={id} />
      <button
        type="submit"
        disabled={pending}
        className="min-h-12 rounded-lg border border-stone-500 px-4 font-semibold disabled:opacity-50"
      >
        {pending ? "Queuing…" : "Send again"}
      </button>
      <p aria-live="polite" className={`text-sm ${state.ok ? "text-emerald-800" : "text-rose-700"}`}>
        {state.message}
      </p>
    </form>
  );
}
