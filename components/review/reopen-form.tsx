"use client";

// Reopening an approved seat or a signed-off head: one form, a reason required, whichever it is.
import { useActionState } from "react";
import { initialActionState, type ActionState } from "@/lib/actions/state";

export function ReopenForm({
  action: submit,
  fields,
  label,
}: {
  action: (prev: ActionState, form: FormData) => Promise<ActionState>;
  fields: Record<string, string>;
  label: string;
}) {
  const [state, action, pending] = useActionState(submit, initialActionState);
  return (
    <form action={action} className="flex flex-col gap-2">
      {Object.entries(fields).map(([name, value]) => (
        <input key={name} type="hidden" name={name} value={value} />
      ))}
      <label className="flex flex-col gap-1 text-sm font-semibold">
        Reason for reopening
        <textarea
          name="reason"
          required
          minLength={3}
          maxLength={2000}
          rows={2}
          aria-invalid={Boolean(state.fieldErrors.reason)}
          className="rounded-lg border border-stone-400 p-2 font-normal"
        />
      </label>
      {state.fieldErrors.reason ? <p className="text-sm text-rose-700">{state.fieldErrors.reason[0]}</p> : null}
      <button
        type="submit"
        disabled={pending}
        className="min-h-12 self-start rounded-lg border-2 border-ink bg-white px-4 font-semibold disabled:opacity-60"
      >
        {label}
      </button>
      <p aria-live="polite" className={`text-sm ${state.ok ? "text-emerald-800" : "text-rose-700"}`}>
        {state.message}
      </p>
    </form>
  );
}
