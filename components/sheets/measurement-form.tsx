"use client";

import { useActionState, useState } from "react";
import { saveMeasurement } from "@/lib/actions/sheets";
import { initialActionState } from "@/lib/actions/state";
import { MEASUREMENT_KINDS, STEM_GUIDE_METHOD_LABELS, STEM_GUIDE_METHODS, type MeasurementKind } from "@/lib/measure/results";
import { FORCE_UNITS, LENGTH_UNITS, UNIT_LABELS } from "@/lib/measure/units";

const field = "min-h-12 rounded-lg border border-stone-400 bg-white px-2 text-base";
const KINDS = (Object.keys(MEASUREMENT_KINDS) as MeasurementKind[]).filter((k) => k !== "journal_clearance");

export function MeasurementForm({ jobId, seats }: { jobId: string; seats: Array<{ id: string; code: string }> }) {
  const [state, action, pending] = useActionState(saveMeasurement, initialActionState);
  const [kind, setKind] = useState<MeasurementKind>("seat_contact_width");
  const info = MEASUREMENT_KINDS[kind];
  const units = info.quantity === "force" ? FORCE_UNITS : LENGTH_UNITS;
  const fe = (k: string) => state.fieldErrors[k]?.[0];
  const err = (k: string) => (fe(k) ? <span className="text-xs font-normal text-rose-700">{fe(k)}</span> : null);
  return (
    <form action={action} className="grid grid-cols-2 gap-2 sm:grid-cols-4" noValidate data-testid="measurement-form">
      <input type="hidden" name="jobId" value={jobId} />
      <label className="col-span-2 flex flex-col text-sm font-semibold">
        What was measured
        <select name="kind" value={kind} onChange={(e) => setKind(e.target.value as MeasurementKind)} className={field}>
          {KINDS.map((k) => (
            <option key={k} value={k}>
              {MEASUREMENT_KINDS[k].label}
            </option>
          ))}
        </select>
        {err("kind")}
      </label>
      {info.scope === "seat" ? (
        <label className="flex flex-col text-sm font-semibold">
          Seat
          <select name="seatId" className={field} defaultValue="">
            <option value="">Choose…</option>
            {seats.map((s) => (
              <option key={s.id} value={s.id}>
                {s.code}
              </option>
            ))}
          </select>
          {err("seatId")}
        </label>
      ) : (
        <div />
      )}
      {kind === "stem_guide_clearance" ? (
        <label className="flex flex-col text-sm font-semibold">
          Method
          <select name="method" className={field} defaultValue="">
            <option value="">Choose…</option>
            {STEM_GUIDE_METHODS.map((m) => (
              <option key={m} value={m}>
                {STEM_GUIDE_METHOD_LABELS[m]}
              </option>
            ))}
          </select>
          {err("method")}
        </label>
      ) : (
        <div />
      )}
      <label className="flex flex-col text-sm font-semibold">
        Value
        <input name="value" inputMode="decimal" className={`${field} figure`} />
        {err("value")}
      </label>
      <label className="flex flex-col text-sm font-semibold">
        Unit
        <select name="unit" key={info.quantity} defaultValue={info.defaultUnit} className={field}>
          {units.map((u) => (
            <option key={u} value={u}>
              {UNIT_LABELS[u]}
            </option>
          ))}
        </select>
        {err("unit")}
      </label>
      <label className="flex flex-col text-sm font-semibold">
        Spec min (optional)
        <input name="specMin" inputMode="decimal" className={`${field} figure`} />
        {err("spec.min")}
      </label>
      <label className="flex flex-col text-sm font-semibold">
        Spec max (optional)
        <input name="specMax" inputMode="decimal" className={`${field} figure`} />
        {err("spec.max")}
      </label>
      {info.help ? <p className="col-span-2 text-sm text-stone-600 sm:col-span-4">{info.help}</p> : null}
      {kind === "stem_guide_clearance" ? (
        <p className="col-span-2 text-sm text-stone-600 sm:col-span-4">
          The rocking method reads larger than bore-minus-stem: judge it against a rocking figure, not a direct one.
        </p>
      ) : null}
      <div className="col-span-2 flex flex-wrap items-center gap-2 sm:col-span-4">
        <button type="submit" disabled={pending} className="min-h-12 rounded-lg bg-ink px-5 font-semibold text-white disabled:opacity-60">
          {pending ? "Saving…" : "Save measurement"}
        </button>
        <p aria-live="polite" className={`text-sm ${state.ok ? "text-emerald-800" : "text-rose-700"}`} data-testid="measurement-message">
          {state.message}
        </p>
      </div>
    </form>
  );
}
