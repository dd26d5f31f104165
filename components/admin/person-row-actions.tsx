"use client";

import { useActionState } from "react";
import type { PersonRow } from "@/db/queries/users";
import { changeRole, endSessions, resetPassword, setActive } from "@/lib/actions/users";
import { initialActionState } from "@/lib/actions/state";
import { ROLE_LABELS } from "@/lib/auth/roles";
import { ROLES } from "@/lib/validations/auth";

const field = "min-h-12 rounded-lg border border-stone-400 bg-white px-3 text-base";

export function PersonRowActions({ person, isSelf }: { person: PersonRow; isSelf: boolean }) {
  const [roleState, roleAction, rolePending] = useActionState(changeRole, initialActionState);
  const [pwState, pwAction, pwPending] = useActionState(resetPassword, initialActionState);
  const [activeState, activeAction, activePending] = useActionState(setActive, initialActionState);
  const [endState, endAction, endPending] = useActionState(endSessions, initialActionState);
  return (
    <div className="mt-3 grid grid-cols-1 gap-3 md:grid-cols-2">
      <form action={roleAction} className="flex flex-wrap items-end gap-2">
        <input type="hidden" name="id" value={person.id} />
        <label className="flex flex-col gap-1 text-sm font-semibold">
          Role
          <select name="role" defaultValue={person.role} disabled={isSelf} className={field}>
            {ROLES.map((r) => (
              <option key={r} value={r}>
                {ROLE_LABELS[r]}
              </option>
            ))}
          </select>
        </label>
        <button type="submit" disabled={rolePending || isSelf} className="min-h-12 rounded-lg border border-stone-500 px-4 font-semibold disabled:opacity-50">
          {rolePending ? "Saving…" : "Change role"}
        </button>
        <p aria-live="polite" className={`w-full text-sm ${roleState.ok ? "text-emerald-800" : "text-rose-700"}`}>
          {isSelf ? "This is you: another admin must change your role." : roleState.message}
        </p>
      </form>
      <form action={pwAction} className="flex flex-wrap items-end gap-2">
        <input type="hidden" name="id" value={person.id} />
        <label className="flex flex-col gap-1 text-sm font-semibold">
          New password
          <input
            name="password"
            type="password"
            autoComplete="new-password"
            minLength={10}
            required
            className={field}
            aria-describedby={`pw-${person.id}-msg`}
          />
        </label>
        <button type="submit" disabled={pwPending} className="min-h-12 rounded-lg border border-stone-500 px-4 font-semibold disabled:opacity-50">
          {pwPending ? "Saving…" : "Reset password"}
        </button>
        <p id={`pw-${person.id}-msg`} aria-live="polite" className={`w-full text-sm ${pwState.ok ? "text-emerald-800" : "text-rose-700"}`}>
          {pwState.fieldErrors.password?.[0] ?? pwState.message}
        </p>
      </form>
      <div className="flex flex-wrap items-end gap-2 md:col-span-2">
        <form action={activeAction}>
          <input type="hidden" name="id" value={person.id} />
          <input type="hidden" name="active" value={person.active ? "false" : "true"} />
          <button type="submit" disabled={activePending || isSelf} className="min-h-12 rounded-lg border border-stone-500 px-4 font-semibold disabled:opacity-50">
            {activePending ? "Saving…" : person.active ? "Deactivate" : "Let them sign in again"}
          </button>
        </form>
        <form action={endAction}>
          <input type="hidden" name="id" value={person.id} />
          <button type="submit" disabled={endPending} className="min-h-12 rounded-lg border border-stone-500 px-4 font-semibold disabled:opacity-50">
            {endPending ? "Saving…" : "Sign out everywhere"}
          </button>
        </form>
        <p aria-live="polite" className={`w-full text-sm ${(activeState.message ? activeState : endState).ok ? "text-emerald-800" : "text-rose-700"}`}>
          {activeState.message ?? endState.message}
        </p>
      </div>
    </div>
  );
}
