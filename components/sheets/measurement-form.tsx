"use client";

// Measurements of the head as a whole (deck flatness); the per-seat figures are on the grid.
import { useState } from "react";
import { saveMeasurement } from "@/lib/actions/sheets";
import type { SpecInForce } from "@/lib/heads/sheets";
import { HEAD_KINDS, MEASUREMENT_KINDS, RANGE_VERDICT_LABELS, type MeasurementKind } from "@/lib/measure/results";
import { FORCE_UNITS, LENGTH_UNITS, UNIT_LABELS } from "@/lib/measure/units";
import { DecimalField, FieldError, fieldClass, ResultMessage, useKeptForm } from "./form-kit";


export function MeasurementForm({
  jobId,
  specs,
  saved: savedAtOpen,
}: {
  jobId: string;
  /** The specification in force per head measurement, when one is on file. */
  specs: Partial<Record<string, SpecInForce>>;
  saved: Partial<Record<string, { valueSi: number; verdict: string | null }>>;
}) {
  const { state, pending, onSubmit, onChange, errorFor, showMessage } = useKeptForm(saveMeasurement);
  const [kind, setKind] = useState<MeasurementKind>(HEAD_KINDS[0]!);
  const info = MEASUREMENT_KINDS[kind];
  const units = info.quantity === "force" ? FORCE_UNITS : LENGTH_UNITS;
  const spec = specs[kind];
  const saved = state.ok && state.saved && state.saved.kind === kind ? state.saved : savedAtOpen[kind];
  const input = (name: string, key: string, label: string) => <DecimalField idBase="m" name={name} label={label} error={errorFor(key, name)} />;
  return (
    <form onSubmit={onSubmit} onChange={onChange} className="grid grid-cols-2 gap-2 sm:grid-cols-4" noValidate data-testid="measurement-form">
      <input type="hidden" name="jobId" value={jobId} />
      <label className="col-span-2 flex flex-col text-sm font-semibold">
        What was measured
        <select name="kind" value={kind} onChange={(e) => setKind(e.target.value as MeasurementKind)} className={fieldClass(Boolean(errorFor("kind")))}>
          {HEAD_KINDS.map((k) => (
            <option key={k} value={k}>
              {MEASUREMENT_KINDS[k].label}
            </option>
          ))}
        </select>
        <FieldError id="m-kind-err" message={errorFor("kind")} />
      </label>
      {input("value", "value", "Value")}
      <label className="flex flex-col text-sm font-semibold">
        Unit
        <select name="unit" key={info.quantity} defaultValue={info.defaultUnit} className={fieldClass(Boolean(errorFor("unit")))}>
          {units.map((u) => (
            <option key={u} value={u}>
              {UNIT_LABELS[u]}
            </option>
          ))}
        </select>
        <FieldError id="m-unit-err" message={errorFor("unit")} />
      </label>
      <p className="col-span-2 text-sm sm:col-span-4" data-testid="measurement-spec">
        {spec ? (
          <>
            Specification in force:{" "}
            <span className="figure font-semibold">
              {spec.min !== null ? `${spec.min.toFixed(3)} mm` : ""}
              {spec.min !== null && spec.max !== null ? "–" : ""}
              {spec.max !== null ? `${spec.min === null ? "at most " : ""}${spec.max.toFixed(3)} mm` : ""}
            </span>{" "}
            ({spec.source === "job_override" ? "overridden on this job" : "from the specifications library"}).
          </>
        ) : (
          <>No specification on file for this job. {info.help}</>
        )}
      </p>
      <p className="col-span-2 text-sm sm:col-span-4" data-testid="measurement-saved">
        Saved:{" "}
        {saved ? (
          <span className="figure">
            {saved.valueSi.toFixed(3)} mm{saved.verdict ? ` · ${RANGE_VERDICT_LABELS[saved.verdict as keyof typeof RANGE_VERDICT_LABELS]}` : ""}
          </span>
        ) : (
          "not measured yet"
        )}
      </p>
      <details className="col-span-2 text-sm sm:col-span-4" open={Boolean(errorFor("spec.min", "specMin") || errorFor("spec.max", "specMax"))}>
        <summary className="min-h-11 cursor-pointer content-center">A different specification for this reading (optional)</summary>
        <div className="mt-1 grid grid-cols-2 gap-2">
          {input("specMin", "spec.min", "Spec min")}
          {input("specMax", "spec.max", "Spec max")}
        </div>
      </details>
      <div className="col-span-2 flex flex-wrap items-center gap-2 sm:col-span-4">
        <button type="submit" disabled={pending} className="min-h-12 rounded-lg bg-ink px-5 font-semibold text-white disabled:opacity-60">
          {pending ? "Saving…" : "Save measurement"}
        </button>
        <ResultMessage state={state} show={showMessage} testId="measurement-message" />
      </div>
    </form>
  );
}
