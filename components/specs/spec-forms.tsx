"use client";

import { useActionState, useState } from "react";
import {
  createEngineSpec,
  renameEngineSpec,
  saveJobOverride,
  saveSpecFigure,
  setEngineSpecRetired,
} from "@/lib/actions/specs";
import { initialActionState } from "@/lib/actions/state";
import { SPEC_KEY_LIST, SPEC_KEYS, type SpecKey } from "@/lib/specs/keys";
import { SPEC_UNITS, SI_UNIT, formatSi, toSi, unitLabel, type SpecUnit } from "@/lib/specs/units";

const field = "min-h-12 rounded-lg border border-stone-400 bg-white px-2 text-base";

const FIELD_LABELS = { min: "Min", max: "Max", limit: "Service limit", nominal: "Value" } as const;

/** What a typed figure is in SI, shown under the field while typing; nothing for text that is not a number yet. */
function siPreview(key: SpecKey, unit: SpecUnit, typed: string): string | null {
  const t = typed.trim().replace(",", ".");
  if (!/^\+?(\d+(\.\d*)?|\.\d+)$/.test(t)) return null;
  const quantity = SPEC_KEYS[key].quantity;
  if (unit === SI_UNIT[quantity]) return null;
  return `= ${formatSi(quantity, toSi(quantity, Number(t), unit))}`;
}

export function SpecFigureForm({
  target,
  affected,
}: {
  target: { kind: "library"; engineSpecId: string } | { kind: "job"; jobId: string };
  /** For a library figure: per key, the sentence naming the open jobs a change reaches. */
  affected?: Partial<Record<SpecKey, string>>;
}) {
  const [state, action, pending] = useActionState(
    target.kind === "library" ? saveSpecFigure : saveJobOverride,
    initialActionState,
  );
  const [key, setKey] = useState<SpecKey>(SPEC_KEY_LIST[0]!);
  const quantity = SPEC_KEYS[key].quantity;
  const [unit, setUnit] = useState<SpecUnit>(SI_UNIT[quantity]);
  const [typed, setTyped] = useState<Record<string, string>>({});
  const fe = (k: string) => state.fieldErrors[k]?.[0];
  const err = (k: string) =>
    fe(k) ? <span className="text-sm font-normal text-rose-700">{fe(k)}</span> : null;
  const units = SPEC_UNITS[quantity];
  const fields = SPEC_KEYS[key].fields;
  return (
    <form action={action} className="grid grid-cols-2 gap-2 sm:grid-cols-5" noValidate>
      {target.kind === "library" ? (
        <input type="hidden" name="engineSpecId" value={target.engineSpecId} />
      ) : (
        <input type="hidden" name="jobId" value={target.jobId} />
      )}
      <label className="col-span-2 flex flex-col text-sm font-semibold sm:col-span-3">
        Figure
        <select
          name="key"
          className={field}
          value={key}
          onChange={(e) => {
            const next = e.target.value as SpecKey;
            setKey(next);
            if (SPEC_KEYS[next].quantity !== quantity) setUnit(SI_UNIT[SPEC_KEYS[next].quantity]);
          }}
        >
          {SPEC_KEY_LIST.map((k) => (
            <option key={k} value={k}>
              {SPEC_KEYS[k].label}
            </option>
          ))}
        </select>
        {err("key")}
      </label>
      <label className="col-span-2 flex flex-col text-sm font-semibold">
        Unit, as the manual gives it
        <select
          name="unit"
          className={field}
          value={unit}
          onChange={(e) => setUnit(e.target.value as SpecUnit)}
        >
          {units.map((u) => (
            <option key={u} value={u}>
              {unitLabel(u)}
            </option>
          ))}
        </select>
        {err("unit")}
      </label>
      {fields.map((k) => {
        const preview = siPreview(key, unit, typed[k] ?? "");
        return (
          <label key={k} className="flex flex-col text-sm font-semibold">
            {FIELD_LABELS[k]} ({unitLabel(unit)})
            <input
              name={k}
              inputMode="decimal"
              className={`${field} figure`}
              value={typed[k] ?? ""}
              onChange={(e) => setTyped((t) => ({ ...t, [k]: e.target.value }))}
              aria-invalid={fe(k) ? true : undefined}
            />
            {preview ? (
              <span className="figure text-xs font-normal text-stone-600">{preview}</span>
            ) : null}
            {err(k)}
          </label>
        );
      })}
      {target.kind === "job" ? (
        <label className="col-span-2 flex flex-col text-sm font-semibold sm:col-span-5">
          Why this job differs
          <input name="reason" className={field} placeholder="e.g. oversize journals fitted" />
          {err("reason")}
        </label>
      ) : (
        <label className="col-span-2 flex flex-col text-sm font-semibold sm:col-span-5">
          Note (optional)
          <input name="note" className={field} />
        </label>
      )}
      {target.kind === "library" ? (
        <p
          className="col-span-2 text-sm text-stone-700 sm:col-span-5"
          data-testid="affected-preview"
        >
          {affected?.[key] ?? "No open job takes its limits from this figure."}
        </p>
      ) : null}
      <div className="col-span-2 flex flex-wrap items-center gap-2 sm:col-span-5">
        <button
          type="submit"
          disabled={pending}
          className="min-h-12 rounded-lg bg-ink px-4 font-semibold text-white disabled:opacity-60"
        >
          {pending ? "Saving…" : target.kind === "library" ? "Save figure" : "Override on this job"}
        </button>
        <p
          aria-live="polite"
          className={`text-sm ${state.ok ? "text-emerald-800" : "text-rose-700"}`}
          data-testid="figure-result"
        >
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
        {state.fieldErrors.name ? (
          <span className="text-sm font-normal text-rose-700">{state.fieldErrors.name[0]}</span>
        ) : null}
      </label>
      <label className="flex flex-col text-sm font-semibold">
        Source of the figures
        <input name="source" className={field} placeholder="Maker's manual, page…" />
      </label>
      <button
        type="submit"
        disabled={pending}
        className="min-h-12 rounded-lg bg-ink px-4 font-semibold text-white disabled:opacity-60"
      >
        Add engine
      </button>
      <p
        aria-live="polite"
        className={`w-full text-sm ${state.ok ? "text-emerald-800" : "text-rose-700"}`}
      >
        {state.message}
      </p>
    </form>
  );
}

/** Rename an engine, and retire it from new jobs (or bring it back). */
export function EngineSpecSettings({
  id,
  name,
  retired,
}: {
  id: string;
  name: string;
  retired: boolean;
}) {
  const [renameState, renameAction, renamePending] = useActionState(
    renameEngineSpec,
    initialActionState,
  );
  const [retireState, retireAction, retirePending] = useActionState(
    setEngineSpecRetired,
    initialActionState,
  );
  return (
    <div className="flex flex-col gap-3">
      <form action={renameAction} className="flex flex-wrap items-end gap-2" noValidate>
        <input type="hidden" name="id" value={id} />
        <label className="flex flex-col text-sm font-semibold">
          New name
          <input name="name" defaultValue={name} className={field} />
          {renameState.fieldErrors.name ? (
            <span className="text-sm font-normal text-rose-700">
              {renameState.fieldErrors.name[0]}
            </span>
          ) : null}
        </label>
        <button
          type="submit"
          disabled={renamePending}
          className="min-h-12 rounded-lg border border-stone-500 bg-white px-4 font-semibold disabled:opacity-60"
        >
          {renamePending ? "Saving…" : "Rename"}
        </button>
        <p
          aria-live="polite"
          className={`w-full text-sm ${renameState.ok ? "text-emerald-800" : "text-rose-700"}`}
        >
          {renameState.message}
        </p>
      </form>
      <form action={retireAction} className="flex flex-wrap items-center gap-2">
        <input type="hidden" name="id" value={id} />
        <input type="hidden" name="retired" value={retired ? "false" : "true"} />
        <button
          type="submit"
          disabled={retirePending}
          className="min-h-12 rounded-lg border border-stone-500 bg-white px-4 font-semibold disabled:opacity-60"
        >
          {retirePending
            ? "Saving…"
            : retired
              ? "Offer for new jobs again"
              : "Retire from new jobs"}
        </button>
        <span className="text-sm text-stone-600">
          {retired
            ? "Retired: not offered when booking in."
            : "Retiring keeps it on the jobs that use it."}
        </span>
        <p
          aria-live="polite"
          className={`w-full text-sm ${retireState.ok ? "text-emerald-800" : "text-rose-700"}`}
        >
          {retireState.message}
        </p>
      </form>
    </div>
  );
}
