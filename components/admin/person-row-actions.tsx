"use client";

import { useActionState, useState } from "react";
import type { PersonRow } from "@/db/queries/users";
import { changeRole, endSessions, resetPassword, setActive } from "@/lib/actions/users";
import { initialActionState, type ActionState } from "@/lib/actions/state";
import { ROLE_LABELS } from "@/lib/auth/roles";
import { ROLES } from "@/lib/validations/auth";

const field = "min-h-12 rounded-lg border border-stone-400 bg-white px-3 text-base";
const button =
  "min-h-12 rounded-lg border border-stone-500 bg-white px-4 font-semibold disabled:opacity-50";

function Result({ state, id }: { state: ActionState; id?: string }) {
  return (
    <p
      id={id}
      aria-live="polite"
      className={`w-full text-sm ${state.ok ? "text-emerald-800" : "text-rose-700"}`}
    >
      {state.message}
    </p>
  );
}

/** What an admin can do for one person: access first (deactivate or let back in), then role and password. */
export function PersonRowActions({ person, isSelf }: { person: PersonRow; isSelf: boolean }) {
  const [roleState, roleAction, rolePending] = useActionState(changeRole, initialActionState);
  const [pwState, pwAction, pwPending] = useActionState(resetPassword, initialActionState);
  const [activeState, activeAction, activePending] = useActionState(setActive, initialActionState);
  const [endState, endAction, endPending] = useActionState(endSessions, initialActionState);
  const [confirming, setConfirming] = useState(false);
  return (
    <div className="grid grid-cols-1 gap-4 lg:grid-cols-3">
      <section aria-label={`Access for ${person.name}`} className="flex flex-col gap-2">
        <h3 className="font-semibold">Access</h3>
        {isSelf ? (
          <p className="text-sm text-stone-600">
            This is you: another admin must deactivate you or change your role.
          </p>
        ) : person.active ? (
          confirming ? (
            <form
              action={activeAction}
              className="flex flex-wrap items-center gap-2"
              onSubmit={() => setConfirming(false)}
            >
              <input type="hidden" name="id" value={person.id} />
              <input type="hidden" name="active" value="false" />
              <p className="w-full text-sm">
                Deactivate {person.name}? They are signed out everywhere at once and cannot sign in;
                their jobs, reviews and audit entries keep their name.
              </p>
              <button
                type="submit"
                disabled={activePending}
                className="min-h-12 rounded-lg bg-rose-800 px-4 font-semibold text-white disabled:opacity-60"
              >
                {activePending ? "Deactivating…" : `Yes, deactivate ${person.name}`}
              </button>
              <button type="button" onClick={() => setConfirming(false)} className={button}>
                Keep
              </button>
            </form>
          ) : (
            <div>
              <button type="button" onClick={() => setConfirming(true)} className={button}>
                Deactivate…
              </button>
            </div>
          )
        ) : (
          <form action={activeAction}>
            <input type="hidden" name="id" value={person.id} />
            <input type="hidden" name="active" value="true" />
            <button type="submit" disabled={activePending} className={button}>
              {activePending ? "Saving…" : "Reactivate"}
            </button>
          </form>
        )}
        <Result state={activeState} />
        {person.active && !isSelf ? (
          <form action={endAction} className="flex flex-wrap gap-2">
            <input type="hidden" name="id" value={person.id} />
            <button type="submit" disabled={endPending} className={button}>
              {endPending ? "Saving…" : "Sign out everywhere"}
            </button>
            <Result state={endState} />
          </form>
        ) : null}
      </section>
      <form
        action={roleAction}
        className="flex flex-wrap items-end gap-2"
        aria-label={`Role of ${person.name}`}
      >
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
        <button type="submit" disabled={rolePending || isSelf} className={button}>
          {rolePending ? "Saving…" : "Change role"}
        </button>
        <Result state={roleState} />
      </form>
      <form
        action={pwAction}
        className="flex flex-wrap items-end gap-2"
        aria-label={`Password of ${person.name}`}
      >
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
        <button type="submit" disabled={pwPending} className={button}>
          {pwPending ? "Saving…" : "Reset password"}
        </button>
        <p
          id={`pw-${person.id}-msg`}
          aria-live="polite"
          className={`w-full text-sm ${pwState.ok ? "text-emerald-800" : "text-rose-700"}`}
        >
          {pwState.fieldErrors.password?.[0] ?? pwState.message}
        </p>
      </form>
    </div>
  );
}
