"use client";

import { useActionState } from "react";
import { createEngineSpec, saveJobOverride, saveSpecFigure } from "@/lib/actions/specs";
import { initialActionState } from "@/lib/actions/state";
import { SPEC_KEY_LIST, SPEC_KEYS } from "@/lib/specs/keys";

const field = "min-h-12 rounded-lg border border-stone-400 bg-white px-2 text-base";

export function SpecFigureForm({ target }: { target: { kind: "library"; engineSpecId: string } | { kind: "job"; jobId: string } }) {
  const [state, action, pending] = useActionState(target.kind === "library" ? saveSpecFigure : saveJobOverride, initialActionState);
  const fe = (k: string) => state.fieldErrors[k]?.[0];
  const err = (k: string) => (fe(k) ? <span className="text-xs font-normal text-rose-700">{fe(k)}</span> : null);
  return (
    <form action={action} className="grid grid-cols-2 gap-2 sm:grid-cols-5" noValidate>
      {target.kind === "library" ? <input type="hidden" name="engineSpecId" value={target.engineSpecId} /> : <input type="hidden" name="jobId" value={target.jobId} />}
      <label className="col-span-2 flex flex-col text-sm font-semibold sm:col-span-5">
        Figure
        <select name="key" className={field}>
          {SPEC_KEY_LIST.map((k) => (
            <option key={k} value={k}>
              {SPEC_KEYS[k].label} ({SPEC_KEYS[k].unit}; {SPEC_KEYS[k].fields.join(" / ")})
            </option>
          ))}
        </select>
        {err("key")}
      </label>
      {(["min", "max", "limit", "nominal"] as const).map((k) => (
        <label key={k} className="flex flex-col text-sm font-semibold">
          {k === "limit" ? "Service limit" : k === "nominal" ? "Value" : k === "min" ? "Min" : "Max"}
          <input name={k} inputMode="decimal" className={`${field} figure`} />
          {err(k)}
        </label>
      ))}
      {target.kind === "job" ? (
        <label className="col-span-2 flex flex-col text-sm font-semibold sm:col-span-5">
          Why this job differs
          <input name="reason" className={field} placeholder="e.g. oversize journals fitted" />
          {state.fieldErrors._form?.[0] && !state.ok ? null : null}
        </label>
      ) : (
        <label className="col-span-2 flex flex-col text-sm font-semibold sm:col-span-5">
          Note (optional)
          <input name="note" className={field} />
        </label>
      )}
      <div className="col-span-2 flex flex-wrap items-center gap-2 sm:col-span-5">
        <button type="submit" disabled={pending} className="min-h-12 rounded-lg bg-ink px-4 font-semibold text-white disabled:opacity-60">
          {pending ? "Saving…" : target.kind === "library" ? "Save figure" : "Override on this job"}
        </button>
        <p aria-live="polite" className={`text-sm ${state.ok ? "text-emerald-800" : "text-rose-700"}`}>
          {state.message}
        </p>
      </div>
    </form>
  );
}

export function NewEngineSpecForm() {
  const [state, action, pending] = useActionState(createEngineSpec, initialActionState);
  return (
    <form action={action} className="flex flex-wrap items-end gap-2" noValidate>
      <label className="flex flex-col text-sm font-semibold">
        Engine
        <input name="name" className={field} placeholder="Make model size valves" />
        {state.fieldErrors.name ? <span className="text-xs font-normal text-rose-700">{state.fieldErrors.name[0]}</span> : null}
      </label>
      <label className="flex flex-col text-sm font-semibold">
        Source of the figures
        <input name="source" className={field} placeholder="Maker's manual, page…" />
      </label>
      <button type="submit" disabled={pending} className="min-h-12 rounded-lg bg-ink px-4 font-semibold text-white disabled:opacity-60">
        Add engine
      </button>
      <p aria-live="polite" className={`w-full text-sm ${state.ok ? "text-emerald-800" : "text-rose-700"}`}>
        {state.message}
      </p>
    </form>
  );
}
